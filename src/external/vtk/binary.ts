// Binary DataArrays of VTK XML files: inline base64 (format="binary") and appended data (format="appended", in an
// <AppendedData encoding="base64"> or encoding="raw"), uncompressed or compressed with vtkZLibDataCompressor ("VTK
// File Formats", Kitware, XML file formats; every layout below was checked against files written by VTK 9.1's
// vtkXMLUnstructuredGridWriter, test/external/vtu-binary.test.ts):
// - uncompressed: a header word holding the data's byte count, then the data; in base64 both are ONE run (one
//   padding at the end of both);
// - compressed: header words [number of blocks, uncompressed block size, uncompressed size of the last block (0 when
//   it is a full block), compressed size of each block], then the blocks, each a zlib stream; in base64 the header
//   and the blocks are TWO runs, each padded on its own (an empty array: a header [0, block size, 0] and no data);
// - header words are UInt32 (the default when header_type is absent) or UInt64, in the file's byte_order, as is the
//   data; an appended array's offset="…" counts bytes (raw) or characters (base64) from the byte after the '_'.
// Everything streams: a base64 run or a raw range is read a chunk at a time from the source, values are converted a
// stage at a time into the caller's typed array, and only one compressed block is held whole (VTK's writer uses
// blocks of 32 KiB). Counts are checked against what the range can hold before the caller allocates anything.
import { inflateSync } from 'node:zlib';
import { endianness } from 'node:os';
import { MAX_ENTRIES } from './number-reader.ts';
import { CHUNK_BYTES, type ByteSource } from './source.ts';

/** The value types of VTK's XML DataArrays and their widths in bytes. */
export const VTK_TYPE_WIDTH: Readonly<Record<string, number>> = Object.freeze({
  Int8: 1, UInt8: 1, Int16: 2, UInt16: 2, Int32: 4, UInt32: 4, Int64: 8, UInt64: 8, Float32: 4, Float64: 8,
});
export const VTK_TYPES = Object.keys(VTK_TYPE_WIDTH).join(', ');

/**
 * The largest ratio of uncompressed to compressed size a deflate stream reaches: 1032:1 (zlib's "technical details",
 * Adler, from memory; test/external/vtu-binary.test.ts measures 1030:1 for zeros). A block that declares more is
 * damaged, and checking it bounds what a small compressed file makes the reader allocate.
 */
export const DEFLATE_MAX_RATIO = 1032;

/** How the file stores its binary data (attributes of <VTKFile>). */
export interface BinaryLayout {
  littleEndian: boolean;
  /** Bytes per header word: 4 (UInt32) or 8 (UInt64). */
  headerWidth: 4 | 8;
  zlib: boolean;
}

/** Where a message points: a line of the file (base64 text) or a byte offset (raw data). */
export type Fail = (message: string, at: { line: number } | { byte: number }) => never;

/** One binary DataArray, its header read and checked; `read` fills the caller's array. */
export interface BinaryArray {
  read(into: Float64Array | Int32Array): void;
}

const machineLE = endianness() === 'LE';

// Base64 (RFC 4648, §4): the alphabet maps to 0..63; '=' pads; blanks and line breaks between characters are skipped.
const PAD = -3;
const BLANK = -2;
/** What nextChar returns at the end of the range (the table marks other bytes -1). */
const END = -9;
const B64 = (() => {
  const t = new Int8Array(256).fill(-1);
  const alphabet = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
  for (let i = 0; i < 64; i++) t[alphabet.charCodeAt(i)] = i;
  t[61] = PAD;
  for (const c of [32, 9, 10, 13]) t[c] = BLANK;
  return t;
})();

type Sink = (bytes: Uint8Array) => void;

/** A sequence of bytes read from a range of the source: raw, or decoded from base64 runs. */
interface ByteStream {
  /** Reads exactly n bytes of the current run, handing them on in pieces; fails when the data ends first. */
  read(n: number, sink: Sink, what: string): void;
  /** Ends a base64 run: its last group must have ended exactly at the bytes read (no bytes left over). */
  endRun(what: string): void;
  /** At most how many bytes are left (an upper bound, known without reading). */
  available(): number;
  /** Where the stream is now, for messages. */
  at(): { line: number } | { byte: number };
}

