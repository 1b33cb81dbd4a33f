/** Copies of the caller's matrix without the entries that carry no information.
 *  Finite element assembly stores the whole element pattern, so a matrix holds exact zeros (the diagonal couplings
 *  of P1 on right-diagonal triangles: cot 90° = 0) and entries that are the round-off of cancelling element
 *  contributions (P2, P3: a few ulps of the diagonal). Both cost time in every sweep and in every sparse product of
 *  the setup, and the round-off ones make the strength graph and the aggregates depend on noise. */
import type { Csr } from '../types.ts';

/** Off-diagonal entries with |a_ij| ≤ ROUND_OFF_ENTRY·√(a_ii a_jj) are treated as round-off. Measured on rungs's
 *  own P1–P3 assembly: round-off entries stay below 1e-15·√(a_ii a_jj), genuine couplings above 1e-3 (also with a
 *  1000:1 coefficient jump), so the cut sits well inside the gap. */
export const ROUND_OFF_ENTRY = 1e-13;

/** A without the off-diagonal entries for which drop(row, k) is true; returns A itself when nothing is dropped.
 *  Diagonal entries are always kept. Rows stay sorted. */
function withoutEntries(A: Csr, drop: (i: number, k: number) => boolean): Csr {
  const { nRows: n, rowPtr, colIdx, values } = A;
  let dropped = 0;
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) if (colIdx[k] !== i && drop(i, k)) dropped++;
  }
  if (dropped === 0) return A;
  const nnz = rowPtr[n] - dropped;
  const ptr = new Int32Array(n + 1);
  const cols = new Int32Array(nnz);
  const vals = new Float64Array(nnz);
  let out = 0;
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      if (colIdx[k] !== i && drop(i, k)) continue;
      cols[out] = colIdx[k]; vals[out] = values[k]; out++;
    }
    ptr[i + 1] = out;
  }
  return { nRows: n, nCols: A.nCols, rowPtr: ptr, colIdx: cols, values: vals };
}

/** A without its stored exact zeros: every product with it is bit-for-bit the product with A (a finite x_j times
 *  0 adds nothing), so the smoother may run on it and still hand CG the exact A z. */
export function withoutExactZeros(A: Csr): Csr {
  const values = A.values;
  return withoutEntries(A, (_i, k) => values[k] === 0);
}

/** A without exact zeros and round-off entries (see ROUND_OFF_ENTRY); diag holds a_ii. The coarse levels are built
 *  from this copy: its Galerkin operators differ from those of A by round-off only. */
export function withoutRoundOff(A: Csr, diag: Float64Array): Csr {
  const { colIdx, values } = A;
  const t2 = ROUND_OFF_ENTRY * ROUND_OFF_ENTRY;
  return withoutEntries(A, (i, k) => {
    const v = values[k];
    return v * v <= t2 * Math.abs(diag[i] * diag[colIdx[k]]);
  });
}
