/** Gauss–Seidel sweeps and the grid-transfer kernels of the V-cycle; all in place, no allocation.
 *  Forward sweeps before the coarse correction and backward sweeps after it make the V-cycle a symmetric operator
 *  for symmetric A (the post-smoother is the adjoint of the pre-smoother; Saad 2003, Iterative Methods for Sparse
 *  Linear Systems, 2nd ed., ch. 13, from memory), hence a valid CG preconditioner.
 *  Each row sums the entries whose x values are oldest first and the most recently updated neighbour last, so the
 *  row-to-row dependency of Gauss–Seidel delays the next row as little as possible. */
import type { Csr } from '../types.ts';

/** One forward sweep from x = 0 (only the strictly lower part of each row matters). */
export function forwardSweepFromZero(A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array): void {
  const { nRows: n, rowPtr, colIdx, values } = A;
  for (let i = 0; i < n; i++) {
    let s = b[i];
    const end = diagPos[i];
    for (let k = rowPtr[i]; k < end; k++) s -= values[k] * x[colIdx[k]];
    x[i] = s * invDiag[i];
  }
}

/** Forward sweep from x = 0 that also leaves r = b − A x, for symmetric A, reading only the lower triangle.
 *  After the sweep b_i − Σ_{j≤i} a_ij x_j = 0, so r_i = −Σ_{j>i} a_ij x_j = −Σ_{j>i} a_ji x_j: row j scatters
 *  −a_ji x_j into r_i for its lower entries i < j as soon as x_j is known. Rows first … last − 1 only (the interior
 *  of a part in seam order, seams.ts), all by default. */
export function forwardSweepFromZeroWithResidual(
  A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array, r: Float64Array,
  first = 0, last = A.nRows,
): void {
  const { rowPtr, colIdx, values } = A;
  for (let i = first; i < last; i++) {
    const lo = rowPtr[i], end = diagPos[i];
    let s = b[i];
    for (let k = lo; k < end; k++) s -= values[k] * x[colIdx[k]];
    const xi = s * invDiag[i];
    x[i] = xi;
    r[i] = 0;
    for (let k = lo; k < end; k++) r[colIdx[k]] -= values[k] * xi;
  }
}

/** Forward sweep from any x that also leaves r = b − A x, for symmetric A. With δ_j the correction of row j, after
 *  the sweep r_i = −Σ_{j>i} a_ij δ_j (row i was solved exactly when the rows above it still held their old values),
 *  and row j scatters −a_ji δ_j into r_i along its lower part once δ_j is known. */
export function forwardSweepWithResidual(
  A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array, r: Float64Array,
): void {
  const { nRows: n, rowPtr, colIdx, values } = A;
  for (let i = 0; i < n; i++) {
    const lo = rowPtr[i], d = diagPos[i];
    let s = b[i];
    for (let k = rowPtr[i + 1] - 1; k >= d; k--) s -= values[k] * x[colIdx[k]];
    for (let k = lo; k < d; k++) s -= values[k] * x[colIdx[k]];
    const delta = s * invDiag[i];
    x[i] += delta;
    r[i] = 0;
    for (let k = lo; k < d; k++) r[colIdx[k]] -= values[k] * delta;
  }
}

/** One forward Gauss–Seidel sweep: x_i += (b_i − (A x)_i) / a_ii in increasing i. */
export function forwardSweep(A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array): void {
  const { nRows: n, rowPtr, colIdx, values } = A;
  for (let i = 0; i < n; i++) {
    let s = b[i];
    const d = diagPos[i];
    for (let k = rowPtr[i + 1] - 1; k >= d; k--) s -= values[k] * x[colIdx[k]];
    for (let k = rowPtr[i]; k < d; k++) s -= values[k] * x[colIdx[k]];
    x[i] += s * invDiag[i];
  }
}

/** One backward Gauss–Seidel sweep (decreasing i), over rows last − 1 down to first (all by default). */
export function backwardSweep(
  A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array, first = 0, last = A.nRows,
): void {
  const { rowPtr, colIdx, values } = A;
  for (let i = last - 1; i >= first; i--) {
    let s = b[i];
    const d = diagPos[i];
    for (let k = rowPtr[i]; k <= d; k++) s -= values[k] * x[colIdx[k]];
    for (let k = rowPtr[i + 1] - 1; k > d; k--) s -= values[k] * x[colIdx[k]];
    x[i] += s * invDiag[i];
  }
}

/** Backward sweep that also leaves w = A x (symmetric A) and returns b·x, so a CG iteration needs no product with A.
 *  With δ_j the correction of row j, (A x)_i = b_i + Σ_{j<i} a_ij δ_j after the sweep: the rows below i are the
 *  ones still to be corrected when row i is done. Row j scatters a_ij δ_j = a_ji δ_j into w_i along its upper part.
 *  Over rows last − 1 down to first (all by default), b·x summed from 0 over them; each row also scatters into its
 *  columns below `low` (none by default): in seam order an interior's rows come after the seam below it (seams.ts). */
export function backwardSweepWithProduct(
  A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array, w: Float64Array,
  first = 0, last = A.nRows, low = 0,
): number {
  const { rowPtr, colIdx, values } = A;
  let bx = 0;
  for (let i = last - 1; i >= first; i--) {
    const bi = b[i];
    let s = bi;
    const lo = rowPtr[i], d = diagPos[i], end = rowPtr[i + 1];
    for (let k = lo; k <= d; k++) s -= values[k] * x[colIdx[k]];
    for (let k = end - 1; k > d; k--) s -= values[k] * x[colIdx[k]];
    const delta = s * invDiag[i];
    const xi = x[i] + delta;
    x[i] = xi;
    w[i] = bi;
    for (let k = d + 1; k < end; k++) w[colIdx[k]] += values[k] * delta;
    for (let k = lo; k < d && colIdx[k] < low; k++) w[colIdx[k]] += values[k] * delta;
    bx += bi * xi;
  }
  return bx;
}

/** r = b − A x. */
export function residualInto(A: Csr, b: Float64Array, x: Float64Array, r: Float64Array): void {
  const { nRows: n, rowPtr, colIdx, values } = A;
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s -= values[k] * x[colIdx[k]];
    r[i] = s;
  }
}

/** bc = Pᵀ r from the rows of P (no stored transpose): bc is zeroed, then fine row i adds p_iI r_i to bc[I], so
 *  every bc[I] sums its terms in increasing i, the order of a row of R = Pᵀ. */
export function restrictByTranspose(P: Csr, r: Float64Array, bc: Float64Array): void {
  const { nRows: n, rowPtr, colIdx, values } = P;
  bc.fill(0);
  let k = rowPtr[0];
  for (let i = 0; i < n; i++) {
    const ri = r[i], end = rowPtr[i + 1];
    for (; k < end; k++) bc[colIdx[k]] += values[k] * ri;
  }
}

/** x += P xc. */
export function prolongAndAdd(P: Csr, xc: Float64Array, x: Float64Array): void {
  const { nRows: n, rowPtr, colIdx, values } = P;
  let k = rowPtr[0];
  for (let i = 0; i < n; i++) {
    const end = rowPtr[i + 1];
    let s = x[i];
    for (; k < end; k++) s += values[k] * xc[colIdx[k]];
    x[i] = s;
  }
}
