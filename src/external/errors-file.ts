// The "errors" output protocol: the solver measures its own errors and writes, into its level folder,
//   errors.json  { "dofs": 1234, "h": 0.01, "errors": { "L2": 1e-4, "H1semi": 2e-2 }, "quantities": { "flux_top": 1.2345 } }
// or the same as a one-row CSV, errors.csv, with columns dofs, h and one column per error or quantity name.
import { z } from 'zod';
import { RungsInputError } from '../errors.ts';
import { parseCsvTable } from '../csv/read.ts';
import { levelLabel, lineAt, placeOf, type LevelRef } from './where.ts';

export interface ReportedErrors {
  file: string;
  dofs: number;
  /** Mesh size the solver reports, or null when it gives none. */
  h: number | null;
  cells: number | null;
  errors: Record<string, number>;
  quantities: Record<string, number>;
}

export interface ErrorsFileOptions {
  level?: LevelRef;
  /** CSV columns that are quantities (all other columns but dofs, h and cells are errors). */
  quantities?: readonly string[];
  /** Error names that must be present (the study's norms). */
  require?: readonly string[];
  /** Quantity names that must be present. */
  requireQuantities?: readonly string[];
}

const finiteNumber = z.number({ message: 'expected a number' }).finite();
const name = z.string().min(1, 'names must not be empty');

export const errorsFileSchema = z.object({
  dofs: z.number({ message: 'expected the number of unknowns, a positive integer' }).int('expected an integer').positive('expected a positive integer'),
  h: finiteNumber.positive('expected a positive mesh size').optional(),
  cells: z.number().int().positive().optional(),
  errors: z.record(name, finiteNumber.nonnegative('errors must be ≥ 0'), { message: 'expected an object of error values by name' }).optional(),
  quantities: z.record(name, finiteNumber, { message: 'expected an object of quantity values by name' }).optional(),
  /** Anything else the solver wants to keep with the level (ignored by rungs). */
  info: z.unknown().optional(),
}).strict();

/** Parses errors.json text; messages name the level, the file, the line (for syntax) and the field. */
export function parseErrorsJson(text: string, file: string, opts: ErrorsFileOptions = {}): ReportedErrors {
  const ref = opts.level;
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (err) {
    const bare = /(?<![\w"])(NaN|-?Infinity)(?![\w"])/.exec(text);
    if (bare) {
      throw new RungsInputError(
        `${placeOf(ref, file, lineAt(text, bare.index))}: ${bare[1]} is not a JSON number; the solver produced a non-finite value ` +
          '(Python: json.dump(..., allow_nan=False) makes it fail early)',
        file,
      );
    }
    const pos = /position (\d+)/.exec((err as Error).message);
    const line = pos ? lineAt(text, Number(pos[1])) : undefined;
    throw new RungsInputError(`${placeOf(ref, file, line)}: not valid JSON (${(err as Error).message})`, file);
  }
  const res = errorsFileSchema.safeParse(raw);
  if (!res.success) {
    const issue = res.error.issues[0]!;
    const path = issue.path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${String(p)}`)).join('').replace(/^\./, '') || '(top level)';
    let message = issue.message;
    if (issue.code === 'unrecognized_keys') {
      message = `unknown field${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `'${k}'`).join(', ')}; valid fields: dofs, h, cells, errors, quantities, info`;
    }
    throw new RungsInputError(`${placeOf(ref, file)}: ${path}: ${message}`, file);
  }
  const v = res.data;
  const out: ReportedErrors = {
    file, dofs: v.dofs, h: v.h ?? null, cells: v.cells ?? null, errors: { ...(v.errors ?? {}) }, quantities: { ...(v.quantities ?? {}) },
  };
  requireNames(out, opts);
  return out;
}

/** Parses a one-row errors.csv: columns dofs, h (optional), cells (optional) and one per error or quantity. */
export function parseErrorsCsv(text: string, file: string, opts: ErrorsFileOptions = {}): ReportedErrors {
  const ref = opts.level;
  const where = (line?: number): string => placeOf(ref, file, line);
  let table;
  try {
    table = parseCsvTable(text, file);
  } catch (err) {
    if (err instanceof RungsInputError) throw new RungsInputError(ref ? `${levelLabel(ref)}: ${err.message}` : err.message, file);
    throw err;
  }
  if (table.rows.length !== 1) {
    throw new RungsInputError(`${where(table.rows[1]?.line ?? table.headerLine)}: expected exactly one data row after the header, found ${table.rows.length}`, file);
  }
  const row = table.rows[0]!;
  if (!table.header.includes('dofs')) {
    throw new RungsInputError(`${where(table.headerLine)}: no 'dofs' column; the header is ${table.header.join(',')} and needs dofs, optionally h, then one column per error`, file);
  }
  const quantities = new Set(opts.quantities ?? []);
  const out: ReportedErrors = { file, dofs: 0, h: null, cells: null, errors: {}, quantities: {} };
  table.header.forEach((col, k) => {
    const text = row.fields[k]!.trim();
    const value = Number(text);
    if (text === '' || !Number.isFinite(value)) {
      throw new RungsInputError(`${where(row.line)}: column '${col}' holds '${text}', not a finite number`, file);
    }
    if (col === 'dofs') {
      if (!Number.isInteger(value) || value <= 0) throw new RungsInputError(`${where(row.line)}: column 'dofs' must be a positive integer, found ${text}`, file);
      out.dofs = value;
    } else if (col === 'h') {
      if (!(value > 0)) throw new RungsInputError(`${where(row.line)}: column 'h' must be positive, found ${text}`, file);
      out.h = value;
    } else if (col === 'cells') {
      if (!Number.isInteger(value) || value <= 0) throw new RungsInputError(`${where(row.line)}: column 'cells' must be a positive integer, found ${text}`, file);
      out.cells = value;
    } else if (quantities.has(col)) {
      out.quantities[col] = value;
    } else {
      if (value < 0) throw new RungsInputError(`${where(row.line)}: error column '${col}' is ${text}; errors must be ≥ 0 (list it as a quantity if it is one)`, file);
      out.errors[col] = value;
    }
  });
  requireNames(out, opts);
  return out;
}

function requireNames(out: ReportedErrors, opts: ErrorsFileOptions): void {
  const where = placeOf(opts.level, out.file);
  for (const nm of opts.require ?? []) {
    if (!(nm in out.errors)) {
      const have = Object.keys(out.errors);
      throw new RungsInputError(
        `${where}: no error '${nm}'; the file has ${have.length ? have.map((h) => `'${h}'`).join(', ') : 'no errors'} and the study measures ${(opts.require ?? []).join(', ')}`,
        out.file,
      );
    }
  }
  for (const nm of opts.requireQuantities ?? []) {
    if (!(nm in out.quantities)) {
      const have = Object.keys(out.quantities);
      throw new RungsInputError(
        `${where}: no quantity '${nm}'; the file has ${have.length ? have.map((h) => `'${h}'`).join(', ') : 'no quantities'}`,
        out.file,
      );
    }
  }
}
