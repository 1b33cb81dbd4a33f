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
  /** The seam-ordered sweeps of amg/seams.ts: rows first … last − 1 (absolute indices). */
  zeroRows(first: number, last: number, x: number): void;
  forwardSweepFromZeroWithResidualRows(
    first: number, last: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number, r: number): void;
  seamSweepWithResidualRows(
    first: number, last: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number, r: number): void;
  backwardSweepRows(first: number, last: number, rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number): void;
  backwardSweepWithProductRows(first: number, last: number, low: number,
    rp: number, ci: number, va: number, dp: number, inv: number, b: number, x: number, w: number): number;
  /** out = dF ⊙ u + A_strong u (amg/spectral-radius.ts): strong holds one byte per entry of A. */
  filteredProduct(n: number, rp: number, ci: number, va: number, strong: number, dF: number, u: number, out: number): void;
  /** C = A B into room for every contribution; marker (one i32 per column of B) must hold −1. Returns nnz(C). */
  sparseProduct(m: number, aRp: number, aCi: number, aVa: number, bRp: number, bCi: number, bVa: number,
    marker: number, outRp: number, outCi: number, outVa: number): number;
  /** Upper triangle of C = R M, same conventions. */
  upperProduct(m: number, rRp: number, rCi: number, rVa: number, mRp: number, mCi: number, mVa: number,
    marker: number, outRp: number, outCi: number, outVa: number): number;
  cgUpdate(n: number, alpha: number, p: number, q: number, x: number, r: number): number;
  cgDirection(n: number, beta: number, z: number, w: number, p: number, q: number): number;
  /** The scatter of a transpose: fill holds the transpose's row starts and is advanced. */
  transposeInto(n: number, rp: number, ci: number, va: number, fill: number, tCi: number, tVa: number): void;
  /** y = A x; returns x·y. */
  spmvDot(n: number, rp: number, ci: number, va: number, x: number, y: number): number;
  /** b_c = Pᵀ r from the rows of P (P has n rows and nc columns). */
  restrictByTranspose(n: number, rp: number, ci: number, va: number, r: number, nc: number, bc: number): void;
  /** The strength graph of amg/strength.ts; out[0] = Gershgorin's bound, out[1] = 1 when diagonally dominant.
   *  Returns the number of strong entries. */
  strengthGraph(n: number, rp: number, ci: number, va: number, diag: number, theta2: number, dominance: number,
    minDF: number, strong: number, rowKind: number, dF: number, out: number): number;
  /** The rows of the smoothed prolongator of amg/prolongator.ts; returns nnz(P). */
  prolongatorRows(n: number, rp: number, ci: number, va: number, strong: number, agg: number, t: number, dF: number,
    omega: number, oneMinusOmega: number, owner: number, slot: number, pRp: number, pCi: number, pVa: number): number;
}
