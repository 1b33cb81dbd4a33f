// A small CSV reader after RFC 4180 (Shafranovich 2005): comma-separated fields, records ended by CRLF or LF,
// fields in double quotes may hold commas, line breaks and doubled quotes (""). A leading byte-order mark is
// dropped, blank lines are skipped, and every record keeps the line it starts on for messages. A table must end
// with a line break (RFC 4180 makes the last one optional; rungs requires it, because without it a file cut inside
// its last number — "0.12345" cut to "0.12" — reads as a valid, different number).
import { RungsInputError } from '../errors.ts';

/** A plain decimal number as people and every numerical code write it: optional sign, digits with at most one
 *  point, optional exponent. Not JavaScript's other forms (0x1f, 0b1, 0o7, Infinity, NaN, 1_000, empty text). */
const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** What a valid number looks like, for messages. */
export const DECIMAL_FORMS = 'a decimal number such as 0.125, -3, 2.5e-4';

/** The value of a plain decimal number, or null when the text is not one or its value is not finite (1e999). */
export function parseDecimal(text: string): number | null {
  if (!DECIMAL.test(text)) return null;
  const v = Number(text);
  return Number.isFinite(v) ? v : null;
}

/** The value of a non-negative integer written with digits only ("12", not "12.0", "1e1" or "+12"), or null. Values
 *  beyond 2^53 are returned as read (callers compare them with their limits). */
export function parseDigits(text: string): number | null {
  return /^\d+$/.test(text) ? Number(text) : null;
}

export interface CsvRecord {
  fields: string[];
  /** 1-based line on which the record starts. */
  line: number;
}

export interface CsvTable {
  header: string[];
  headerLine: number;
  rows: CsvRecord[];
}

/** Parses CSV text into records; an unclosed quote or text after a closing quote throws naming file and line. */
export function parseCsvRecords(text: string, file: string): CsvRecord[] {
  const records: CsvRecord[] = [];
  let fields: string[] = [];
  let field = '';
  let quoted = false;
  let line = 1;
  let recordLine = 1;
  let i = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  const n = text.length;
  const endRecord = (): void => {
    const blank = fields.length === 0 && field.trim() === '' && !quoted;
    fields.push(field);
    if (!blank) records.push({ fields, line: recordLine });
    fields = [];
    field = '';
    quoted = false;
  };
  while (i < n) {
    const ch = text[i]!;
    if (ch === '"' && !quoted && field.trim() === '') {
      const openLine = line;
      field = '';
      quoted = true;
      i++;
      for (;;) {
        if (i >= n) throw new RungsInputError(`${file} line ${openLine}: a quoted field is never closed (missing ")`, file);
        const c = text[i]!;
        if (c === '"') {
          if (text[i + 1] === '"') { field += '"'; i += 2; continue; }
          i++;
          break;
        }
        if (c === '\n') line++;
        field += c;
        i++;
      }
      // Only blanks may follow the closing quote before the separator.
      while (i < n && (text[i] === ' ' || text[i] === '\t')) i++;
      if (i < n && text[i] !== ',' && text[i] !== '\n' && text[i] !== '\r') {
        throw new RungsInputError(`${file} line ${line}: unexpected '${text[i]}' after a closing quote; quote the whole field`, file);
      }
      continue;
    }
    if (ch === ',') { fields.push(field); field = ''; quoted = false; i++; continue; }
    if (ch === '\r' || ch === '\n') {
      endRecord();
      if (ch === '\r' && text[i + 1] === '\n') i++;
      i++;
      line++;
      recordLine = line;
      continue;
    }
    if (quoted) throw new RungsInputError(`${file} line ${line}: unexpected '${ch}' after a closing quote; quote the whole field`, file);
    field += ch;
    i++;
  }
  if (field !== '' || fields.length > 0 || quoted) endRecord();
  return records;
}

export interface CsvTableOptions {
  /** Refuse a file whose last record has no line break after it (default true: it may be cut off). */
  finalLineBreak?: boolean;
}

/** A table: the first record is the header (trimmed names, unique, non-empty); rows must have its width, and the
 *  file must end with a line break (see the top of this file). */
export function parseCsvTable(text: string, file: string, opts: CsvTableOptions = {}): CsvTable {
  const records = parseCsvRecords(text, file);
  if (records.length === 0) throw new RungsInputError(`${file} line ${lineCount(text)}: the file is empty; expected a header row such as "h,L2,H1semi" and one row per level`, file);
  if (opts.finalLineBreak !== false) {
    const end = text.replace(/[ \t]+$/, '');
    if (!end.endsWith('\n') && !end.endsWith('\r')) {
      const last = records[records.length - 1]!;
      throw new RungsInputError(
        `${file} line ${lineCount(text)}: the file does not end with a line break, so its last record (line ${last.line}) may be cut off ` +
          '(a truncated file?); end every record, the last one too, with a line break',
        file,
      );
    }
  }
  const head = records[0]!;
  const header = head.fields.map((f) => f.trim());
  const seen = new Map<string, number>();
  header.forEach((name, k) => {
    if (name === '') throw new RungsInputError(`${file} line ${head.line}: column ${k + 1} of the header has no name`, file);
    if (seen.has(name)) throw new RungsInputError(`${file} line ${head.line}: column name '${name}' appears twice (columns ${seen.get(name)! + 1} and ${k + 1})`, file);
    seen.set(name, k);
  });
  const rows = records.slice(1);
  for (const r of rows) {
    if (r.fields.length !== header.length) {
      throw new RungsInputError(`${file} line ${r.line}: the row has ${r.fields.length} fields, the header has ${header.length} (${header.join(', ')})`, file);
    }
  }
  return { header, headerLine: head.line, rows };
}

/** Number of the line the end of the text is on. */
function lineCount(text: string): number {
  let line = 1;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10 || (c === 13 && text.charCodeAt(i + 1) !== 10)) line++;
  }
  return line;
}
