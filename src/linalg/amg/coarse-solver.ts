/** The solver of the coarsest level: dense Cholesky (symmetric) or dense LU with partial pivoting, or, when
 *  coarsening stalled on a level too large to factorise densely, symmetric Gauss–Seidel sweeps. */
import { RungsInputError, RungsNumericalError } from '../../errors.ts';
import { denseCholesky } from '../dense/cholesky.ts';
import { denseLu } from '../dense/lu.ts';
import type { Csr } from '../types.ts';
import type { CoarseSolver } from './types.ts';

/** Largest coarsest level factorised densely (n³/3 flops at setup, n² per cycle). */
export const MAX_DENSE_COARSE = 1200;
/** Forward + backward sweep pairs used when the coarsest level is too large for a dense factorisation. */
export const COARSE_SWEEPS = 20;

export function buildCoarseSolver(A: Csr, symmetric: boolean, notes: string[]): CoarseSolver {
  const n = A.nRows;
  if (n > MAX_DENSE_COARSE) {
    notes.push(`coarsest level has ${n} unknowns (> ${MAX_DENSE_COARSE}); it is smoothed by ${COARSE_SWEEPS} symmetric ` +
      'Gauss–Seidel sweep pairs instead of a direct solve, so convergence may suffer');
    return { kind: 'gauss-seidel', sweeps: COARSE_SWEEPS };
  }
  const dense = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) dense[i * n + A.colIdx[k]] += A.values[k];
  }
  if (symmetric) {
    try {
      const factor = denseCholesky(dense, n);
      if (factor.nullity > 0) {
        notes.push(`the coarsest operator is singular (${factor.nullity} null direction${factor.nullity > 1 ? 's' : ''}); ` +
          'a pseudo-inverse is used there: the system is probably singular (pure Neumann without a constraint)');
      }
      return { kind: 'cholesky', factor };
    } catch (e) {
      if (e instanceof RungsInputError) {
        throw new RungsInputError(`amg: the coarsest operator is not positive semidefinite (${e.message}); the matrix is ` +
          "probably not symmetric positive definite: use method 'gmres'", 'linalg/amg');
      }
      throw e;
    }
  }
  try {
    return { kind: 'lu', factor: denseLu(dense, n) };
  } catch (e) {
    if (e instanceof RungsInputError) {
      throw new RungsNumericalError(`amg: the coarsest operator is singular (${e.message})`, 'linalg/amg');
    }
    throw e;
  }
}
