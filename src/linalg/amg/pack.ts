/** The multigrid hierarchy in one WebAssembly arena, where the kernels of wasm-cycle.ts read it. The setup builds
 *  it there directly (spillingAllocator), the intermediate products given back and reused; only when the arena
 *  reserved up front proves too small does packHierarchy copy the finished hierarchy into one of the exact size.
 *  Either way the arena also holds staging vectors for callers whose arrays live elsewhere and spare vectors a
 *  Krylov solver may take, so that nothing is copied per cycle. */
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import { arenaBytes, createArena, MAX_ARENA_BYTES, type Arena } from '../kernels/arena.ts';
import type { Csr } from '../types.ts';
import type { AmgHierarchy, AmgLevel } from './types.ts';

/** Finest-size vectors reserved for the caller: right-hand side, iterate and product staging, and six spares (the
 *  vectors of CG: r, z, p, q, A z and the iterate). */
const STAGING_VECTORS = 3;
export const SPARE_VECTORS = 6;
/** Arena reserved for building a hierarchy, in bytes of the caller's matrix. Smoothed aggregation of P1–P3
 *  matrices needs about 4–8 (hierarchy with operator complexity 1.1–1.4, the prolongators, the intermediate
 *  product A P and the bound-sized buffers of the products); the rest is headroom that costs address space only,
 *  though reserving it is not free (about 10 ms per GB, measured): 48 took 40–50 ms at 1M P1 unknowns. */
const ARENA_PER_MATRIX_BYTE = 24;

export interface PackedHierarchy {
  hierarchy: AmgHierarchy;
  arena: Arena;
  /** Staging copies of the caller's r, z and A z on the finest level. */
  staging: { b: Float64Array; x: Float64Array; w: Float64Array };
  /** Finest-size vectors in the arena not yet handed out (see Preconditioner.vector). */
  spares: Float64Array[];
  /** A copy of the caller's matrix in the arena, when the finest level's operator differs from it (round-off
   *  entries dropped), so that CG's products with A run as kernels too. */
  operatorCopy?: Csr;
}

const csrByteLengths = (A: Csr): number[] => [A.rowPtr.byteLength, A.colIdx.byteLength, A.values.byteLength];

/** Above this estimate the whole addressable 4 GiB is reserved: the arena is then large enough for the next, larger
 *  level of a ladder too, which reuses its memory (pages already resident) once solveSystem gives it back. */
const RESERVE_ALL_ABOVE = 64 * 2 ** 20;

/** Bytes to reserve for building the hierarchy of A in an arena. */
export function arenaEstimate(A: Csr): number {
  const estimate = ARENA_PER_MATRIX_BYTE * csrByteLengths(A).reduce((a, b) => a + b, 0) + (1 << 20);
  return estimate > RESERVE_ALL_ABOVE ? MAX_ARENA_BYTES : Math.min(MAX_ARENA_BYTES, estimate);
}

/** Bytes of the staging and spare vectors for n finest unknowns. */
export function arenaVectorBytes(n: number): number {
  return arenaBytes(new Array<number>(STAGING_VECTORS + SPARE_VECTORS).fill(8 * n));
}

export function arenaVectors(arena: Arena, n: number): Pick<PackedHierarchy, 'staging' | 'spares'> {
  return {
    // Contents unspecified (written before read): no zeroing of memory an earlier solve left dirty.
    staging: { b: arena.f64(n, false), x: arena.f64(n, false), w: arena.f64(n, false) },
    spares: Array.from({ length: SPARE_VECTORS }, () => arena.f64(n, false)),
  };
}

/** CG's products with A run as a kernel when A has a copy in the arena; worth its memory only when the cycle's own
 *  finest operator cannot stand in for A (see FinestOperator.exactProducts) and there is room. */
export function operatorCopyFor(arena: Arena, A: Csr, wanted: boolean): { operatorCopy?: Csr } {
  const bytes = A.rowPtr.byteLength + A.colIdx.byteLength + A.values.byteLength + 3 * 64;
  if (!wanted || !arena.fits(bytes)) return {};
  const rowPtr = arena.i32(A.rowPtr.length, false), colIdx = arena.i32(A.colIdx.length, false), values = arena.f64(A.values.length, false);
  rowPtr.set(A.rowPtr); colIdx.set(A.colIdx); values.set(A.values);
  return { operatorCopy: { nRows: A.nRows, nCols: A.nCols, rowPtr, colIdx, values } };
}

/** Arena arrays while they fit, JavaScript arrays after that; spilled() tells whether any had to go to the heap. */
export function spillingAllocator(arena: Arena): Allocator & { spilled(): boolean } {
  let spilled = false;
  const fits = (bytes: number): boolean => arena.fits(bytes) || ((spilled = true), false);
  return {
    f64: (n, zeroed) => (fits(8 * n) ? arena.f64(n, zeroed) : heapAllocator.f64(n)),
    i32: (n, zeroed) => (fits(4 * n) ? arena.i32(n, zeroed) : heapAllocator.i32(n)),
    u8: (n, zeroed) => (fits(n) ? arena.u8(n, zeroed) : heapAllocator.u8(n)),
    free: (a) => { if (arena.owns(a)) arena.free(a); },
    shrink: (a, n) => (arena.owns(a) ? arena.shrink(a, n) : heapAllocator.shrink(a, n)),
    spilled: () => spilled,
    wasm: { kernels: arena.kernels, owns: (...arrays) => arrays.every((a) => arena.owns(a)) },
  };
}

function levelByteLengths(L: AmgLevel): number[] {
  const out = [...csrByteLengths(L.A), L.diagPos.byteLength, L.invDiag.byteLength, L.b.byteLength, L.x.byteLength,
    L.r.byteLength, L.rc.byteLength, L.dx.byteLength];
  if (L.P) out.push(...csrByteLengths(L.P));
  if (L.R) out.push(...csrByteLengths(L.R));
  return out;
}

/** A copy of the hierarchy in an arena of its own, or null when none can hold it (WebAssembly unavailable, or
 *  beyond 4 GiB). */
export function packHierarchy(h: AmgHierarchy): PackedHierarchy | null {
  const n0 = h.levels[0].A.nRows;
  const arena = createArena(arenaBytes(h.levels.flatMap(levelByteLengths)) + arenaVectorBytes(n0));
  if (!arena) return null;
  const f64 = (a: Float64Array): Float64Array => { const v = arena.f64(a.length, false); v.set(a); return v; };
  const i32 = (a: Int32Array): Int32Array => { const v = arena.i32(a.length, false); v.set(a); return v; };
  const csr = (A: Csr): Csr => ({ nRows: A.nRows, nCols: A.nCols, rowPtr: i32(A.rowPtr), colIdx: i32(A.colIdx), values: f64(A.values) });
  const levels = h.levels.map((L): AmgLevel => ({
    ...L,
    A: csr(L.A), diagPos: i32(L.diagPos), invDiag: f64(L.invDiag), P: L.P && csr(L.P), R: L.R ? csr(L.R) : null,
    b: f64(L.b), x: f64(L.x), r: f64(L.r), rc: f64(L.rc), dx: f64(L.dx),
  }));
  return { hierarchy: { ...h, levels }, arena, ...arenaVectors(arena, n0) };
}
