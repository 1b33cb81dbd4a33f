/** IC(0): incomplete Cholesky A ≈ L D Lᵀ on the sparsity of the lower triangle of A (no fill), L unit lower.
 *  Meijerink & van der Vorst (1977), Math. Comp. 31(137) 148–162; Saad (2003), Iterative Methods for Sparse Linear
 *  Systems, §10.3 (zero-fill factorisations). A non-positive pivot is answered by a diagonal shift (Manteuffel 1980). */
import { RungsInputError } from '../../errors.ts';
import { diagonalPositions } from '../csr.ts';
import type { Csr, Preconditioner } from '../types.ts';
import { factorWithShift, shiftedName } from './diagonal-shift.ts';

/** A pivot d_i ≤ this fraction of a_ii counts as a breakdown (it would amplify round-off by its inverse). */
const PIVOT_FLOOR = 1e-12;

export interface Ic0Preconditioner extends Preconditioner {
  /** The α of A + α·diag(A) that was factorised (0 when no breakdown occurred). */
  shift: number;
}

/** Factorises the lower triangle of A (assumed symmetric; the upper triangle is not read). */
export function ic0Preconditioner(A: Csr): Ic0Preconditioner {
  const where = 'linalg/precond/ic0';
  const { nRows: n, rowPtr, colIdx, values } = A;
  const diagPos = diagonalPositions(A);
  const aDiag = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const d = diagPos[i] >= 0 ? values[diagPos[i]] : 0;
    if (!(d > 0 && Number.isFinite(d))) {
      throw new RungsInputError(`ic0: diagonal entry ${i} is ${d}; incomplete Cholesky needs a symmetric positive definite matrix`, where);
    }
    aDiag[i] = d;
  }
  // Strictly lower pattern of A.
  const lPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) {
    let c = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1] && colIdx[k] < i; k++) c++;
    lPtr[i + 1] = lPtr[i] + c;
  }
  const lCol = new Int32Array(lPtr[n]);
  for (let i = 0; i < n; i++) lCol.set(colIdx.subarray(rowPtr[i], rowPtr[i] + lPtr[i + 1] - lPtr[i]), lPtr[i]);
  const lVal = new Float64Array(lPtr[n]);
  const d = new Float64Array(n);
  const invD = new Float64Array(n);
  const posInRow = new Int32Array(n).fill(-1);

  const factor = (alpha: number): boolean => {
    for (let i = 0; i < n; i++) {
      const lo = lPtr[i], hi = lPtr[i + 1];
      for (let p = lo; p < hi; p++) { posInRow[lCol[p]] = p; lVal[p] = values[rowPtr[i] + (p - lo)]; }
      let di = aDiag[i] * (1 + alpha);
      for (let p = lo; p < hi; p++) {
        const k = lCol[p];
        // l_ik = (a_ik − Σ_m l_im d_m l_km) / d_k over m in both patterns (m < k, so l_im is final).
        let s = lVal[p];
        for (let q = lPtr[k]; q < lPtr[k + 1]; q++) {
          const pm = posInRow[lCol[q]];
          if (pm >= lo && pm < p) s -= lVal[pm] * d[lCol[q]] * lVal[q];
        }
        const lik = s * invD[k];
        lVal[p] = lik;
        di -= lik * lik * d[k];
      }
      for (let p = lo; p < hi; p++) posInRow[lCol[p]] = -1;
      if (!(di > PIVOT_FLOOR * aDiag[i])) return false;
      d[i] = di;
      invD[i] = 1 / di;
    }
    return true;
  };
  const shift = factorWithShift('ic0', factor);

  return {
    name: shiftedName('ic0', shift),
    shift,
    apply(r: Float64Array, z: Float64Array): void {
      for (let i = 0; i < n; i++) {
        let s = r[i];
        for (let p = lPtr[i]; p < lPtr[i + 1]; p++) s -= lVal[p] * z[lCol[p]];
        z[i] = s;
      }
      for (let i = 0; i < n; i++) z[i] *= invD[i];
      // Lᵀ z = y by columns of Lᵀ (rows of L), last row first.
      for (let i = n - 1; i >= 0; i--) {
        const zi = z[i];
        for (let p = lPtr[i]; p < lPtr[i + 1]; p++) z[lCol[p]] -= lVal[p] * zi;
      }
    },
  };
}
