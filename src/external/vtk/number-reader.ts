import { RungsInputError } from '../../errors.ts';
import { DECIMAL_FORMS, parseDecimal, parseDigits } from '../../csv/read.ts';
import { placeOf, type LevelRef } from '../where.ts';
import { ByteWindow, CHUNK_BYTES, utf8, type ByteSource } from './source.ts';

/** No count or block in a VTK file may exceed this many entries: the largest Int32Array index, which rungs's meshes
 *  use (a tighter limit usually comes from the file's size, see TokenCursor.room). */
export const MAX_ENTRIES = 0x7fffffff;

/**
 * Whitespace-separated tokens of a byte range of a file (or of a text) with their line numbers, for the ASCII parts
 * of VTK files, read through a window of fixed size (source.ts): memory stays one chunk however large the file.
 * Tokens are Latin-1 text (one character per byte; numbers and keywords are ASCII); `need` returns names decoded as
 * UTF-8. `fail` throws a RungsInputError naming the level, the file and the line.
 */
export class TokenCursor {
  /** Position in the window's text (`w.base + pos` is the offset in the file). */
  pos = 0;
  line: number;
  /** The current token and the line it is on. */
  tok = '';
  tokLine = 0;
  /** How the end of the range is named in messages ("the file ends", "the DataArray ends"). */
  endWhat = 'the file ends';
  readonly w: ByteWindow;
  private text: string;
  /** A position the window must keep while peeking (-1: none). */
  private keepFrom = -1;

  constructor(
    source: ByteSource,
    readonly file: string,
    readonly ref: LevelRef | undefined,
    start = 0,
    startLine = 1,
    end = source.size,
    chunkBytes = CHUNK_BYTES,
  ) {
    this.line = startLine;
    this.w = new ByteWindow(source, start, end, (bytes) => this.fail(
      `a single token or line longer than ${bytes} bytes; no number, name or keyword of a VTK file is that long (damaged file?)`, this.line), chunkBytes);
    this.w.more(0);
    this.text = this.w.text;
  }

  /** End of the range (an offset in the file). */
  get end(): number {
    return this.w.end;
  }

  fail(message: string, line: number = this.tokLine || this.line): never {
    throw new RungsInputError(`${placeOf(this.ref, this.file, line)}: ${message}`, this.file);
  }

  /** Drops the window before `keep` (never past a peek mark) and reads on; positions move down by what was dropped. */
  private refill(keep: number): boolean {
    if (this.keepFrom >= 0 && this.keepFrom < keep) keep = this.keepFrom;
    if (!this.w.more(keep)) return false;
    this.pos -= keep;
    if (this.keepFrom >= 0) this.keepFrom -= keep;
    this.text = this.w.text;
    return true;
  }

  /** Moves to the next token; false at the end. */
  next(): boolean {
    let t = this.text;
    let p = this.pos;
    let n = t.length;
    for (;;) {
      while (p < n) {
        const c = t.charCodeAt(p);
        if (c === 10) this.line++;
        else if (c !== 32 && c !== 9 && c !== 13 && c !== 12 && c !== 11) break;
        p++;
      }
      if (p < n) break;
      this.pos = p;
      if (!this.refill(p)) return false;
      t = this.text; p = this.pos; n = t.length;
    }
    let start = p;
    for (;;) {
      while (p < n) {
        const c = t.charCodeAt(p);
        if (c === 32 || c === 10 || c === 9 || c === 13 || c === 12 || c === 11) break;
        p++;
      }
      if (p < n) break;
      // The token runs to the end of the window: keep it and read on.
      this.pos = p;
      if (!this.refill(start)) break;
      start -= p - this.pos;
      t = this.text; p = this.pos; n = t.length;
    }
    this.tok = t.slice(start, p);
    this.tokLine = this.line;
    this.pos = p;
    return true;
  }

  /** The next token without moving, or null at the end. */
  peek(): string | null {
    const { line, tok, tokLine } = this;
    this.keepFrom = this.pos;
    const ok = this.next();
    const seen = ok ? this.tok : null;
    this.pos = this.keepFrom;
    this.keepFrom = -1;
    this.line = line; this.tok = tok; this.tokLine = tokLine;
    return seen;
  }

  /** The next token as UTF-8 text (a name, a keyword); at the end of the file, a "truncated" error saying what was being read. */
  need(what: string): string {
    if (!this.next()) this.fail(`${this.endWhat} while reading ${what} (truncated file?)`, this.line);
    return utf8(this.tok);
  }

  /** A non-negative integer token (a count), written with digits only and at most MAX_ENTRIES. */
  count(what: string): number {
    const tok = this.need(what);
    const v = parseDigits(tok);
    if (v === null) this.fail(`${what} must be a non-negative integer written with digits, found '${tok.slice(0, 40)}'`);
    if (v! > MAX_ENTRIES) this.fail(`${what} is ${tok}, more than the limit of ${MAX_ENTRIES} entries`);
    return v!;
  }

