// The CSV reader of rungs: RFC 4180 (Shafranovich 2005) parsed by csv-parse (the sibling of the csv-stringify that
// writes rungs's tables): comma-separated fields, records ended by CRLF, LF or CR (any mix: each is named, since the
// parser would otherwise fix the first one it meets for the whole file), fields in double quotes holding commas,
// line breaks and doubled quotes (""). What rungs adds: a leading byte-order mark is dropped, blank lines are
// skipped, blanks around a field are dropped (every caller trimmed them), and every record keeps the line it starts
// on for messages, counted here from the byte offsets csv-parse reports (its own line count takes a CRLF inside a
// quoted field for two lines). A table must end with a line break (RFC 4180 makes the last one optional; rungs
// requires it, because without it a file cut inside its last number — "0.12345" cut to "0.12" — reads as a valid,
// different number).
import { CsvError, parse } from 'csv-parse/sync';
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

const CR = 13;
const LF = 10;
const QUOTE = 34;

/** Line numbers of byte offsets in `bytes`, asked in increasing order: a line break is LF, CRLF or a lone CR. */
function lineCounter(bytes: Uint8Array): (offset: number) => number {
  let at = 0;
  let line = 1;
  return (offset) => {
    for (; at < offset && at < bytes.length; at++) {
      const c = bytes[at]!;
      if (c === LF || (c === CR && bytes[at + 1] !== LF)) line++;
    }
    return line;
  };
}

/** A blank line: one field, empty once trimmed, and no quote in the record's bytes [from, to) (a line holding only
 *  "" is a record of one empty field). */
function blankRecord(fields: readonly string[], bytes: Uint8Array, from: number, to: number): boolean {
  return fields.length === 1 && fields[0] === '' && !bytes.subarray(from, to).includes(QUOTE);
}

/** The character starting at a byte offset. */
function charAt(bytes: Buffer, offset: number): string {
  return String.fromCodePoint(bytes.toString('utf8', offset, offset + 4).codePointAt(0) ?? 0xfffd);
}

/** Parses CSV text into records; an unclosed quote, text after a closing quote or a quote inside an unquoted field
 *  throws naming file and line. */
export function parseCsvRecords(text: string, file: string): CsvRecord[] {
  const bytes = Buffer.from(text, 'utf8');
  const lineAt = lineCounter(bytes);
  const records: CsvRecord[] = [];
  // Byte offset at which the record being parsed starts (past the byte-order mark, which csv-parse drops).
  let start = bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf ? 3 : 0;
  try {
    parse(bytes, {
      bom: true,
      record_delimiter: ['\r\n', '\n', '\r'],
      trim: true,
      relax_column_count: true, // the table checks the width itself, with the header in its message
      raw: true, // the record's text so far, which places an error in it
      on_record: (rec, info) => {
        // With `raw`, csv-parse hands the record as { record, raw } (its types say string[]).
        const fields = (rec as unknown as { record: string[] }).record;
        if (!blankRecord(fields, bytes, start, info.bytes)) records.push({ fields, line: lineAt(start) });
        start = info.bytes;
        return null; // kept here, not collected twice
      },
    });
  } catch (err) {
    if (!(err instanceof CsvError)) throw err;
    throw new RungsInputError(csvErrorMessage(err, bytes, start, lineAt, file), file);
  }
  return records;
}

/** The message for a csv-parse error in the record that starts at byte `start`. */
function csvErrorMessage(err: CsvError, bytes: Buffer, start: number, lineAt: (offset: number) => number, file: string): string {
  // The record's text up to the error (csv-parse's `raw`), and the byte offset where it ends.
  const raw = typeof err.raw === 'string' ? err.raw : '';
  const rawEnd = start + Buffer.byteLength(raw);
  const field = typeof err.index === 'number' ? err.index + 1 : null;
  switch (err.code) {
    case 'CSV_QUOTE_NOT_CLOSED':
      return `${file} line ${lineAt(start)}: a quoted field is never closed (missing ")${field ? `, field ${field} of the record starting on this line` : ''}`;
    case 'CSV_INVALID_CLOSING_QUOTE': // `raw` ends with the closing quote; the character follows it
    case 'CSV_NON_TRIMABLE_CHAR_AFTER_CLOSING_QUOTE': { // `raw` ends with the character, after blanks
      const at = err.code === 'CSV_INVALID_CLOSING_QUOTE' ? rawEnd : rawEnd - Buffer.byteLength(String.fromCodePoint(raw.codePointAt(raw.length - 1) ?? 0));
      return `${file} line ${lineAt(at)}: unexpected '${charAt(bytes, at)}' after a closing quote; quote the whole field`;
    }
    case 'INVALID_OPENING_QUOTE': { // `raw` ends with the quote; the field is unquoted, so it holds no comma
      const value = raw.slice(raw.lastIndexOf(',') + 1, -1).trimStart();
      return `${file} line ${lineAt(rawEnd - 1)}: a quote inside the unquoted field${field ? ` ${field}` : ''} ('${value}"…'); ` +
        'a field that holds a quote must be quoted whole, with each quote inside doubled ("a ""b"" c")';
    }
    default:
      return `${file} line ${lineAt(start)}: ${err.message}`;
  }
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
