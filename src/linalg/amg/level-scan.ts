/** A level's operator checked (finite entries, positive diagonal) and its diagonal located. */
import { RungsInputError, RungsNumericalError } from '../../errors.ts';
import type { Csr } from '../types.ts';

export interface LevelScan {
  diagPos: Int32Array;
  diag: Float64Array;
  invDiag: Float64Array;
}

/** Throws RungsInputError on the finest level (the caller's matrix) and RungsNumericalError on coarser ones. */
export function scanLevel(A: Csr, level: number): LevelScan {
  const where = 'linalg/amg';
  const fail = (msg: string): Error => (level === 0 ? new RungsInputError(msg, where) : new RungsNumericalError(msg, where));
  const { nRows: n, rowPtr, colIdx, values } = A;
  const nnz = rowPtr[n];
  let bad = -1;
  for (let k = 0; k < nnz; k++) {
    const v = values[k];
    if (v - v !== 0) { bad = k; break; } // NaN or ±Inf
  }
  if (bad >= 0) {
    let row = 0;
    while (rowPtr[row + 1] <= bad) row++;
    throw fail(`amg: matrix entry (${row}, ${colIdx[bad]}) of level ${level} is ${values[bad]}; every entry must be finite ` +
      (level === 0 ? '(check the coefficients and the assembly)' : '(overflow while forming the coarse operator)'));
  }
  const diagPos = new Int32Array(n);
  const diag = new Float64Array(n);
  const invDiag = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let pos = -1;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const c = colIdx[k];
      if (c >= i) { if (c === i) pos = k; break; }
    }
    const d = pos >= 0 ? values[pos] : 0;
    if (!(d > 0)) {
      throw fail(`amg: diagonal entry ${i} of level ${level} is ${d}; smoothed aggregation needs a positive diagonal ` +
        "(a symmetric positive definite operator); for other matrices use preconditioner 'ilu0'");
    }
    diagPos[i] = pos;
    diag[i] = d;
    invDiag[i] = 1 / d;
  }
  return { diagPos, diag, invDiag };
}
