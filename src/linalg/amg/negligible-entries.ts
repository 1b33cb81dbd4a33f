/** The caller's matrix without the entries that carry no information.
 *  Finite element assembly stores the whole element pattern, so the matrix holds exact zeros (P1 on right-diagonal
 *  triangles: the diagonal-edge couplings are cot 90° = 0, 2 of 7 entries per row; P2: 13 % of the entries) and
 *  entries that are the round-off of cancelling element contributions (a few ulps of the diagonal; P2: 35 %, P3:
 *  25 % of the stored entries).
 *  Both cost time in every sweep and in every sparse product of the setup, and the round-off ones would make the
 *  strength graph and the aggregates depend on noise. */
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import type { Csr } from '../types.ts';

/** Off-diagonal entries with |a_ij| ≤ ROUND_OFF_ENTRY·√(a_ii a_jj) are treated as round-off. Measured on rungs's
 *  own P1–P3 assembly: round-off entries stay below 1e-15·√(a_ii a_jj), genuine couplings above 3e-3 (also with a
 *  1000:1 coefficient jump), so the cut sits well inside the gap. */
export const ROUND_OFF_ENTRY = 1e-13;

export interface FinestOperator {
  /** A without its stored exact zeros and round-off entries (A itself when it stores none): the finest smoother
   *  and the whole hierarchy work with it. It differs from A by round-off only, so as a preconditioner it is as
   *  good as A (and 45 % cheaper for P2: 6.3 instead of 11.5 entries per row). */
  operator: Csr;
  /** True when only exact zeros were dropped: then every product with `operator` is bit-for-bit the product with
   *  A (a finite x_j times 0 adds nothing), and the last sweep may hand CG its A z. With round-off entries
   *  dropped it may not: those of a P3 matrix at 600k unknowns shift A x by 1e-10 relative to b, enough to keep
   *  CG from reaching 1e-10 against A. */
  exactProducts: boolean;
  /** Position of each row's diagonal entry in `operator`. */
  diagPos: Int32Array;
}

/** diag holds a_ii (positive, as scanLevel checked). One pass: the kept entries are copied into room for all of
 *  A (the tail is given back), and the diagonal positions of the copy are recorded on the way. When nothing is
 *  dropped the copy is kept only for an allocator with WebAssembly memory (whose kernels need the operator
 *  there); otherwise A itself is the operator. With WebAssembly memory, a read-only pass first checks whether
 *  anything is to be dropped (recording the diagonal positions); if not, A's arrays are copied whole (a caller
 *  that dropped the entries itself, e.g. dropNegligibleInPlace, pays for no second pass of branches). */
export function finestOperator(A: Csr, diag: Float64Array, alloc: Allocator = heapAllocator): FinestOperator {
  const { nRows: n, rowPtr, colIdx, values } = A;
  const t2 = ROUND_OFF_ENTRY * ROUND_OFF_ENTRY;
  const bound = rowPtr[n];
  const diagPos = alloc.i32(n, false);
  if (alloc.wasm && rowPtr[0] === 0 && bound > 0 && nothingNegligible(A, diag, diagPos)) {
    // A stores nothing to drop (e.g. the caller dropped it already): the copy the kernels need is A's arrays as
    // they are, copied whole; the check found the diagonal positions.
    const ptr = alloc.i32(n + 1, false), cols = alloc.i32(bound, false), vals = alloc.f64(bound, false);
    ptr.set(rowPtr.subarray(0, n + 1)); cols.set(colIdx.subarray(0, bound)); vals.set(values.subarray(0, bound));
    return { operator: { nRows: n, nCols: A.nCols, rowPtr: ptr, colIdx: cols, values: vals }, diagPos, exactProducts: true };
  }
  const ptr = alloc.i32(n + 1);
  const cols = alloc.i32(Math.max(1, bound), false);
  const vals = alloc.f64(Math.max(1, bound), false);
  let zeros = 0, roundOff = 0, out = 0;
  for (let i = 0; i < n; i++) {
    const di = diag[i];
    for (let k = rowPtr[i], end = rowPtr[i + 1]; k < end; k++) {
      const v = values[k], j = colIdx[k];
      if (j === i) diagPos[i] = out;
      else if (v === 0) { zeros++; continue; }
      else if (v * v <= t2 * di * diag[j]) { roundOff++; continue; }
      cols[out] = j; vals[out] = v; out++;
    }
    ptr[i + 1] = out;
  }
  if (zeros + roundOff === 0 && !alloc.wasm) {
    alloc.free(ptr); alloc.free(cols); alloc.free(vals);
    return { operator: A, diagPos, exactProducts: true };
  }
  return {
    operator: { nRows: n, nCols: A.nCols, rowPtr: ptr, colIdx: alloc.shrink(cols, out), values: alloc.shrink(vals, out) },
    diagPos,
    exactProducts: roundOff === 0,
  };
}

/** Whether every off-diagonal entry of A is kept by the rule of finestOperator (A is only read), recording the
 *  diagonal positions on the way. */
function nothingNegligible(A: Csr, diag: Float64Array, diagPos: Int32Array): boolean {
  const { nRows: n, rowPtr, colIdx, values } = A;
  const t2 = ROUND_OFF_ENTRY * ROUND_OFF_ENTRY;
  for (let i = 0; i < n; i++) {
    const di = diag[i];
    for (let k = rowPtr[i], end = rowPtr[i + 1]; k < end; k++) {
      const v = values[k], j = colIdx[k];
      if (j === i) diagPos[i] = k;
      else if (v === 0 || v * v <= t2 * di * diag[j]) return false;
    }
  }
  return true;
}

/** A without its exact zeros and round-off entries (the rule of finestOperator), written into A's own arrays
 *  (compacted forward: a row's write position never passes its read position) and returned as views of their
 *  first entries; A is left unusable. For a caller that owns A and will solve with the multigrid: the finest level
 *  then stores nothing to drop, so the cycle's last sweep can hand CG its product with the matrix CG solves with
 *  (no copy of A in the arena, no second product per iteration). The matrix solved with changes by entries of
 *  at most ROUND_OFF_ENTRY·√(a_ii a_jj), which in exact arithmetic are zero. A matrix with a diagonal entry that
 *  is not positive (which the multigrid refuses anyway) is returned unchanged. */
export function dropNegligibleInPlace(A: Csr): { A: Csr; dropped: number } {
  const { nRows: n, rowPtr, colIdx, values } = A;
  const diag = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i], end = rowPtr[i + 1]; k < end; k++) if (colIdx[k] === i) { diag[i] = values[k]; break; }
    if (!(diag[i] > 0)) return { A, dropped: 0 };
  }
  const t2 = ROUND_OFF_ENTRY * ROUND_OFF_ENTRY;
  const ptr = new Int32Array(n + 1);
  let out = 0;
  for (let i = 0; i < n; i++) {
    const di = diag[i];
    for (let k = rowPtr[i], end = rowPtr[i + 1]; k < end; k++) {
      const v = values[k], j = colIdx[k];
      if (j !== i && (v === 0 || v * v <= t2 * di * diag[j])) continue;
      colIdx[out] = j; values[out] = v; out++;
    }
    ptr[i + 1] = out;
  }
  const dropped = rowPtr[n] - out;
  if (dropped === 0) return { A, dropped };
  return { A: { nRows: n, nCols: A.nCols, rowPtr: ptr, colIdx: colIdx.subarray(0, out), values: values.subarray(0, out) }, dropped };
}
