import type { QuantityReport } from '../analysis/quantities.ts';

export interface QuantityTerminalOptions {
  /** ANSI colour (the CLI passes false when NO_COLOR is set or stdout is not a TTY). */
  color: boolean;
}

const num = (x: number | null, digits = 7): string => (x === null || !Number.isFinite(x) ? '—' : Number(x.toPrecision(digits)).toString());
const pct = (x: number | null): string => (x === null || !Number.isFinite(x) ? '—' : `${(100 * x).toPrecision(3)}%`);
const order = (q: QuantityReport): string => (q.order === null ? '—' : `${q.order.toFixed(2)}${q.orderKind === 'assumed' ? ' (assumed)' : ''}`);

/** A table of the quantities' grid convergence indices, then one line per warning. */
export function formatQuantityReports(reports: readonly QuantityReport[], opts: QuantityTerminalOptions): string {
  if (reports.length === 0) return '';
  const sgr = (on: number, off: number) => (t: string) => (opts.color ? `\u001b[${on}m${t}\u001b[${off}m` : t);
  const bold = sgr(1, 22), faint = sgr(2, 22), warn = sgr(33, 39);
  const header = ['quantity', 'finest value', 'order', 'extrapolated', 'e_a', 'e_ext', 'GCI', 'Fs', 'convergence'];
  const rows = reports.map((q) => [
    q.name, num(q.finest), order(q), num(q.extrapolated), pct(q.approxRelError), pct(q.extrapolatedRelError), pct(q.gci),
    String(q.safetyFactor), q.convergence,
  ]);
  const width = header.map((h, c) => Math.max([...h].length, ...rows.map((r) => [...r[c]!].length)));
  const line = (r: string[]) => r.map((cell, c) => (c === 0 || c === r.length - 1 ? cell.padEnd(width[c]!) : cell.padStart(width[c]!))).join('  ').trimEnd();
  const grids = Math.max(...reports.map((q) => q.levelsUsed.length));
  const out = [
    bold(`Quantities: grid convergence index from the ${grids === 3 ? 'three' : 'two'} finest levels (Celik et al. 2008)`),
    '  ' + bold(line(header)),
    '  ' + faint(width.map((w) => '─'.repeat(w)).join('  ')),
    ...rows.map((r) => '  ' + line(r)),
  ];
  for (const q of reports) for (const w of q.warnings) out.push(`  ${warn('!')} ${q.name}: ${w}`);
  out.push(faint('  e_a = |φ1 − φ2| / |φ1|, e_ext = |φ_ext − φ1| / |φ_ext|, GCI = Fs·e_a / (r^p − 1) on the finest level'));
  return out.join('\n');
}
