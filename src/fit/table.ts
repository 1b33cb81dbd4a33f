// Picks the size, error and quantity columns of a convergence table and checks every number it uses.
import { RungsInputError } from '../errors.ts';
import { DECIMAL_FORMS, parseDecimal, type CsvRecord, type CsvTable } from '../csv/read.ts';

export interface ColumnChoice {
  /** Fit against 'h' or 'dofs' (default: h when the table has an h column, else dofs). */
  by?: 'h' | 'dofs';
  /** Column names of the sizes (defaults 'h' and 'dofs'). */
  hColumn?: string;
  dofsColumn?: string;
  /** Error columns, by name ("L2" also finds a column "L2_error"). Default: every column ending in _error (rungs's own
   *  CSV), else every column holding a number that is not a size, level, n, cells or quantity column. */
  errors?: readonly string[];
  /** Quantity columns for the grid convergence index. */
  quantities?: readonly string[];
}

export interface SeriesColumn {
  /** Series name in reports ("L2" for a column "L2_error"). */
  name: string;
  column: string;
  /** One value per level, coarse to fine. */
  values: number[];
}

export interface FitData {
  by: 'h' | 'dofs';
  /** Source line of each level, coarse to fine. */
  lines: number[];
  h: number[] | null;
  dofs: number[] | null;
  n: (number | null)[];
  cells: number[] | null;
  errors: SeriesColumn[];
  quantities: SeriesColumn[];
  /** The rows were not in coarse-to-fine order and were sorted. */
  reordered: boolean;
  /** Columns left out. */
  unused: string[];
}

/** Columns of rungs's own level CSV that are not errors of a norm, though one ends in _error. */
const META_COLUMNS = ['level', 'n', 'cells', 'algebraic_error', 'algebraic_target', 'quasi_optimality'];
const ERROR_SUFFIX = '_error';
const INTERP_SUFFIX = '_interp_error';

