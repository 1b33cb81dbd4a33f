// The bytes of a solver's output file, read through a window of fixed size, so that reading a file of any size
// holds one chunk of it at a time (a 12 GB file is never one string). The window's text is the Latin-1 view of its
// bytes: one character per byte, so positions in the text are byte offsets in the file, a chunk boundary never
// splits a character, and the ASCII that VTK's structure and numbers are written in reads as itself. Names and
// quoted text that may hold other characters are decoded as UTF-8 where they are used (`utf8`).
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';

/** Bytes read per chunk: large enough that refills cost nothing next to parsing, small enough to hold anywhere. */
export const CHUNK_BYTES = 1 << 20;
/** The longest single piece (a token, a tag, a comment, a header line) the window grows to hold. Nothing valid in a
 *  VTK file comes close; a longer one is refused rather than read into memory whole. */
export const MAX_PIECE_BYTES = 64 << 20;

/** Random access to the bytes of a file or of an in-memory buffer. */
export interface ByteSource {
  readonly size: number;
  /** Copies up to `length` bytes from `position` into `into` at `at`; returns how many. */
  read(into: Buffer, at: number, length: number, position: number): number;
  close(): void;
}

/** An open file; `size` is taken once, when it is opened. */
export function fileSource(path: string): ByteSource {
  const fd = openSync(path, 'r');
  let size: number;
  try {
    size = fstatSync(fd).size;
  } catch (err) {
    closeSync(fd);
    throw err;
  }
  let open = true;
  return {
    size,
    read: (into, at, length, position) => {
      let got = 0;
      while (got < length) {
        const n = readSync(fd, into, at + got, length - got, position + got);
        if (n === 0) break;
        got += n;
      }
      return got;
    },
    close: () => { if (open) { open = false; closeSync(fd); } },
  };
}

/** Bytes already in memory (text handed to the parse functions directly, as the tests do). */
export function bufferSource(bytes: Buffer): ByteSource {
  return {
    size: bytes.length,
    read: (into, at, length, position) => bytes.copy(into, at, position, Math.min(position + length, bytes.length)),
    close: () => {},
  };
}

/** A name or quoted piece of window text (Latin-1, one character per byte) as the UTF-8 text it is. */
export function utf8(latin1: string): string {
  // eslint-disable-next-line no-control-regex
  return /[\x80-\xff]/.test(latin1) ? Buffer.from(latin1, 'latin1').toString('utf8') : latin1;
}

/**
 * A window onto the bytes [start, end) of a source. `text` holds the bytes [base, base + text.length); `more(keep)`
 * drops the text before `keep` and reads on, so that every position the caller holds moves down by `keep`.
 */
export class ByteWindow {
  text = '';
  /** Absolute offset of text[0]. */
  base: number;
  /** Last byte of the range read so far that is neither a blank nor a tab (-1: none yet). */
  lastNonBlank = -1;
  private buf: Buffer;
  private filled = 0;

  constructor(
    readonly source: ByteSource,
    start: number,
    readonly end: number,
    /** Called when one piece would need more than MAX_PIECE_BYTES of window. */
    private readonly tooLong: (bytes: number) => never,
    chunkBytes = CHUNK_BYTES,
    private readonly maxPiece = MAX_PIECE_BYTES,
  ) {
    this.base = start;
    this.buf = Buffer.allocUnsafe(Math.max(16, Math.min(chunkBytes, Math.max(end - start, 16))));
  }

  /** True when every byte of the range has been read into the window. */
  get done(): boolean {
    return this.base + this.filled >= this.end;
  }

  /** Moves the window to start at `at` (at or after its current start, within the range), dropping what it holds;
   *  `have`, the bytes from `at` on that the caller has already read, fill it without reading them again (bytes
   *  passed over are not seen: lastNonBlank does not follow them). */
  seek(at: number, have: Uint8Array): void {
    const n = Math.min(have.length, this.buf.length, Math.max(0, this.end - at));
    this.buf.set(have.subarray(0, n), 0);
    this.base = at;
    this.filled = n;
    this.text = this.buf.toString('latin1', 0, n);
    if (n === 0) this.more(0);
  }

  /** Drops the text before `keep` and reads the next chunk; false (nothing changed) when the range is all read. */
  more(keep: number): boolean {
    if (this.done) return false;
    if (keep > 0) {
      this.buf.copy(this.buf, 0, keep, this.filled);
      this.filled -= keep;
      this.base += keep;
    } else if (this.filled === this.buf.length) {
      // One piece fills the whole window: grow it, up to the limit.
      if (this.buf.length >= this.maxPiece) this.tooLong(this.buf.length);
      const bigger = Buffer.allocUnsafe(Math.min(2 * this.buf.length, this.maxPiece));
      this.buf.copy(bigger, 0, 0, this.filled);
      this.buf = bigger;
    }
    const from = this.base + this.filled;
    const want = Math.min(this.buf.length - this.filled, this.end - from);
    const got = this.source.read(this.buf, this.filled, want, from);
    if (got < want) {
      // The file shrank while it was read (the solver still writing?): read what is there as the end.
      (this as { end: number }).end = from + got;
    }
    for (let i = this.filled + got - 1; i >= this.filled; i--) {
      const c = this.buf[i]!;
      if (c !== 32 && c !== 9) { this.lastNonBlank = c; break; }
    }
    this.filled += got;
    this.text = this.buf.toString('latin1', 0, this.filled);
    return true;
  }
}
