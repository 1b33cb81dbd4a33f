import type { QuantityReport } from '../analysis/quantities.ts';
import { QUANTITY_CAUTION, quantityStatements, quantityTables, type TextTable } from '../report/quantity-tables.ts';

export interface QuantityTerminalOptions {
  /** ANSI colour (the CLI passes false when NO_COLOR is set or stdout is not a TTY). */
  color: boolean;
}

/**
 * The quantities' tables (GCI from the three finest levels; with four or more levels the least-squares uncertainty
 * and the uncertainty of every level; from three levels the mixed-order fit), their warnings, one interval statement
 * per quantity and the reminder that verification is not validation.
 */
export function formatQuantityReports(reports: readonly QuantityReport[], opts: QuantityTerminalOptions): string {
  if (reports.length === 0) return '';
  const sgr = (on: number, off: number) => (t: string) => (opts.color ? `\u001b[${on}m${t}\u001b[${off}m` : t);
  const bold = sgr(1, 22), faint = sgr(2, 22), warn = sgr(33, 39);
  const block = (t: TextTable, first: boolean): string[] => {
    const width = t.header.map((h, c) => Math.max([...h].length, ...t.rows.map((r) => [...r[c]!].length)));
    const textColumns = new Set(t.header.flatMap((h, c) => (['quantity', 'error model', 'data', 'convergence'].includes(h) ? [c] : [])));
    const line = (r: string[]) => r.map((cell, c) => (textColumns.has(c) ? cell.padEnd(width[c]!) : cell.padStart(width[c]!))).join('  ').trimEnd();
    return [
      ...(first ? [] : ['']),
      bold(first ? `Quantities: ${t.title[0]!.toLowerCase()}${t.title.slice(1)}` : t.title),
      '  ' + bold(line(t.header)),
      '  ' + faint(width.map((w) => '─'.repeat(w)).join('  ')),
      ...t.rows.map((r) => '  ' + line(r)),
      faint(`  ${t.legend}`),
    ];
  };
  const out = quantityTables(reports).flatMap((t, i) => block(t, i === 0));
  for (const q of reports) for (const w of q.warnings) out.push(`  ${warn('!')} ${q.name}: ${w}`);
  for (const q of reports) for (const n of q.notApplied ?? []) out.push(faint(`  · ${q.name}: ${n}`));
  out.push('', bold('Result'), ...quantityStatements(reports).map((s) => `  ${s}`), faint(`  ${QUANTITY_CAUTION}`));
  return out.join('\n');
}
