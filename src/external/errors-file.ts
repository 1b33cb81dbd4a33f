// The "errors" output protocol: the solver measures its own errors and writes, into its level folder,
//   errors.json  { "dofs": 1234, "h": 0.01, "errors": { "L2": 1e-4, "H1semi": 2e-2 }, "quantities": { "flux_top": 1.2345 } }
// or the same as a one-row CSV, errors.csv, with columns dofs, h and one column per error or quantity name.
import { z } from 'zod';
import { RungsInputError } from '../errors.ts';
import { DECIMAL_FORMS, parseCsvTable, parseDecimal } from '../csv/read.ts';
import { levelLabel, placeOf, type LevelRef } from './where.ts';

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
/** Error and quantity names: what a study can declare (src/study/schema.ts, src/external/schema.ts). A name outside
 *  this form could never be one a study uses, so it is refused rather than carried along (it is often damage). */
const NAME = /^[A-Za-z_][A-Za-z0-9_.-]*$/;
const NAME_FORM = 'a name of letters, digits, "_", "." or "-" starting with a letter or "_"';
const name = z.string().regex(NAME, `expected ${NAME_FORM}`);

export const errorsFileSchema = z.object({
  dofs: z.number({ message: 'expected the number of unknowns, a positive integer' }).int('expected an integer').positive('expected a positive integer'),
  h: finiteNumber.positive('expected a positive mesh size').optional(),
  cells: z.number().int('expected an integer').positive('expected a positive integer').optional(),
  errors: z.record(name, finiteNumber.nonnegative('errors must be ≥ 0'), { message: 'expected an object of error values by name' }).optional(),
  quantities: z.record(name, finiteNumber, { message: 'expected an object of quantity values by name' }).optional(),
  /** Anything else the solver wants to keep with the level (ignored by rungs). */
  info: z.unknown().optional(),
}).strict();

/** Parses errors.json text; messages name the level, the file, the line and the field. A leading byte-order mark is
 *  dropped, as in CSV files. The JSON is read by rungs's own parser (ECMA-404 grammar) so that every message has a
 *  line, a key given twice is refused (JSON.parse would keep the last silently) and NaN / Infinity are named. A file
 *  cut anywhere before its closing brace is not valid JSON and is refused. */
