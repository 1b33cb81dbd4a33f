/** ILU(0): A ≈ L U on the sparsity pattern of A (no fill), L unit lower, U upper.
 *  Saad (2003), Iterative Methods for Sparse Linear Systems, 2nd ed., Algorithm 10.4 (numbering from memory).
 *  A vanishing pivot is answered by a diagonal shift (as for shifted incomplete Cholesky, Manteuffel 1980). */
import { RungsInputError } from '../../errors.ts';
import { diagonalPositions } from '../csr.ts';
import type { Csr, Preconditioner } from '../types.ts';
import { factorWithShift, shiftedName } from './diagonal-shift.ts';

/** |u_ii| ≤ this fraction of the row's largest entry counts as a breakdown. */
const PIVOT_FLOOR = 1e-12;

export interface Ilu0Preconditioner extends Preconditioner {
  /** α of the shift a_ii += α·s_i (s_i = |a_ii|, or the row maximum when a_ii = 0); 0 when none was needed. */
  shift: number;
}

export function ilu0Preconditioner(A: Csr): Ilu0Preconditioner {
  const where = 'linalg/precond/ilu0';
  if (A.nRows !== A.nCols) throw new RungsInputError(`ilu0: matrix is ${A.nRows}×${A.nCols}; a square matrix is needed`, where);
  const { nRows: n, rowPtr, colIdx, values } = A;
  const diagPos = diagonalPositions(A);
  const shiftScale = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    if (diagPos[i] < 0) {
      throw new RungsInputError(`ilu0: row ${i} stores no diagonal entry; ILU(0) needs the diagonal in the sparsity pattern`, where);
    }
    let rowMax = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) rowMax = Math.max(rowMax, Math.abs(values[k]));
    if (rowMax === 0) throw new RungsInputError(`ilu0: row ${i} is zero, so the matrix is singular`, where);
    shiftScale[i] = values[diagPos[i]] !== 0 ? Math.abs(values[diagPos[i]]) : rowMax;
  }
  const lu = new Float64Array(values.length);
  const invU = new Float64Array(n);
  const posInRow = new Int32Array(n).fill(-1);

  const factor = (alpha: number): boolean => {
    lu.set(values);
    for (let i = 0; i < n; i++) {
      const dp = diagPos[i];
      lu[dp] += alpha * shiftScale[i] * (values[dp] < 0 ? -1 : 1);
    }
    for (let i = 0; i < n; i++) {
      const lo = rowPtr[i], hi = rowPtr[i + 1];
      for (let p = lo; p < hi; p++) posInRow[colIdx[p]] = p;
      let rowMax = 0;
      for (let p = lo; p < hi; p++) rowMax = Math.max(rowMax, Math.abs(lu[p]));
      for (let p = lo; p < diagPos[i]; p++) {
        const k = colIdx[p];
        const lik = lu[p] * invU[k];
        lu[p] = lik;
        for (let q = diagPos[k] + 1; q < rowPtr[k + 1]; q++) {
          const pj = posInRow[colIdx[q]];
          if (pj >= 0) lu[pj] -= lik * lu[q];
        }
      }
      for (let p = lo; p < hi; p++) posInRow[colIdx[p]] = -1;
      const u = lu[diagPos[i]];
      if (!(Math.abs(u) > PIVOT_FLOOR * rowMax) || !Number.isFinite(u)) return false;
      invU[i] = 1 / u;
    }
    return true;
  };
  const shift = factorWithShift('ilu0', factor);

  return {
    name: shiftedName('ilu0', shift),
    shift,
    apply(r: Float64Array, z: Float64Array): void {
      for (let i = 0; i < n; i++) {
        let s = r[i];
        for (let p = rowPtr[i]; p < diagPos[i]; p++) s -= lu[p] * z[colIdx[p]];
        z[i] = s;
      }
      for (let i = n - 1; i >= 0; i--) {
        let s = z[i];
        for (let p = diagPos[i] + 1; p < rowPtr[i + 1]; p++) s -= lu[p] * z[colIdx[p]];
        z[i] = s * invU[i];
      }
    },
  };
}
