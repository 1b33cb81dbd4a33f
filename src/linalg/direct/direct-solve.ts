/** Exact reference solver: reverse Cuthill–McKee reordering, then banded LU with partial pivoting.
 *  Meant for n up to a few thousand (2D meshes: up to ~20k with a good ordering); throws on a singular matrix. */
import { RungsInputError } from '../../errors.ts';
import { assertFiniteMatrix, assertSquareSystem, relativeResidualNorm } from '../csr.ts';
import type { Csr, SolveStats } from '../types.ts';
import { allFinite } from '../vector.ts';
import { bandedLu } from './banded-lu.ts';
import { reverseCuthillMcKee } from './rcm.ts';

export interface DirectFactor {
  n: number;
  /** x = A⁻¹ b. */
  solve(b: Float64Array, x: Float64Array): void;
  /** Band widths after reordering (lower, upper). */
  bandwidth: [number, number];
}

/** Factorises A once for any number of right-hand sides. */
export function directFactor(A: Csr): DirectFactor {
  const where = 'linalg/direct';
  assertSquareSystem(A, where);
  assertFiniteMatrix(A, where);
  const n = A.nRows;
  const order = reverseCuthillMcKee(A);
  const position = new Int32Array(n);
  for (let i = 0; i < n; i++) position[order[i]] = i;
  // B = P A Pᵀ with B_ij = A_{order[i], order[j]}.
  const rowPtr = new Int32Array(n + 1);
  for (let i = 0; i < n; i++) rowPtr[i + 1] = rowPtr[i] + A.rowPtr[order[i] + 1] - A.rowPtr[order[i]];
  const colIdx = new Int32Array(rowPtr[n]);
  const values = new Float64Array(rowPtr[n]);
  for (let i = 0; i < n; i++) {
    let out = rowPtr[i];
    for (let k = A.rowPtr[order[i]]; k < A.rowPtr[order[i] + 1]; k++) {
      colIdx[out] = position[A.colIdx[k]];
      values[out++] = A.values[k];
    }
  }
  const lu = bandedLu({ nRows: n, nCols: n, rowPtr, colIdx, values });
  const work = new Float64Array(n);
  return {
    n,
    bandwidth: [lu.kl, lu.ku],
    solve(b: Float64Array, x: Float64Array): void {
      for (let i = 0; i < n; i++) work[i] = b[order[i]];
      lu.solve(work, work);
      for (let i = 0; i < n; i++) x[order[i]] = work[i];
    },
  };
}

/** Solves A x = b exactly (to round-off); x receives the solution. */
export function directSolve(A: Csr, b: Float64Array, x: Float64Array): SolveStats {
  const t0 = performance.now();
  const where = 'linalg/direct';
  assertSquareSystem(A, where, ['right-hand side b', b], ['solution x', x]);
  if (!allFinite(b)) throw new RungsInputError('direct solver: the right-hand side holds NaN or Inf; check the load vector', where);
  const factor = directFactor(A);
  factor.solve(b, x);
  const rel = relativeResidualNorm(A, x, b);
  if (!allFinite(x) || !(rel < 1e-6)) {
    throw new RungsInputError(
      `direct solver: the solution has relative residual ${rel}; the matrix is singular or nearly so ` +
        '(a pure Neumann problem needs a constraint fixing the constant)', where);
  }
  return {
    method: 'direct', preconditioner: 'none', iterations: 0, relativeResidual: rel, converged: true, stoppedBy: 'direct',
    solveSeconds: (performance.now() - t0) / 1000,
  };
}
