/**
 * The figures a benchmark reports for the README's performance table, one machine-readable line each:
 *   figure: {"name": "...", "value": 1.23, "unit": "s", "target": "≤ 1.5 s", "met": true, "note": "..."}
 * Every benchmark prints its own with `printFigure`; `npm run bench` (run.ts) collects them from the output with
 * `parseFigures` into one summary table, printed and written as Markdown into the record, so the README's table can
 * be pasted from it with the machine named. systems.bench.ts prints no such lines: `systemsFigures` reads its table.
 */

export interface Figure {
  /** What was measured, as the README's table names it. */
  name: string;
  value: number;
  /** 's', 'ms', '×', 'iterations', 'GB', … */
  unit: string;
  /** The issue's target in words (e.g. '≤ 12 s'), if there is one. */
  target?: string;
  /** Whether the target was met in this run (absent without a target). */
  met?: boolean;
  /** A range, the runs it is taken over, or anything else the value needs beside it. */
  note?: string;
}

export const FIGURE_PREFIX = 'figure: ';

/** Prints one figure line; rounds the value to 4 significant digits (the machines are noisy beyond that). */
export function printFigure(f: Figure): void {
  console.log(FIGURE_PREFIX + JSON.stringify({ ...f, value: Number(f.value.toPrecision(4)) }));
}

/** The figures in a benchmark's output, in order; lines that do not parse are skipped. */
export function parseFigures(output: string): Figure[] {
  const out: Figure[] = [];
  for (const line of output.split('\n')) {
    if (!line.startsWith(FIGURE_PREFIX)) continue;
    try {
      const f = JSON.parse(line.slice(FIGURE_PREFIX.length)) as Figure;
      if (typeof f.name === 'string' && typeof f.value === 'number' && typeof f.unit === 'string') out.push(f);
    } catch { /* not a figure line after all */ }
  }
  return out;
}

/** Targets of systems.bench.ts (its header: poisson3d and elasticity2d at ~1M unknowns under 6 s, stokes2d ~500k
 *  under 10 s), keyed by its case names. */
const SYSTEMS_TARGETS: Record<string, number> = { poisson3d: 6, elasticity2d: 6, stokes2d: 10 };

/** The figures of systems.bench.ts, read from its table (columns: case m unknowns nnz mesh space assem elim setup
 *  solve total errors …): per case its largest size's total (mesh to solve), the last row of that size. */
export function systemsFigures(output: string): Figure[] {
  const last = new Map<string, { unknowns: number; total: number; errors: number; iterations: string }>();
  for (const line of output.split('\n')) {
    const c = line.trim().split(/\s+/);
    const target = SYSTEMS_TARGETS[c[0] ?? ''];
    if (target === undefined || c.length < 14) continue;
    const unknowns = Number(c[2]), total = Number(c[10]), errors = Number(c[11]);
    if (!Number.isFinite(unknowns) || !Number.isFinite(total)) continue;
    const prev = last.get(c[0]!);
    if (!prev || unknowns >= prev.unknowns) last.set(c[0]!, { unknowns, total, errors, iterations: c[13]! });
  }
  return [...last].map(([name, r]) => ({
    name: `${name}, ${r.unknowns} unknowns: mesh to solution`,
    value: r.total,
    unit: 's',
    target: `≤ ${SYSTEMS_TARGETS[name]} s`,
    met: r.total <= SYSTEMS_TARGETS[name]!,
    note: `${r.iterations} iterations${Number.isFinite(r.errors) ? `; errors ${r.errors} s more` : ''}`,
  }));
}

/** A value as the tables show it: 3 significant digits, no exponent for everyday sizes. */
export function formatValue(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  const a = Math.abs(v);
  return a !== 0 && (a < 1e-3 || a >= 1e6) ? v.toExponential(2) : String(Number(v.toPrecision(3)));
}

export interface FigureRow { bench: string; figure: Figure; load: string }

/** The summary as Markdown (also readable in a terminal): one row per figure, with the benchmark and the load
 *  average (1 min) before → after it. */
export function figureTable(rows: readonly FigureRow[]): string[] {
  const cell = (s: string): string => s.replace(/\|/g, '\\|');
  const lines = ['| benchmark | what | figure | target | met | load average |', '|---|---|---|---|---|---|'];
  for (const { bench, figure: f, load } of rows) {
    const value = `${formatValue(f.value)} ${f.unit}${f.note ? ` (${f.note})` : ''}`;
    const met = f.met === undefined ? '' : f.met ? 'met' : 'not met';
    lines.push(`| ${cell(bench)} | ${cell(f.name)} | ${cell(value)} | ${cell(f.target ?? '')} | ${met} | ${load} |`);
  }
  return lines;
}

/** The lines of README.md between which `npm run bench -- --readme` writes the summary (heading and table). */
export const README_BEGIN = '<!-- bench summary: written by `npm run bench -- --readme`; rerun it rather than editing these lines -->';
export const README_END = '<!-- end of bench summary -->';

/** `text` with what lies between the lines `begin` and `end` replaced by `body` (the marker lines kept), or null when
 *  the markers are missing, out of order or not each there once. */
export function replaceBetween(text: string, begin: string, end: string, body: string): string | null {
  const a = text.indexOf(begin), b = text.indexOf(end);
  if (a < 0 || b < a || text.indexOf(begin, a + 1) >= 0 || text.indexOf(end, b + 1) >= 0) return null;
  return text.slice(0, a + begin.length) + '\n' + body.replace(/\n*$/, '\n') + text.slice(b);
}
