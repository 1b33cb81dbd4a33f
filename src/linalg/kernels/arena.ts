/** A fixed-size block of WebAssembly memory that holds the arrays the sparse kernels work on, handed out as typed
 *  array views. The memory never grows (growing would detach every view), so it is reserved generously up front:
 *  pages that are never written are never backed by physical memory (Linux maps them on first touch), so the
 *  reservation costs address space, not memory. Freed blocks go to a first-fit free list and are reused, which
 *  also spares the cost of first touches (page faults). Offset 0 is never handed out: the kernels' descending
 *  loops rely on that (see sparse.wat). */
import type { Allocator } from './allocator.ts';
import type { SparseKernels } from './sparse-kernels.ts';
import { SPARSE_KERNELS_BASE64 } from './sparse-wasm.ts';

const PAGE = 65536;
/** Largest memory a 32-bit WebAssembly module can address here (65535 pages: just under 4 GiB). */
export const MAX_ARENA_BYTES = 65535 * PAGE;
/** Every array starts on a 64-byte boundary (a cache line). */
const ALIGN = 64;

export interface Arena extends Allocator {
  memory: WebAssembly.Memory;
  kernels: SparseKernels;
  /** Whether a view lies in this arena (so the kernels can take its byteOffset). */
  owns(a: ArrayBufferView): boolean;
  /** Bytes that can still be handed out in one piece at the end (the free list aside). */
  remaining(): number;
  /** Bytes up to the highest block ever handed out: the memory this arena has (or may have) written. */
  touchedBytes(): number;
  /** Whether an array of this many bytes would fit (at the end or in a freed block). */
  fits(byteLength: number): boolean;
  /** Gives the memory back for the next arena (every view of this one becomes invalid: whoever called release must
   *  hold none). One memory is kept, the largest given back. */
  release(): void;
}

let compiled: WebAssembly.Module | null | undefined;
/** The memory of the last arena released (see Arena.release), with its high-water mark. */
let released: { memory: WebAssembly.Memory; touched: number } | null = null;

/** Forgets the memory kept for the next arena (Arena.release), so that its pages (a few hundred MB after a
 *  1M-unknown hierarchy) are given back once collected; whether any was kept. */
export function dropKeptMemory(): boolean {
  const had = released !== null;
  released = null;
  return had;
}

/** The compiled kernel module, or null where WebAssembly is unavailable. */
function kernelModule(): WebAssembly.Module | null {
  if (compiled === undefined) {
    try {
      compiled = typeof WebAssembly === 'object' ? new WebAssembly.Module(Buffer.from(SPARSE_KERNELS_BASE64, 'base64')) : null;
    } catch {
      compiled = null;
    }
  }
  return compiled;
}

/** The kernels on a memory an arena of another thread made (the cell team's workers, amg/seam-task.ts), or null
 *  where WebAssembly is unavailable. */
export function instantiateKernels(memory: WebAssembly.Memory): SparseKernels | null {
  const module = kernelModule();
  return module ? (new WebAssembly.Instance(module, { env: { memory } }).exports as unknown as SparseKernels) : null;
}

let lastId = 0;
const ids = new WeakMap<WebAssembly.Memory, number>();
/** A number naming an arena's memory for the threads it is posted to (a posted memory arrives as a new object). */
export function memoryId(memory: WebAssembly.Memory): number {
  let id = ids.get(memory);
  if (id === undefined) { id = ++lastId; ids.set(memory, id); }
  return id;
}

const rounded = (byteLength: number): number => Math.max(ALIGN, Math.ceil(byteLength / ALIGN) * ALIGN);

/** Bytes an arena needs for arrays of these byte lengths (each rounded up to the alignment), plus the reserved start. */
export function arenaBytes(byteLengths: readonly number[]): number {
  let total = ALIGN;
  for (const b of byteLengths) total += rounded(b);
  return total;
}

/** An arena of at least `bytes` bytes, or null when WebAssembly is unavailable or the size exceeds what 32-bit
 *  memory addresses (the caller then keeps its JavaScript arrays and kernels). */