class RawStream implements ByteStream {
  private readonly buf: Buffer;
  constructor(private readonly source: ByteSource, private pos: number, private readonly end: number, private readonly fail: Fail, chunk: number) {
    this.buf = Buffer.allocUnsafe(Math.max(64, Math.min(chunk, CHUNK_BYTES)));
  }

  read(n: number, sink: Sink, what: string): void {
    if (this.pos + n > this.end) {
      this.fail(`${what} needs ${n} bytes from byte ${this.pos}, but the appended data ends at byte ${this.end} ` +
        `(${Math.max(0, this.end - this.pos)} bytes left): the file is truncated or an offset or size is wrong`, { byte: this.pos });
    }
    while (n > 0) {
      const take = Math.min(n, this.buf.length);
      const got = this.source.read(this.buf, 0, take, this.pos);
      if (got < take) this.fail(`the file ends at byte ${this.pos + got} inside ${what} (it shrank while being read?)`, { byte: this.pos + got });
      sink(this.buf.subarray(0, take));
      this.pos += take;
      n -= take;
    }
  }

  endRun(): void {}

  available(): number {
    return Math.max(0, this.end - this.pos);
  }

  at(): { byte: number } {
    return { byte: this.pos };
  }
}

class Base64Stream implements ByteStream {
  private readonly buf: Buffer;
  /** buf holds the source's bytes [bufBase, bufBase + bufLen); p is the next one to decode. */
  private bufBase: number;
  private bufLen = 0;
  private p = 0;
  private line: number;
  /** Bytes of the last decoded group not yet handed on. */
  private readonly carry = new Uint8Array(3);
  private carryAt = 0;
  private carryLen = 0;
  /** The current run ended with padding. */
  private padded = false;
  /** Decoded bytes, handed on when full (a multiple of 3 bytes). */
  private readonly out = new Uint8Array(3 << 14);

  constructor(private readonly source: ByteSource, start: number, private readonly end: number, line: number, private readonly fail: Fail, chunk: number) {
    this.buf = Buffer.allocUnsafe(Math.max(64, Math.min(chunk, CHUNK_BYTES)));
    this.bufBase = start;
    this.line = line;
    this.charLine = line;
  }

  private refill(): boolean {
    const from = this.bufBase + this.p;
    if (from >= this.end) return false;
    const got = this.source.read(this.buf, 0, Math.min(this.buf.length, this.end - from), from);
    if (got === 0) return false;
    this.bufBase = from;
    this.bufLen = got;
    this.p = 0;
    return true;
  }

  /** The next character that is not a blank (its table value: -1 for a byte outside base64), or END at the end of
   *  the range; `ch` is the byte. */
  private ch = 0;
  /** The line of the last character returned (where data that ends early ends). */
  private charLine: number;
  private nextChar(): number {
    for (;;) {
      if (this.p >= this.bufLen && !this.refill()) return END;
      const c = this.buf[this.p++]!;
      const v = B64[c]!;
      if (v === BLANK) {
        if (c === 10) this.line++;
        continue;
      }
      this.ch = c;
      this.charLine = this.line;
      return v;
    }
  }