/** Selects and validates the columns of a table; every message names the file, the line and the column. */
export function readFitData(table: CsvTable, file: string, choice: ColumnChoice = {}): FitData {
  const { header, rows } = table;
  const fail = (message: string): never => { throw new RungsInputError(`${file}: ${message}`, file); };
  if (rows.length < 2) {
    const q = choice.quantities?.[0];
    const rowsText = `${rows.length} data row${rows.length === 1 ? '' : 's'}`;
    if (q !== undefined && !(choice.errors && choice.errors.length)) {
      fail(`column '${q}': the grid convergence index needs at least 2 levels (3 for an observed order, 4 for the least-squares uncertainty); the table has ${rowsText}`);
    }
    fail(`the table has ${rowsText}; a fit needs at least 2 levels`);
  }
  const has = (c: string) => header.includes(c);
  const hCol = choice.hColumn ?? 'h';
  const dofsCol = choice.dofsColumn ?? 'dofs';
  if (choice.hColumn && !has(hCol)) fail(`no column '${hCol}' (--h-column); the columns are ${header.join(', ')}`);
  if (choice.dofsColumn && !has(dofsCol)) fail(`no column '${dofsCol}' (--dofs-column); the columns are ${header.join(', ')}`);
  const by = choice.by ?? (has(hCol) ? 'h' : 'dofs');
  if (by === 'h' && !has(hCol)) fail(`fitting in h needs an '${hCol}' column; the columns are ${header.join(', ')} (name it with --h-column, or fit in dofs)`);
  if (by === 'dofs' && !has(dofsCol)) fail(`the table needs an '${hCol}' or a '${dofsCol}' column; the columns are ${header.join(', ')}`);

  const numbers = (column: string, check: (v: number) => string | null): number[] => {
    const k = header.indexOf(column);
    return rows.map((r) => numberAt(r, k, column, file, check));
  };
  const positive = (v: number) => (v > 0 ? null : 'must be positive');
  const h = has(hCol) ? numbers(hCol, positive) : null;
  const dofs = has(dofsCol) ? numbers(dofsCol, positive) : null;
  const cells = has('cells') ? tryNumbers(rows, header.indexOf('cells')) : null;
  const nCol = has('n') ? tryNumbers(rows, header.indexOf('n')) : null;

  const quantityNames = [...(choice.quantities ?? [])];
  for (const q of quantityNames) if (!has(q)) fail(`no quantity column '${q}'; the columns are ${header.join(', ')}`);
  const reserved = new Set([hCol, dofsCol, ...META_COLUMNS, ...quantityNames]);

  let errorColumns: { name: string; column: string }[];
  if (choice.errors && choice.errors.length) {
    errorColumns = choice.errors.map((name) => {
      const column = has(name) ? name : has(name + ERROR_SUFFIX) ? name + ERROR_SUFFIX : null;
      if (!column) fail(`no error column '${name}' (nor '${name}${ERROR_SUFFIX}'); the columns are ${header.join(', ')}`);
      if (quantityNames.includes(column!)) fail(`column '${column}' is named both as an error and as a quantity`);
      return { name: stripSuffix(name), column: column! };
    });
  } else {
    const suffixed = header.filter((c) => c.endsWith(ERROR_SUFFIX) && !c.endsWith(INTERP_SUFFIX) && !reserved.has(c));
    // A column with any number in it is taken as an error column, so that one bad cell is reported, not skipped.
    const candidates = suffixed.length ? suffixed : header.filter((c) => !reserved.has(c) && anyNumber(rows, header.indexOf(c)));
    errorColumns = candidates.map((c) => ({ name: stripSuffix(c), column: c }));
    if (errorColumns.length === 0 && quantityNames.length === 0) {
      fail(`no error columns found among ${header.join(', ')}; name them with --errors (e.g. --errors L2,H1semi)`);
    }
  }
  const errorSeries = errorColumns.map(({ name, column }) => ({
    name, column, values: numbers(column, (v) => (v >= 0 ? null : 'is negative; errors must be ≥ 0 (use --quantity for a signed quantity)')),
  }));
  const quantitySeries = quantityNames.map((q) => ({ name: q, column: q, values: numbers(q, () => null) }));

  // Coarse to fine: h decreasing, or dofs increasing.
  const key = by === 'h' ? h!.map((v) => -v) : dofs!.slice();
  const order = rows.map((_, i) => i).sort((a, b) => key[a]! - key[b]!);
  for (let k = 1; k < order.length; k++) {
    if (key[order[k]!] === key[order[k - 1]!]) {
      fail(`lines ${rows[order[k - 1]!]!.line} and ${rows[order[k]!]!.line} have the same ${by === 'h' ? hCol : dofsCol} (${by === 'h' ? h![order[k]!] : dofs![order[k]!]}); each level needs its own size`);
    }
  }
  if (h && dofs) {
    // The two size columns must agree on which level is finer.
    for (let k = 1; k < order.length; k++) {
      const a = order[k - 1]!, b = order[k]!;
      if (!(h[b]! < h[a]!) || !(dofs[b]! > dofs[a]!)) {
        fail(`lines ${rows[a]!.line} and ${rows[b]!.line}: '${hCol}' and '${dofsCol}' disagree on which level is finer (h ${h[a]} → ${h[b]}, dofs ${dofs[a]} → ${dofs[b]})`);
      }
    }
  }
  const reordered = order.some((v, i) => v !== i);
  const pick = <T>(xs: T[]): T[] => order.map((i) => xs[i]!);
  const used = new Set([...(h ? [hCol] : []), ...(dofs ? [dofsCol] : []), ...errorColumns.map((e) => e.column), ...quantityNames, ...(nCol ? ['n'] : []), ...(cells ? ['cells'] : [])]);
  return {
    by,
    lines: pick(rows.map((r) => r.line)),
    h: h ? pick(h) : null,
    dofs: dofs ? pick(dofs) : null,
    n: nCol ? pick(nCol) : rows.map(() => null),
    cells: cells ? pick(cells) : null,
    errors: errorSeries.map((s) => ({ ...s, values: pick(s.values) })),
    quantities: quantitySeries.map((s) => ({ ...s, values: pick(s.values) })),
    reordered,
    unused: header.filter((c) => !used.has(c)),
  };
}

function stripSuffix(name: string): string {
  return name.endsWith(ERROR_SUFFIX) && name.length > ERROR_SUFFIX.length ? name.slice(0, -ERROR_SUFFIX.length) : name;
}

function numberAt(r: CsvRecord, k: number, column: string, file: string, check: (v: number) => string | null): number {
  const text = r.fields[k]!.trim();
  const v = parseDecimal(text);
  if (text === '') throw new RungsInputError(`${file} line ${r.line}, column '${column}': the value is empty`, file);
  if (v === null) throw new RungsInputError(`${file} line ${r.line}, column '${column}': '${text}' is not a finite number; expected ${DECIMAL_FORMS}`, file);
  const problem = check(v);
  if (problem) throw new RungsInputError(`${file} line ${r.line}, column '${column}': ${text} ${problem}`, file);
  return v;
}

function anyNumber(rows: CsvRecord[], k: number): boolean {
  return rows.some((r) => parseDecimal(r.fields[k]!.trim()) !== null);
}

/** The column as numbers when every row holds a finite number, else null. */
function tryNumbers(rows: CsvRecord[], k: number): number[] | null {
  const out: number[] = [];
  for (const r of rows) {
    const v = parseDecimal(r.fields[k]!.trim());
    if (v === null) return null;
    out.push(v);
  }
  return out;
}
