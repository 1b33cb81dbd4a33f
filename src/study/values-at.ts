// Values of a study's manufactured data at a solver's own points, for codes that cannot compile generated code in:
// the solver writes its points as CSV (columns x, y, z, t and, for boundary data, nx, ny, nz), rungs returns every
// datum that those columns determine.
import { RungsInputError } from '../errors.ts';
import type { CsvTable } from '../csv/read.ts';
import type { DataBundle } from '../codegen/types.ts';
import { compileBundle } from '../equation/index.ts';

/** Decimal numbers only (no 0x, 0b, Infinity or other forms only JavaScript reads). */
const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const ARGUMENT_COLUMNS = ['x', 'y', 'z', 't', 'nx', 'ny', 'nz'] as const;

export interface ValuesTable {
  header: string[];
  rows: number[][];
}

/** Column names of a function's outputs: its name for one output, name[i] (0-based, as in the C arrays) for more. */
export function outputColumns(name: string, outputs: number): string[] {
  return outputs === 1 ? [name] : Array.from({ length: outputs }, (_, i) => `${name}[${i}]`);
}

/** Evaluates every function of the bundle whose arguments the table supplies (missing x, y, z, t count as 0; the
 *  normal functions need nx, ny, nz — nz may be left out in 2D). */
export function valuesAtPoints(bundle: DataBundle, table: CsvTable, file: string): ValuesTable {
  const col = new Map(table.header.map((h, i) => [h, i]));
  const unknown = table.header.filter((h) => !(ARGUMENT_COLUMNS as readonly string[]).includes(h));
  if (unknown.length) {
    throw new RungsInputError(`${file} line ${table.headerLine}: unknown column${unknown.length > 1 ? 's' : ''} ${unknown.map((u) => `'${u}'`).join(', ')}; valid columns: ${ARGUMENT_COLUMNS.join(', ')}`, file);
  }
  if (!col.has('x')) throw new RungsInputError(`${file} line ${table.headerLine}: no column 'x'; give the points as columns x, y, z (and t, nx, ny, nz where needed)`, file);
  const hasNormal = col.has('nx') && (bundle.dim < 2 || col.has('ny')) && (bundle.dim < 3 || col.has('nz'));
  const compiled = compileBundle(bundle);
  const chosen = bundle.functions.filter((f) => hasNormal || !f.args.includes('nx'));
  const header = [...table.header, ...chosen.flatMap((f) => outputColumns(f.name, f.outputs.length))];
  const args = new Float64Array(7);
  const out = new Float64Array(bundle.dim * bundle.dim);
  const rows = table.rows.map((r) => {
    args.fill(0);
    const given = ARGUMENT_COLUMNS.map((name) => {
      const k = col.get(name);
      if (k === undefined) return 0;
      const text = r.fields[k]!.trim();
      if (!DECIMAL.test(text)) throw new RungsInputError(`${file} line ${r.line}: column '${name}' holds "${text}", not a decimal number`, file);
      return Number(text);
    });
    const row = [...table.header.map((h) => given[ARGUMENT_COLUMNS.indexOf(h as (typeof ARGUMENT_COLUMNS)[number])]!)];
    for (const f of chosen) {
      const c = compiled.functions.get(f.name)!;
      f.args.forEach((a, i) => { args[i] = given[ARGUMENT_COLUMNS.indexOf(a as (typeof ARGUMENT_COLUMNS)[number])]!; });
      c.evaluate(args, out);
      for (let i = 0; i < c.outputs; i++) row.push(out[i]!);
    }
    return row;
  });
  return { header, rows };
}