  /**
   * Checks, before anything is allocated, that `values` numbers can follow: at most MAX_ENTRIES, and no more than the
   * rest of the range can hold (each number takes at least one character and all but the last a separator).
   */
  room(values: number, what: string, declaredAt: number): void {
    if (values > MAX_ENTRIES) {
      this.fail(`${what} (line ${declaredAt}) needs ${values} values, more than the limit of ${MAX_ENTRIES} entries`, declaredAt);
    }
    const left = this.end - (this.w.base + this.pos);
    const fits = Math.floor((left + 1) / 2);
    if (values > fits) {
      this.fail(
        `${what} (line ${declaredAt}) needs ${values} values, but the ${left} characters after it can hold at most ${fits}: ` +
          'the declared count is wrong or the file is truncated',
        declaredAt,
      );
    }
  }

  /** The rest of the current line without its line break, moving past the break; null when the range ends first. */
  restOfLine(): string | null {
    for (;;) {
      const at = this.text.indexOf('\n', this.pos);
      if (at >= 0) {
        const s = this.text.slice(this.pos, at);
        this.pos = at + 1;
        this.line++;
        return s;
      }
      if (!this.refill(this.pos)) return null;
    }
  }

  /** Skips to just after the next blank line (ends a METADATA block of legacy files). */
  skipPastBlankLine(): void {
    const blank = /\r?\n[ \t\r]*\n/g;
    for (;;) {
      const t = this.text;
      blank.lastIndex = this.pos;
      const hit = blank.exec(t);
      const last = t.lastIndexOf('\n');
      // Without a hit, keep from the last line break: a blank line may straddle the end of the window.
      const to = hit ? hit.index + hit[0].length : this.w.done || last < this.pos ? t.length : last;
      for (let p = this.pos; p < to; p++) if (t.charCodeAt(p) === 10) this.line++;
      this.pos = to;
      if (hit || !this.refill(to)) return;
    }
  }
}

/** What a block of numbers is, for messages: "the 27 coordinates of POINTS 9 (line 5)". */
export interface BlockInfo {
  what: string;
  declaredAt: number;
  /** Name of the block's values in messages ("coordinate", "value of 'u'"). */
  item: string;
}

/** A token as quoted in a message: UTF-8, at most 40 characters. */
const shown = (tok: string): string => utf8(tok).slice(0, 40);

const looksLikeKeyword = (tok: string): boolean => /^[A-Za-z_][A-Za-z_0-9]*$/.test(tok) && !/^(nan|inf|infinity)$/i.test(tok);

/**
 * Reads `count` numbers into `into` (integers when `integers`), checking that each is finite; `lines`, when given,
 * receives each value's line. A keyword where a number should be means the declared count is larger than what the
 * file holds; the end of the file means it is truncated. Both messages name the block and where it was declared.
 */
export function readNumbers(
  cur: TokenCursor,
  count: number,
  block: BlockInfo,
  into: Float64Array | Int32Array,
  integers: boolean,
  offset = 0,
  lines?: Int32Array,
): void {
  for (let k = 0; k < count; k++) {
    if (!cur.next()) {
      cur.fail(
        `${cur.endWhat} after ${k} of the ${count} ${block.what} (declared at line ${block.declaredAt}): the file is truncated ` +
          'or the declared count does not match the data',
        cur.line,
      );
    }
    const tok = cur.tok;
    const v = integers && /^-?\d+$/.test(tok) ? Number(tok) : parseDecimal(tok);
    if (v === null) {
      if (looksLikeKeyword(tok)) {
        cur.fail(
          `found '${shown(tok)}' after ${k} of the ${count} ${block.what} (declared at line ${block.declaredAt}): ` +
            'the count in the file does not match the declared count',
        );
      }
      cur.fail(`${block.item} ${k + 1} of ${block.what} is '${shown(tok)}', not a finite number; expected ${integers ? 'an integer written with digits' : DECIMAL_FORMS}`);
    }
    if (integers) {
      if (!/^-?\d+$/.test(tok)) cur.fail(`${block.item} ${k + 1} of ${block.what} is '${shown(tok)}', not an integer written with digits`);
      if (v! > MAX_ENTRIES || v! < -MAX_ENTRIES) {
        cur.fail(`${block.item} ${k + 1} of ${block.what} is ${shown(tok)}, beyond the largest index rungs reads (${MAX_ENTRIES})`);
      }
    }
    into[offset + k] = v!;
    if (lines) lines[offset + k] = cur.tokLine;
  }
}