  /** Decodes one group of four characters into carry; fails at the end of the range or at a bad character. */
  private group(what: string, done: number, n: number): void {
    const v = [0, 0, 0, 0];
    for (let i = 0; i < 4; i++) {
      const x = this.nextChar();
      if (x === END) {
        this.fail(`the base64 data of ${what} ends after ${done} of its ${n} bytes${i ? ` (inside a group of 4 characters)` : ''}: ` +
          'the file is truncated or the data is shorter than its header declares', { line: this.charLine });
      }
      if (x === -1 || (x === PAD && i < 2)) {
        const shown = this.ch >= 33 && this.ch <= 126 ? `'${String.fromCharCode(this.ch)}'` : `byte ${this.ch}`;
        this.fail(`${shown} in the base64 data of ${what} is not allowed there; base64 uses A-Z a-z 0-9 + / and '=' only ` +
          'as padding at the end of a run (damaged data?)', { line: this.line });
      }
      v[i] = x;
    }
    if (v[2] === PAD && v[3] !== PAD) this.fail(`the base64 data of ${what} has '=' followed by data in one group (damaged data?)`, { line: this.line });
    const bytes = v[2] === PAD ? 1 : v[3] === PAD ? 2 : 3;
    const bits = (v[0]! << 18) | (v[1]! << 12) | ((v[2]! & 63) << 6) | (v[3]! & 63);
    this.carry[0] = bits >>> 16; this.carry[1] = (bits >>> 8) & 255; this.carry[2] = bits & 255;
    this.carryAt = 0;
    this.carryLen = bytes;
    if (bytes < 3) this.padded = true;
  }

  read(n: number, sink: Sink, what: string): void {
    const out = this.out;
    let o = 0;
    let done = 0;
    const flush = (): void => { if (o > 0) { sink(out.subarray(0, o)); o = 0; } };
    while (done < n && this.carryLen > 0) { out[o++] = this.carry[this.carryAt++]!; this.carryLen--; done++; }
    const buf = this.buf;
    while (done < n) {
      if (this.padded) {
        this.fail(`the base64 data of ${what} ends with '=' after ${done} of its ${n} bytes: the data is shorter than its header ` +
          'declares (damaged data?)', { line: this.line });
      }
      // Fast path: whole groups of four alphabet characters in the buffer.
      let p = this.p;
      const stop = this.bufLen - 4;
      while (n - done >= 3 && p <= stop && o <= out.length - 3) {
        const a = B64[buf[p]!]!, b = B64[buf[p + 1]!]!, c = B64[buf[p + 2]!]!, d = B64[buf[p + 3]!]!;
        if ((a | b | c | d) < 0) break;
        const bits = (a << 18) | (b << 12) | (c << 6) | d;
        out[o] = bits >>> 16; out[o + 1] = (bits >>> 8) & 255; out[o + 2] = bits & 255;
        o += 3; p += 4; done += 3;
      }
      this.p = p;
      if (o > out.length - 3) flush();
      if (done >= n) break;
      if (n - done >= 3 && this.p <= this.bufLen - 4 && (B64[buf[this.p]!]! | B64[buf[this.p + 1]!]! | B64[buf[this.p + 2]!]! | B64[buf[this.p + 3]!]!) >= 0) continue;
      // Slow path: blanks, padding, the end of the buffer or of the run, a bad character.
      this.group(what, done, n);
      while (done < n && this.carryLen > 0) { out[o++] = this.carry[this.carryAt++]!; this.carryLen--; done++; }
      if (o > out.length - 3) flush();
    }
    flush();
  }

  endRun(what: string): void {
    if (this.carryLen > 0) {
      this.fail(`the base64 data of ${what} holds more bytes than its header declares: its last group of 4 characters ` +
        `decodes ${this.carryLen} byte(s) past the end (damaged data?)`, { line: this.line });
    }
    this.padded = false;
  }

  available(): number {
    return Math.floor(Math.max(0, this.end - this.bufBase - this.p) / 4) * 3 + this.carryLen;
  }

  /** The line of the next character to decode (blanks before it are passed over). */
  at(): { line: number } {
    for (;;) {
      if (this.p >= this.bufLen && !this.refill()) break;
      const c = this.buf[this.p]!;
      if (B64[c] !== BLANK) break;
      if (c === 10) this.line++;
      this.p++;
    }
    return { line: this.line };
  }

  /** Fails if anything but blanks is left in the range (inline data longer than its header declares). */
  expectEnd(what: string): void {
    if (this.nextChar() !== END) {
      this.fail(`the base64 data of ${what} goes on after the bytes its header declares: the header is wrong or the data ` +
        'damaged', { line: this.line });
    }
  }
}

/** Where a binary DataArray's data is. */
export type BinarySource =
  | { kind: 'inline'; source: ByteSource; start: number; end: number; line: number }
  | { kind: 'appended'; encoding: 'raw' | 'base64'; source: ByteSource; start: number; end: number; line: number };

