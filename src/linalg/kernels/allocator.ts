/** Where the multigrid setup puts the arrays it creates: plain JavaScript typed arrays (heapAllocator), or views of
 *  a WebAssembly arena (arena.ts), so that the hierarchy is built where the kernels read it, with no copy, and the
 *  memory of intermediate products is handed back and reused instead of drawn fresh from the operating system. */
import type { SparseKernels } from './sparse-kernels.ts';

export interface Allocator {
  /** n zeros, or n unspecified values with zeroed = false (for arrays the caller writes before it reads). */
  f64(n: number, zeroed?: boolean): Float64Array;
  i32(n: number, zeroed?: boolean): Int32Array;
  u8(n: number, zeroed?: boolean): Uint8Array;
  /** Gives back an array this allocator handed out (no-op for the JavaScript heap, whose collector frees it). */
  free(a: Float64Array | Int32Array | Uint8Array): void;
  /** The first n entries of `a` (handed out by this allocator), the rest given back. */
  shrink<T extends Float64Array | Int32Array>(a: T, n: number): T;
  /** Present when the arrays live in WebAssembly memory: the kernels, and whether an array is in that memory (an
   *  allocator may spill to the heap when the memory is full; kernels run only when every operand is inside). */
  wasm?: { kernels: SparseKernels; owns(...arrays: ArrayBufferView[]): boolean };
}

export const heapAllocator: Allocator = {
  f64: (n) => new Float64Array(n),
  i32: (n) => new Int32Array(n),
  u8: (n) => new Uint8Array(n),
  free: () => {},
  shrink: (a, n) => a.subarray(0, n) as typeof a,
};
