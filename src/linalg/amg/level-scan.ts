/** A level's operator checked (finite entries, positive diagonal) and its diagonal located, in one pass. */
import { RungsInputError, RungsNumericalError } from '../../errors.ts';
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import type { Csr } from '../types.ts';

export interface LevelScan {
  diagPos: Int32Array;
  diag: Float64Array;
  invDiag: Float64Array;
}

/** Throws RungsInputError on the finest level (the caller's matrix) and RungsNumericalError on coarser ones. */
export function scanLevel(A: Csr, level: number, alloc: Allocator = heapAllocator): LevelScan {
  const where = 'linalg/amg';
  const fail = (msg: string): Error => (level === 0 ? new RungsInputError(msg, where) : new RungsNumericalError(msg, where));
  const { nRows: n, rowPtr, colIdx, values } = A;
  const diagPos = alloc.i32(n, false);
  const diag = alloc.f64(n, false);
  const invDiag = alloc.f64(n, false);
  for (let i = 0; i < n; i++) {
    let pos = -1;
    let finite = true;
    for (let k = rowPtr[i], end = rowPtr[i + 1]; k < end; k++) {
      const v = values[k];
      if (v - v !== 0) finite = false; // NaN or ±Inf
      if (colIdx[k] === i) pos = k;
    }
    if (!finite) {
      let k = rowPtr[i];
      while (values[k] - values[k] === 0) k++;
      throw fail(`amg: matrix entry (${i}, ${colIdx[k]}) of level ${level} is ${values[k]}; every entry must be finite ` +
        (level === 0 ? '(check the coefficients and the assembly)' : '(overflow while forming the coarse operator)'));
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