/** What the caller expects: `count` values of `type`, integers (indices, cell types) or any numbers. */
export interface BinaryRequest {
  type: string;
  count: number;
  integers: boolean;
  /** 'DataArray "T" (line 7)', for messages. */
  what: string;
  /** The values the count stands for: 'coordinates of NumberOfPoints="4"'. */
  meaning: string;
}

/**
 * Opens a binary DataArray: reads and checks its header (sizes against the request, against what the range can
 * hold, and the deflate ratio) before anything is allocated; the returned reader fills the caller's array.
 */
export function openBinaryArray(src: BinarySource, layout: BinaryLayout, req: BinaryRequest, fail: Fail, chunkBytes = CHUNK_BYTES): BinaryArray {
  const width = VTK_TYPE_WIDTH[req.type]!;
  const bytes = req.count * width;
  const stream: ByteStream = src.kind === 'appended' && src.encoding === 'raw'
    ? new RawStream(src.source, src.start, src.end, fail, chunkBytes)
    : new Base64Stream(src.source, src.start, src.end, src.line, fail, chunkBytes);
  const w = layout.headerWidth;
  const words = (n: number, part: string): number[] => {
    const raw = new Uint8Array(n * w);
    let at = 0;
    stream.read(n * w, (b) => { raw.set(b, at); at += b.length; }, `the header (${part}) of ${req.what}`);
    const view = new DataView(raw.buffer);
    const out: number[] = [];
    for (let i = 0; i < n; i++) {
      const v = w === 4 ? view.getUint32(i * 4, layout.littleEndian) : Number(view.getBigUint64(i * 8, layout.littleEndian));
      if (v > Number.MAX_SAFE_INTEGER) fail(`a header word of ${req.what} is ${v}, beyond any size a file holds (damaged data?)`, stream.at());
      out.push(v);
    }
    return out;
  };
  const sizeMismatch = (declared: number, at: { line: number } | { byte: number }): never =>
    fail(`${req.what} holds ${declared} bytes of ${req.type} (${declared % width === 0 ? `${declared / width} values` : `not a whole number of values`}), ` +
      `but the ${req.count} ${req.meaning} need ` +
      `${bytes} bytes: a count in the file is wrong or the data is damaged`, at);
  const short = (need: number, at: { line: number } | { byte: number }): never =>
    fail(`${req.what} declares ${need} more bytes of data, but at most ${stream.available()} are left where it is stored: ` +
      'the file is truncated or the header is damaged', at);

  if (!layout.zlib) {
    const headerAt = stream.at();
    const [declared] = words(1, 'byte count');
    if (declared !== bytes) sizeMismatch(declared!, headerAt);
    if (bytes > stream.available()) short(bytes, headerAt);
    const dataAt = stream.at();
    // Where value i is: its byte in raw data; the line the data starts on in base64 (usually one line).
    const valueAt = 'byte' in dataAt ? (i: number) => ({ byte: dataAt.byte + i * width }) : () => dataAt;
    return {
      read(into) {
        const values = new Values(req, layout.littleEndian, into, fail, valueAt);
        stream.read(bytes, (b) => values.push(b), req.what);
        stream.endRun(req.what);
        values.finish();
        if (src.kind === 'inline') (stream as Base64Stream).expectEnd(req.what);
      },
    };
  }

  const headerAt = stream.at();
  const [nBlocks, blockSize, lastSize] = words(3, 'number of blocks, block size, last block size') as [number, number, number];
  if (nBlocks * w > stream.available()) {
    fail(`${req.what} declares ${nBlocks} compressed blocks, more than the header's ${stream.available()} remaining bytes can list ` +
      '(damaged header?)', headerAt);
  }
  if (nBlocks > 0 && (blockSize === 0 || lastSize > blockSize)) {
    fail(`${req.what} has a compression header with block size ${blockSize} and last block size ${lastSize}; the block size ` +
      'must be positive and the last block no larger (damaged header?)', headerAt);
  }
  const blockBytes = (b: number): number => (b === nBlocks - 1 && lastSize > 0 ? lastSize : blockSize);
  const declared = nBlocks === 0 ? 0 : (nBlocks - 1) * blockSize + blockBytes(nBlocks - 1);
  if (declared !== bytes) sizeMismatch(declared, headerAt);
  const compressed = words(nBlocks, 'compressed block sizes');
  stream.endRun(`the compression header of ${req.what}`);
  let total = 0;
  for (let b = 0; b < nBlocks; b++) {
    if (blockBytes(b) > DEFLATE_MAX_RATIO * compressed[b]!) {
      fail(`block ${b + 1} of ${req.what} declares ${blockBytes(b)} bytes compressed into ${compressed[b]}, more than zlib's largest ` +
        `ratio of ${DEFLATE_MAX_RATIO}:1 allows (damaged header?)`, headerAt);
    }
    total += compressed[b]!;
  }
  if (total > stream.available()) short(total, stream.at());
  return {
    read(into) {
      // Values of compressed data are placed at the array's header.
      const values = new Values(req, layout.littleEndian, into, fail, () => headerAt);
      let block = Buffer.allocUnsafe(0);
      for (let b = 0; b < nBlocks; b++) {
        const size = compressed[b]!;
        if (block.length < size) block = Buffer.allocUnsafe(size);
        let at = 0;
        const blockAt = stream.at();
        stream.read(size, (x) => { block.set(x, at); at += x.length; }, `block ${b + 1} of ${nBlocks} of ${req.what}`);
        const expect = blockBytes(b);
        let plain: Buffer;
        try {
          plain = inflateSync(block.subarray(0, size), { maxOutputLength: Math.max(1, expect) });
        } catch (err) {
          const why = (err as NodeJS.ErrnoException).code === 'ERR_BUFFER_TOO_LARGE' ? `it inflates to more than the ${expect} bytes its header declares`
            : `zlib: ${(err as Error).message}`;
          fail(`compressed block ${b + 1} of ${nBlocks} of ${req.what} does not inflate (${why}): the data is damaged`, blockAt);
        }
        if (plain!.length !== expect) {
          fail(`compressed block ${b + 1} of ${nBlocks} of ${req.what} inflates to ${plain!.length} bytes, but its header declares ` +
            `${expect}: the data is damaged`, blockAt);
        }
        values.push(plain!);
      }
      if (nBlocks > 0) stream.endRun(req.what);
      values.finish();
      if (src.kind === 'inline') (stream as Base64Stream).expectEnd(req.what);
    },
  };
}