export function parseErrorsJson(text: string, file: string, opts: ErrorsFileOptions = {}): ReportedErrors {
  const ref = opts.level;
  const { value: raw, lines } = parseJsonWithLines(text, (line, message) => {
    throw new RungsInputError(`${placeOf(ref, file, line)}: ${message}`, file);
  });
  const res = errorsFileSchema.safeParse(raw);
  if (!res.success) {
    const issue = res.error.issues[0]!;
    const path = issue.path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${String(p)}`)).join('').replace(/^\./, '') || '(top level)';
    let message = issue.message;
    if (issue.code === 'unrecognized_keys') {
      message = `unknown field${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `'${k}'`).join(', ')}; valid fields: dofs, h, cells, errors, quantities, info`;
    }
    // The line of the value at fault, else of the nearest enclosing object (a missing field).
    let line: number | undefined;
    for (let k = issue.path.length; k >= 0 && line === undefined; k--) line = lines.get(pathKey(issue.path.slice(0, k)));
    throw new RungsInputError(`${placeOf(ref, file, line)}: ${path}: ${message}`, file);
  }
  const v = res.data;
  const out: ReportedErrors = {
    file, dofs: v.dofs, h: v.h ?? null, cells: v.cells ?? null, errors: { ...(v.errors ?? {}) }, quantities: { ...(v.quantities ?? {}) },
  };
  const top = lines.get(pathKey([]));
  requireNames(out, opts, lines.get(pathKey(['errors'])) ?? top, lines.get(pathKey(['quantities'])) ?? top);
  return out;
}

const pathKey = (path: readonly PropertyKey[]): string => JSON.stringify(path.map((p) => (typeof p === 'number' ? p : String(p))));

/** Objects and arrays deeper than this are refused (no errors file needs more; it keeps the parser off the stack limit). */
const MAX_JSON_DEPTH = 64;

/**
 * A JSON text (ECMA-404) as a value, with the line of every value by its path (pathKey). `fail(line, message)` must
 * throw. Numbers follow JSON's decimal grammar; NaN, Infinity, hexadecimal, leading zeros, trailing commas, comments,
 * control characters in strings and duplicate keys are refused.
 */
function parseJsonWithLines(src: string, fail: (line: number, message: string) => never): { value: unknown; lines: Map<string, number> } {
  let pos = src.charCodeAt(0) === 0xfeff ? 1 : 0;
  let line = 1;
  const lines = new Map<string, number>();
  const path: (string | number)[] = [];
  const ws = (): void => {
    for (;;) {
      const c = src.charCodeAt(pos);
      if (c === 10) line++;
      else if (c !== 32 && c !== 9 && c !== 13) return;
      pos++;
    }
  };
  const shown = (): string => (pos >= src.length ? 'the end of the file (truncated file?)' : `'${src.slice(pos, pos + 12).split(/[\s,:{}[\]"]/)[0] || src[pos]}'`);
  const value = (depth: number): unknown => {
    ws();
    lines.set(pathKey(path), line);
    const c = src[pos];
    if (c === '{' || c === '[') {
      if (depth >= MAX_JSON_DEPTH) fail(line, `objects and arrays nested deeper than ${MAX_JSON_DEPTH} levels`);
      const open = line;
      pos++;
      const isObject = c === '{';
      const close = isObject ? '}' : ']';
      const out: Record<string, unknown> | unknown[] = isObject ? {} : [];
      ws();
      if (src[pos] === close) { pos++; return out; }
      for (let k = 0; ; k++) {
        ws();
        if (isObject) {
          if (src[pos] !== '"') fail(line, `expected a field name in double quotes, found ${shown()}`);
          const keyLine = line;
          const key = string();
          if (key === '__proto__') fail(keyLine, "the field name '__proto__' is not allowed; rename it");
          if (Object.hasOwn(out, key)) fail(keyLine, `field '${key}' is given twice in the object opened at line ${open}; give each field once`);
          ws();
          if (src[pos] !== ':') fail(line, `expected ':' after the field name '${key}', found ${shown()}`);
          pos++;
          path.push(key);
          Object.defineProperty(out, key, { value: value(depth + 1), enumerable: true, writable: true, configurable: true });
        } else {
          path.push(k);
          (out as unknown[]).push(value(depth + 1));
        }
        path.pop();
        ws();
        if (src[pos] === ',') { pos++; continue; }
        if (src[pos] === close) { pos++; return out; }
        fail(line, `expected ',' or '${close}' in the ${isObject ? 'object' : 'array'} opened at line ${open}, found ${shown()}`);
      }
    }
    if (c === '"') return string();
    const word = /^[A-Za-z]+/.exec(src.slice(pos, pos + 12))?.[0];
    if (word !== undefined) {
      if (word === 'true' || word === 'false' || word === 'null') { pos += word.length; return word === 'true' ? true : word === 'false' ? false : null; }
      if (word === 'NaN' || word === 'Infinity') {
        fail(line, `${word} is not a JSON number; the solver produced a non-finite value (Python: json.dump(..., allow_nan=False) makes it fail early)`);
      }
      fail(line, `expected a value (a number, a string, an object, an array, true, false or null), found ${shown()}`);
    }
    const num = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(src.slice(pos, pos + 400));
    if (num) {
      const after = src[pos + num[0].length];
      if (after !== undefined && /[\w.+-]/.test(after)) fail(line, `'${src.slice(pos, pos + num[0].length + 1)}…' is not a JSON number; write plain decimal numbers such as 0.125 or 2.5e-4`);
      const v = Number(num[0]);
      if (!Number.isFinite(v)) fail(line, `${num[0]} is beyond the range of a double-precision number`);
      pos += num[0].length;
      return v;
    }
    if (src.startsWith('-Infinity', pos)) fail(line, '-Infinity is not a JSON number; the solver produced a non-finite value (Python: json.dump(..., allow_nan=False) makes it fail early)');
    fail(line, `expected a value, found ${shown()}`);
  };
  const string = (): string => {
    const startLine = line;
    pos++; // opening quote
    let out = '';
    for (;;) {
      if (pos >= src.length) fail(line, `the file ends inside the string opened at line ${startLine} (truncated file?)`);
      const ch = src.charCodeAt(pos);
      if (ch === 34) { pos++; return out; }
      if (ch < 0x20) fail(line, `a control character (code ${ch}) inside a string; write it as an escape such as \\n`);
      if (ch === 92) {
        const e = src[pos + 1];
        const simple: Record<string, string> = { '"': '"', '\\': '\\', '/': '/', b: '\b', f: '\f', n: '\n', r: '\r', t: '\t' };
        if (e !== undefined && Object.hasOwn(simple, e)) { out += simple[e]; pos += 2; continue; }
        if (e === 'u' && /^[0-9a-fA-F]{4}$/.test(src.slice(pos + 2, pos + 6))) { out += String.fromCharCode(parseInt(src.slice(pos + 2, pos + 6), 16)); pos += 6; continue; }
        fail(line, `invalid escape '\\${e ?? ''}' in a string; JSON allows \\" \\\\ \\/ \\b \\f \\n \\r \\t and \\uXXXX`);
      }
      out += src[pos];
      pos++;
    }
  };
  const v = value(0);
  ws();
  if (pos < src.length) fail(line, `unexpected ${shown()} after the end of the JSON value`);
  return { value: v, lines };
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
  const badName = table.header.find((col) => !NAME.test(col));
  if (badName !== undefined) {
    throw new RungsInputError(`${where(table.headerLine)}: column name '${badName.slice(0, 40)}' is not ${NAME_FORM}; the header is dofs, h, cells and one column per error or quantity`, file);
  }
  const quantities = new Set(opts.quantities ?? []);
  const out: ReportedErrors = { file, dofs: 0, h: null, cells: null, errors: {}, quantities: {} };
  table.header.forEach((col, k) => {
    const text = row.fields[k]!.trim();
    const parsed = parseDecimal(text);
    if (parsed === null) {
      throw new RungsInputError(`${where(row.line)}: column '${col}' holds '${text}', not a finite number; expected ${DECIMAL_FORMS}`, file);
    }
    const value = parsed;
    if (col === 'dofs') {
      if (!Number.isSafeInteger(value) || value <= 0) throw new RungsInputError(`${where(row.line)}: column 'dofs' must be a positive integer (at most 2^53), found ${text}`, file);
      out.dofs = value;
    } else if (col === 'h') {
      if (!(value > 0)) throw new RungsInputError(`${where(row.line)}: column 'h' must be positive, found ${text}`, file);
      out.h = value;
    } else if (col === 'cells') {
      if (!Number.isSafeInteger(value) || value <= 0) throw new RungsInputError(`${where(row.line)}: column 'cells' must be a positive integer (at most 2^53), found ${text}`, file);
      out.cells = value;
    } else if (quantities.has(col)) {
      out.quantities[col] = value;
    } else {
      if (value < 0) throw new RungsInputError(`${where(row.line)}: error column '${col}' is ${text}; errors must be ≥ 0 (list it as a quantity if it is one)`, file);
      out.errors[col] = value;
    }
  });
  requireNames(out, opts, table.headerLine, table.headerLine);
  return out;
}

function requireNames(out: ReportedErrors, opts: ErrorsFileOptions, errorsLine: number | undefined, quantitiesLine: number | undefined): void {
  const at = (line: number | undefined) => placeOf(opts.level, out.file, line);
  for (const nm of opts.require ?? []) {
    if (!(nm in out.errors)) {
      const have = Object.keys(out.errors);
      throw new RungsInputError(
        `${at(errorsLine)}: no error '${nm}'; the file has ${have.length ? have.map((h) => `'${h}'`).join(', ') : 'no errors'} and the study measures ${(opts.require ?? []).join(', ')}`,
        out.file,
      );
    }
  }
  for (const nm of opts.requireQuantities ?? []) {
    if (!(nm in out.quantities)) {
      const have = Object.keys(out.quantities);
      throw new RungsInputError(
        `${at(quantitiesLine)}: no quantity '${nm}'; the file has ${have.length ? have.map((h) => `'${h}'`).join(', ') : 'no quantities'}`,
        out.file,
      );
    }
  }
}
