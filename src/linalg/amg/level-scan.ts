/** One sweep over a level's operator: diagonal positions and values, checks (finite entries, positive diagonal),
 *  and whether every row is diagonally dominant. */
import { RungsInputError, RungsNumericalError } from '../../errors.ts';
import type { Csr } from '../types.ts';

export interface LevelScan {
  diagPos: Int32Array;
  diag: Float64Array;
  invDiag: Float64Array;
  /** a_ii ≥ Σ_{j≠i} |a_ij| in every row (up to round-off). */
  diagonallyDominant: boolean;
}

/** Throws RungsInputError on the finest level (the caller's matrix) and RungsNumericalError on coarser ones. */
export function scanLevel(A: Csr, level: number): LevelScan {
  const where = 'linalg/amg';
  const fail = (msg: string): Error => (level === 0 ? new RungsInputError(msg, where) : new RungsNumericalError(msg, where));
  const { nRows: n, rowPtr, colIdx, values } = A;
  const diagPos = new Int32Array(n);
  const diag = new Float64Array(n);
  const invDiag = new Float64Array(n);
  let dominant = true;
  for (let i = 0; i < n; i++) {
    let pos = -1, off = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const v = values[k];
      if (v - v !== 0) { // NaN or ±Inf
        throw fail(`amg: matrix entry (${i}, ${colIdx[k]}) of level ${level} is ${v}; every entry must be finite ` +
          (level === 0 ? '(check the coefficients and the assembly)' : '(overflow while forming the coarse operator)'));
      }
      if (colIdx[k] === i) pos = k;
      else off += Math.abs(v);
    }
    const d = pos >= 0 ? values[pos] : 0;
    if (!(d > 0)) {
      throw fail(`amg: diagonal entry ${i} of level ${level} is ${d}; smoothed aggregation needs a positive diagonal ` +
        "(a symmetric positive definite operator); for other matrices use preconditioner 'ilu0'");
    }
    if (off > d * (1 + 1e-12)) dominant = false;
    diagPos[i] = pos;
    diag[i] = d;
    invDiag[i] = 1 / d;
  }
  return { diagPos, diag, invDiag, diagonallyDominant: dominant };
}