/** Index of the low and the high 32-bit word of a 64-bit integer in this machine's order. */
const LO = machineLE ? 0 : 1;
const HI = 1 - LO;

/** 64-bit integers (word pairs) into indices: -1, or the first value beyond ±MAX_ENTRIES (left unwritten). */
function int64ToIndices(words: Int32Array, n: number, signed: boolean, into: Int32Array, k: number): number {
  for (let i = 0; i < n; i++) {
    const l = words[2 * i + LO]!, h = words[2 * i + HI]!;
    // In range: 0 … 2^31 − 1 (high word 0, low word non-negative) or, signed, −(2^31 − 1) … −1.
    if (!((h === 0 && l >= 0) || (signed && h === -1 && l < 0 && l !== -2147483648))) return i;
    into[k + i] = l;
  }
  return -1;
}

/** 64-bit integers (word pairs) into doubles (rounded to nearest beyond 2^53: one rounding, in the addition). */
function int64ToDoubles(words: Int32Array, n: number, signed: boolean, into: Float64Array, k: number): void {
  if (signed) for (let i = 0; i < n; i++) into[k + i] = words[2 * i + HI]! * 4294967296 + (words[2 * i + LO]! >>> 0);
  else for (let i = 0; i < n; i++) into[k + i] = (words[2 * i + HI]! >>> 0) * 4294967296 + (words[2 * i + LO]! >>> 0);
}

