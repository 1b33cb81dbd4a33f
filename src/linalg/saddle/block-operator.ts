/** K = [[A, Bᵀ], [B, −C]] (C absent: 0) applied to vectors [u; p] (u: nu entries, p: np).
 *  K is stored once as one CSR matrix whose rows hold, in this order, the entries of A and of Bᵀ (velocity rows),
 *  or of B and of −C (pressure rows), so that one sparse product y = K x sums every row in the order the former
 *  block-by-block loops did (A's row, then Bᵀ's; B's, then −C's): the same bits (s − c·x and s + (−c)·x are the same
 *  IEEE operation). Exact zeros of the blocks are left out: a finite x_j times 0 adds nothing to a sum that never
 *  holds −0 (it starts at +0, and a sum that rounds to zero is +0), so leaving them out keeps the bits too, and saves
 *  the cross-component couplings of a vector Laplacian (half of A's stored entries for Taylor–Hood Stokes).
 *  When WebAssembly is available the matrix lives in an arena of its own and the product runs as the `spmv` kernel of
 *  src/linalg/kernels/sparse.wat (the TypeScript loop it transcribes: csr.ts spmv); the solver's vectors are taken
 *  from the same arena (`vector`), so nothing is copied per product. Measured on Taylor–Hood P2–P1 Stokes, 236²
 *  squares (503k unknowns): the product took 3.7 of the 6.0 s of MINRES as a TypeScript loop over the blocks. */
import { spmv, transpose } from '../csr.ts';
import { arenaBytes, createArena, type Arena } from '../kernels/arena.ts';
import type { SymmetricOperator } from '../minres.ts';
import type { Csr } from '../types.ts';

export interface SaddleOperator extends SymmetricOperator {
  /** The assembled K (exact zeros left out); in the arena when there is one. */
  matrix: Csr;
  /** 'wasm' when the product runs as a kernel. */
  kernels: 'wasm' | 'javascript';
  /** A vector of length n in the operator's memory (then the product reads and writes it without copying); a new
   *  Float64Array once the vectors reserved for the solver (`vectors` of saddlePointOperator) are taken. */
  vector(): Float64Array;
  /** Gives the arena's memory back (every vector from `vector` becomes invalid). */
  dispose(): void;
}

/** The entries of K row by row, without exact zeros: counts first, then the fill. */
function assembled(A: Csr, B: Csr, C: Csr | undefined, alloc: (n: number) => { i32: Int32Array; f64: Float64Array; ptr: Int32Array }): Csr {
  const nu = A.nRows, np = B.nRows, n = nu + np;
  const Bt = transpose(B);
  const count = (M: Csr): number => { let c = 0; for (let k = M.rowPtr[0]; k < M.rowPtr[M.nRows]; k++) if (M.values[k] !== 0) c++; return c; };
  const nnz = count(A) + 2 * count(B) + (C ? count(C) : 0);
  const { i32: colIdx, f64: values, ptr: rowPtr } = alloc(nnz);
  let out = 0;
  const copyRow = (M: Csr, i: number, shift: number, negate: boolean): void => {
    const { rowPtr: mp, colIdx: mc, values: mv } = M;
    for (let k = mp[i]; k < mp[i + 1]; k++) {
      const v = mv[k];
      if (v === 0) continue;
      colIdx[out] = mc[k] + shift; values[out] = negate ? -v : v; out++;
    }
  };
  rowPtr[0] = 0;
  for (let i = 0; i < nu; i++) { copyRow(A, i, 0, false); copyRow(Bt, i, nu, false); rowPtr[i + 1] = out; }
  for (let i = 0; i < np; i++) { copyRow(B, i, 0, false); if (C) copyRow(C, i, nu, true); rowPtr[nu + i + 1] = out; }
  return { nRows: n, nCols: n, rowPtr, colIdx, values };
}

/** `vectors`: how many vectors of length nu + np to reserve in the arena for the solver (MINRES takes eight);
 *  `kernels: 'javascript'` keeps everything on the heap. */
export function saddlePointOperator(
  A: Csr, B: Csr, C?: Csr, opts: { vectors?: number; kernels?: 'wasm' | 'javascript' } = {},
): SaddleOperator {
  const nu = A.nRows, np = B.nRows, n = nu + np;
  const reserve = opts.vectors ?? 0;
  // Upper bound of the entries (zeros included) to size the arena before counting.
  const bound = A.rowPtr[nu] - A.rowPtr[0] + 2 * (B.rowPtr[np] - B.rowPtr[0]) + (C ? C.rowPtr[np] - C.rowPtr[0] : 0);
  let arena: Arena | null = null;
  if ((opts.kernels ?? 'wasm') === 'wasm') {
    arena = createArena(arenaBytes([4 * (n + 1), 4 * bound, 8 * bound, ...new Array<number>(reserve + 2).fill(8 * n)]));
  }
  const matrix = assembled(A, B, C, (nnz) => arena
    ? { ptr: arena.i32(n + 1, false), i32: arena.i32(Math.max(1, nnz), false), f64: arena.f64(Math.max(1, nnz), false) }
    : { ptr: new Int32Array(n + 1), i32: new Int32Array(nnz), f64: new Float64Array(nnz) });
  if (!arena) {
    return {
      n, matrix, kernels: 'javascript',
      apply: (x, y) => spmv(matrix, x, y),
      vector: () => new Float64Array(n),
      dispose: () => {},
    };
  }
  const a = arena;
  const k = a.kernels;
  const spares: Float64Array[] = Array.from({ length: reserve }, () => a.f64(n, false));
  const stageX = a.f64(n, false), stageY = a.f64(n, false);
  const rp = matrix.rowPtr.byteOffset, ci = matrix.colIdx.byteOffset, va = matrix.values.byteOffset;
  let disposed = false;
  return {
    n, matrix, kernels: 'wasm',
    apply(x: Float64Array, y: Float64Array): void {
      const inX = a.owns(x), inY = a.owns(y);
      if (!inX) stageX.set(x);
      k.spmv(n, rp, ci, va, inX ? x.byteOffset : stageX.byteOffset, inY ? y.byteOffset : stageY.byteOffset);
      if (!inY) y.set(stageY);
    },
    vector: () => spares.pop() ?? new Float64Array(n),
    dispose(): void {
      if (disposed) return;
      disposed = true;
      a.release();
    },
  };
}