export function createArena(bytes: number): Arena | null {
  const module = kernelModule();
  if (!module || bytes > MAX_ARENA_BYTES) return null;
  let memory: WebAssembly.Memory;
  /** End of the highest block ever handed out: memory above it has never been written (zero); below it, memory
   *  given back (to the free list or to the top) holds old values. */
  let touched = ALIGN;
  if (released && released.memory.buffer.byteLength >= bytes) {
    // The memory of an arena given back: its pages are resident already, so no first touches to pay for.
    ({ memory, touched } = released);
    released = null;
  } else {
    const pages = Math.max(1, Math.ceil(bytes / PAGE));
    try {
      // Shared (sparse.wat imports shared memory): the cell team's workers run kernels on this arena too.
      memory = new WebAssembly.Memory({ initial: pages, maximum: pages, shared: true });
    } catch {
      return null; // the engine refused that much memory
    }
  }
  const instance = new WebAssembly.Instance(module, { env: { memory } });
  const kernels = instance.exports as unknown as SparseKernels;
  const size = memory.buffer.byteLength;
  let top = ALIGN;
  let open = true;
  /** Freed blocks [offset, bytes], sorted by offset, never adjacent to each other or to `top`. */
  const holes: [number, number][] = [];
  const blockOf = new Map<number, number>(); // offset → bytes of every live block

  const giveBack = (at: number, bytes: number): void => {
    let i = 0;
    while (i < holes.length && holes[i][0] < at) i++;
    holes.splice(i, 0, [at, bytes]);
    // coalesce with the next and the previous hole, then with the top
    if (i + 1 < holes.length && holes[i][0] + holes[i][1] === holes[i + 1][0]) { holes[i][1] += holes[i + 1][1]; holes.splice(i + 1, 1); }
    if (i > 0 && holes[i - 1][0] + holes[i - 1][1] === holes[i][0]) { holes[i - 1][1] += holes[i][1]; holes.splice(i, 1); i--; }
    if (holes[i][0] + holes[i][1] === top) { top = holes[i][0]; holes.splice(i, 1); }
  };
  /** Bytes at the start of the block last taken that may hold old values. */
  let dirty = 0;
  const cleared = <T extends Float64Array | Int32Array | Uint8Array>(a: T, zeroed: boolean): T => {
    if (zeroed && dirty > 0) a.fill(0, 0, Math.min(a.length, Math.ceil(dirty / a.BYTES_PER_ELEMENT)));
    return a;
  };
  const take = (byteLength: number): number => {
    dirty = 0;
    const bytes = rounded(byteLength);
    for (let i = 0; i < holes.length; i++) {
      const [at, free] = holes[i];
      if (free < bytes) continue;
      if (free === bytes) holes.splice(i, 1); else holes[i] = [at + bytes, free - bytes];
      blockOf.set(at, bytes);
      dirty = bytes;
      return at;
    }
    if (top + bytes > size) {
      throw new RangeError(`arena: ${byteLength} more bytes asked of a ${size}-byte arena with ${size - top} free at the end`);
    }
    const at = top;
    top += bytes;
    dirty = Math.max(0, Math.min(bytes, touched - at));
    touched = Math.max(touched, top);
    blockOf.set(at, bytes);
    return at;
  };
  const freeBlock = (a: Float64Array | Int32Array | Uint8Array): void => {
    const bytes = blockOf.get(a.byteOffset);
    if (a.buffer !== memory.buffer || bytes === undefined) throw new Error('arena: free of an array this arena did not hand out');
    blockOf.delete(a.byteOffset);
    giveBack(a.byteOffset, bytes);
  };
  return {
    memory,
    kernels,
    f64: (n, zeroed = true) => cleared(new Float64Array(memory.buffer, take(8 * n), n), zeroed),
    i32: (n, zeroed = true) => cleared(new Int32Array(memory.buffer, take(4 * n), n), zeroed),
    u8: (n, zeroed = true) => cleared(new Uint8Array(memory.buffer, take(n), n), zeroed),
    free: freeBlock,
    shrink<T extends Float64Array | Int32Array>(a: T, n: number): T {
      const bytes = blockOf.get(a.byteOffset);
      if (a.buffer !== memory.buffer || bytes === undefined) throw new Error('arena: shrink of an array this arena did not hand out');
      const keep = rounded(n * a.BYTES_PER_ELEMENT);
      if (keep < bytes) { blockOf.set(a.byteOffset, keep); giveBack(a.byteOffset + keep, bytes - keep); }
      return a.subarray(0, n) as T;
    },
    owns: (a) => a.buffer === memory.buffer,
    release(): void {
      if (!open) return;
      open = false;
      if (!released || released.memory.buffer.byteLength <= size) released = { memory, touched };
    },
    remaining: () => size - top,
    touchedBytes: () => touched,
    fits: (byteLength) => top + rounded(byteLength) <= size || holes.some(([, free]) => free >= rounded(byteLength)),
  };
}