/** The first of n 32-bit integers beyond ±MAX_ENTRIES (−2^31, or above 2^31 − 1 unsigned), or -1. */
function firstBeyond(view: Int32Array | Uint32Array, n: number): number {
  for (let i = 0; i < n; i++) {
    const v = view[i]!;
    if (v > MAX_ENTRIES || v < -MAX_ENTRIES) return i;
  }
  return -1;
}

/** Bytes converted a stage at a time into the caller's array (a multiple of 8 bytes). */
const STAGE_BYTES = 1 << 16;

type Ctor = { new (buffer: ArrayBuffer, offset: number, length: number): ArrayLike<number> & { length: number } };
const VIEW: Record<string, Ctor> = {
  Int8: Int8Array, UInt8: Uint8Array, Int16: Int16Array, UInt16: Uint16Array, Int32: Int32Array, UInt32: Uint32Array,
  Float32: Float32Array, Float64: Float64Array, Int64: Int32Array, UInt64: Uint32Array,
};

/** Values of the file's type, in its byte order, turned into the caller's Float64Array or Int32Array. */
class Values {
  private readonly stage = new ArrayBuffer(STAGE_BYTES);
  private readonly bytes = Buffer.from(this.stage);
  private fill = 0;
  private k = 0;
  private readonly width: number;
  private readonly swap: boolean;

  constructor(private readonly req: BinaryRequest, littleEndian: boolean, private readonly into: Float64Array | Int32Array,
    private readonly fail: Fail, private readonly valueAt: (i: number) => { line: number } | { byte: number }) {
    this.width = VTK_TYPE_WIDTH[req.type]!;
    this.swap = littleEndian !== machineLE && this.width > 1;
  }

  push(b: Uint8Array): void {
    let at = 0;
    while (at < b.length) {
      const take = Math.min(b.length - at, STAGE_BYTES - this.fill);
      this.bytes.set(b.subarray(at, at + take), this.fill);
      this.fill += take;
      at += take;
      if (this.fill === STAGE_BYTES) this.convert();
    }
  }

  finish(): void {
    this.convert();
    // The sizes were checked against count × width, so nothing is left over and every value was written.
    if (this.fill !== 0 || this.k !== this.req.count) throw new Error(`internal: ${this.k} of ${this.req.count} values of ${this.req.what} converted`);
  }

  private convert(): void {
    const { width, into } = this;
    const n = Math.floor(this.fill / width);
    if (n === 0) return;
    const used = n * width;
    if (this.swap) {
      const part = this.bytes.subarray(0, used);
      if (width === 2) part.swap16(); else if (width === 4) part.swap32(); else part.swap64();
    }
    const type = this.req.type;
    const k = this.k;
    if (type === 'Int64' || type === 'UInt64') {
      // 64-bit integers as pairs of 32-bit words in this machine's order (the bytes were swapped to it above).
      const words = new Int32Array(this.stage, 0, 2 * n);
      const signed = type === 'Int64';
      if (this.req.integers) {
        const bad = int64ToIndices(words, n, signed, into as Int32Array, k);
        if (bad >= 0) {
          const l = words[2 * bad + LO]! >>> 0, h = words[2 * bad + HI]!;
          this.outOfRange(bad, (signed ? h : h >>> 0) * 4294967296 + l);
        }
      } else {
        int64ToDoubles(words, n, signed, into as Float64Array, k);
      }
    } else {
      const view = new VIEW[type]!(this.stage, 0, n);
      if (this.req.integers && (type === 'Int32' || type === 'UInt32')) {
        const bad = firstBeyond(view as Int32Array | Uint32Array, n);
        if (bad >= 0) this.outOfRange(bad, view[bad]!);
      }
      into.set(view as unknown as ArrayLike<number>, k);
    }
    this.k += n;
    this.bytes.copy(this.bytes, 0, used, this.fill);
    this.fill -= used;
  }

  private outOfRange(i: number, v: number): never {
    return this.fail(`value ${this.k + i + 1} of ${this.req.what} is ${v}, beyond the largest index rungs reads (${MAX_ENTRIES})`, this.valueAt(this.k + i));
  }
}
