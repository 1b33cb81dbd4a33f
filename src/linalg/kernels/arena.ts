/** A fixed-size block of WebAssembly memory that holds the arrays the sparse kernels work on, handed out as typed
 *  array views. The memory never grows (growing would detach every view), so the caller sizes it up front with
 *  arenaBytes. Offset 0 is never handed out: the kernels' descending loops rely on that (see sparse.wat). */
import { SPARSE_KERNELS_BASE64 } from './sparse-wasm.ts';

const PAGE = 65536;
/** Largest memory a 32-bit WebAssembly module can address (65536 pages). */
export const MAX_ARENA_BYTES = 65536 * PAGE;
/** Every array starts on a 64-byte boundary (a cache line). */
const ALIGN = 64;

/** The exports of sparse.wat; every array argument is a byte offset into the arena. */
export interface SparseKernels {
  spmv(n: number, rp: number, ci: number, va: number, x: number, y: number): void;
  multiplyAdd(n: number, rp: number, ci: number, va: number, y: number, x: number): void;
  residual(n: number, rp: number, ci: number, va: number, b: number, x: number, r: number): void;
  addInto(n: number, x: number, y: number): void;
  forwardSweepFromZero(n: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number): void;
  forwardSweepFromZeroWithResidual(
    n: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number, r: number): void;
  forwardSweepWithResidual(
    n: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number, r: number): void;
  forwardSweep(n: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number): void;
  backwardSweep(n: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number): void;
  backwardSweepWithProduct(
    n: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number, w: number): number;
}

export interface Arena {
  memory: WebAssembly.Memory;
  kernels: SparseKernels;
  f64(n: number): Float64Array;
  i32(n: number): Int32Array;
  /** Whether a view lies in this arena (so the kernels can take its byteOffset). */
  owns(a: ArrayBufferView): boolean;
  /** Bytes still free. */
  remaining(): number;
}

let compiled: WebAssembly.Module | null | undefined;

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

/** Bytes an arena needs for arrays of these byte lengths (each rounded up to the alignment), plus the reserved start. */
export function arenaBytes(byteLengths: readonly number[]): number {
  let total = ALIGN;
  for (const b of byteLengths) total += Math.ceil(b / ALIGN) * ALIGN;
  return total;
}

/** An arena of at least `bytes` bytes, or null when WebAssembly is unavailable or the size exceeds what 32-bit
 *  memory addresses (the caller then keeps its JavaScript arrays and kernels). */
export function createArena(bytes: number): Arena | null {
  const module = kernelModule();
  if (!module || bytes > MAX_ARENA_BYTES) return null;
  const pages = Math.max(1, Math.ceil(bytes / PAGE));
  let memory: WebAssembly.Memory;
  try {
    memory = new WebAssembly.Memory({ initial: pages, maximum: pages });
  } catch {
    return null; // the engine refused that much memory
  }
  const instance = new WebAssembly.Instance(module, { env: { memory } });
  const kernels = instance.exports as unknown as SparseKernels;
  const size = pages * PAGE;
  let next = ALIGN;
  const take = (byteLength: number): number => {
    const at = next;
    next += Math.ceil(byteLength / ALIGN) * ALIGN;
    if (next > size) throw new Error(`arena: ${byteLength} more bytes asked of a ${size}-byte arena with ${size - at} free`);
    return at;
  };
  return {
    memory,
    kernels,
    f64: (n) => new Float64Array(memory.buffer, take(8 * n), n),
    i32: (n) => new Int32Array(memory.buffer, take(4 * n), n),
    owns: (a) => a.buffer === memory.buffer,
    remaining: () => size - next,
  };
}
