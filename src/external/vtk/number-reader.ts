import { RungsInputError } from '../../errors.ts';
import { placeOf, type LevelRef } from '../where.ts';

/**
 * Whitespace-separated tokens of a text with their line numbers, for the ASCII parts of VTK files.
 * `fail` throws a RungsInputError naming the level, the file and the line.
 */
export class TokenCursor {
  pos: number;
  line: number;
  /** The current token and the line it is on. */
  tok = '';
  tokLine = 0;
  /** How the end of the range is named in messages ("the file ends", "the DataArray ends"). */
  endWhat = 'the file ends';

  constructor(
    readonly text: string,
    readonly file: string,
    readonly ref: LevelRef | undefined,
    start = 0,
    startLine = 1,
    private readonly end = text.length,
  ) {
    this.pos = start;
    this.line = startLine;
  }

  fail(message: string, line: number = this.tokLine || this.line): never {
    throw new RungsInputError(`${placeOf(this.ref, this.file, line)}: ${message}`, this.file);
  }

  /** Moves to the next token; false at the end. */
  next(): boolean {
    const t = this.text;
    let p = this.pos;
    while (p < this.end) {
      const c = t.charCodeAt(p);
      if (c === 10) this.line++;
      else if (c !== 32 && c !== 9 && c !== 13 && c !== 12 && c !== 11) break;
      p++;
    }
    if (p >= this.end) { this.pos = p; return false; }
    const start = p;
    while (p < this.end) {
      const c = t.charCodeAt(p);
      if (c === 32 || c === 10 || c === 9 || c === 13 || c === 12 || c === 11) break;
      p++;
    }
    this.tok = t.slice(start, p);
    this.tokLine = this.line;
    this.pos = p;
    return true;
  }

  /** The next token without moving, or null at the end. */
  peek(): string | null {
    const { pos, line, tok, tokLine } = this;
    const ok = this.next();
    const seen = ok ? this.tok : null;
    this.pos = pos; this.line = line; this.tok = tok; this.tokLine = tokLine;
    return seen;
  }

  /** The next token; at the end of the file, a "truncated" error saying what was being read. */
  need(what: string): string {
    if (!this.next()) this.fail(`${this.endWhat} while reading ${what} (truncated file?)`, this.line);
    return this.tok;
  }

  /** A non-negative integer token (a count or an index). */
  count(what: string): number {
    const tok = this.need(what);
    const v = Number(tok);
    if (!Number.isInteger(v) || v < 0) this.fail(`${what} must be a non-negative integer, found '${tok}'`);
    return v;
  }

  /** Skips to just after the next blank line (ends a METADATA block of legacy files). */
  skipPastBlankLine(): void {
    const m = /\r?\n[ \t\r]*\n/g;
    m.lastIndex = this.pos;
    const hit = m.exec(this.text);
    const to = hit ? hit.index + hit[0].length : this.end;
    for (let p = this.pos; p < to; p++) if (this.text.charCodeAt(p) === 10) this.line++;
    this.pos = to;
  }
}

/** What a block of numbers is, for messages: "the 27 coordinates of POINTS 9 (line 5)". */
export interface BlockInfo {
  what: string;
  declaredAt: number;
  /** Name of the block's values in messages ("coordinate", "value of 'u'"). */
  item: string;
}

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
    const v = Number(tok);
    if (!Number.isFinite(v) || tok === '') {
      if (looksLikeKeyword(tok)) {
        cur.fail(
          `found '${tok}' after ${k} of the ${count} ${block.what} (declared at line ${block.declaredAt}): ` +
            'the count in the file does not match the declared count',
        );
      }
      cur.fail(`${block.item} ${k + 1} of ${block.what} is '${tok}', not a finite number`);
    }
    if (integers && !Number.isInteger(v)) cur.fail(`${block.item} ${k + 1} of ${block.what} is '${tok}', not an integer`);
    into[offset + k] = v;
    if (lines) lines[offset + k] = cur.tokLine;
  }
}
