/** Moves a multigrid hierarchy into one WebAssembly arena: every level's matrices, smoother data and work vectors
 *  become views into the arena (the JavaScript copies are then garbage), plus staging vectors for callers whose
 *  arrays live elsewhere and spare vectors a Krylov solver may take so that nothing is copied per cycle. */
import { arenaBytes, createArena, type Arena } from '../kernels/arena.ts';
import type { Csr } from '../types.ts';
import type { AmgHierarchy, AmgLevel } from './types.ts';

/** Finest-size vectors reserved for the caller: right-hand side, iterate and product staging, and three spares. */
const STAGING_VECTORS = 3;
export const SPARE_VECTORS = 3;

export interface PackedHierarchy {
  hierarchy: AmgHierarchy;
  arena: Arena;
  /** Staging copies of the caller's r, z and A z on the finest level. */
  staging: { b: Float64Array; x: Float64Array; w: Float64Array };
  /** Finest-size vectors in the arena not yet handed out (see Preconditioner.vector). */
  spares: Float64Array[];
}

function csrBytes(A: Csr): number[] {
  return [A.rowPtr.byteLength, A.colIdx.byteLength, A.values.byteLength];
}

function levelBytes(L: AmgLevel): number[] {
  const out = [...csrBytes(L.A), L.diagPos.byteLength, L.invDiag.byteLength, L.b.byteLength, L.x.byteLength,
    L.r.byteLength, L.rc.byteLength, L.dx.byteLength];
  if (L.P) out.push(...csrBytes(L.P));
  if (L.R) out.push(...csrBytes(L.R));
  return out;
}

/** The hierarchy in an arena, or null when no arena can hold it (WebAssembly unavailable, or beyond 4 GiB). */
export function packHierarchy(h: AmgHierarchy): PackedHierarchy | null {
  const n0 = h.levels[0].A.nRows;
  const bytes = arenaBytes([...h.levels.flatMap(levelBytes),
    ...new Array<number>(STAGING_VECTORS + SPARE_VECTORS).fill(8 * n0)]);
  const arena = createArena(bytes);
  if (!arena) return null;
  const f64 = (a: Float64Array): Float64Array => { const v = arena.f64(a.length); v.set(a); return v; };
  const i32 = (a: Int32Array): Int32Array => { const v = arena.i32(a.length); v.set(a); return v; };
  const csr = (A: Csr): Csr => ({ nRows: A.nRows, nCols: A.nCols, rowPtr: i32(A.rowPtr), colIdx: i32(A.colIdx), values: f64(A.values) });
  const levels = h.levels.map((L): AmgLevel => ({
    ...L,
    A: csr(L.A), diagPos: i32(L.diagPos), invDiag: f64(L.invDiag), P: L.P && csr(L.P), R: L.R && csr(L.R),
    b: f64(L.b), x: f64(L.x), r: f64(L.r), rc: f64(L.rc), dx: f64(L.dx),
  }));
  const staging = { b: arena.f64(n0), x: arena.f64(n0), w: arena.f64(n0) };
  const spares = Array.from({ length: SPARE_VECTORS }, () => arena.f64(n0));
  return { hierarchy: { ...h, levels }, arena, staging, spares };
}
