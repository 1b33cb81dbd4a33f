/** What every Krylov solver shares: defaults, input checks, stagnation watch, failure messages. */
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { assertSquareSystem } from './csr.ts';
import type { Csr, Preconditioner, SolveOptions, SolveStats } from './types.ts';
import { allFinite } from './vector.ts';

export const DEFAULT_REL_TOL = 1e-12;

/** Default iteration cap: max(1000, 10·√n). Unpreconditioned CG on a 2D Poisson matrix needs O(√n) iterations
 *  (its condition number grows like h⁻² ~ n), so 10·√n leaves room for that; preconditioned solves stop far earlier. */
export function defaultMaxIter(n: number): number {
  return Math.max(1000, Math.ceil(10 * Math.sqrt(n)));
}

/** Stagnation: the best residual seen has not dropped by 1 % over this many iterations. A singular, inconsistent
 *  system (pure Neumann with a load not summing to zero) plateaus at the null-space part of b and would otherwise
 *  run to maxIter. */
export const STAGNATION_WINDOW = 100;
const STAGNATION_DROP = 0.99;

export const SINGULAR_HINT =
  'the system may be singular (for example a pure Neumann problem without a constraint fixing the constant), ' +
  'or the tolerance may be below what round-off allows for this matrix';

export const identityPreconditioner: Preconditioner = {
  name: 'none',
  apply(r: Float64Array, z: Float64Array): void { z.set(r); },
};

export interface SolveSetup {
  relTol: number;
  maxIter: number;
  M: Preconditioner;
  bNorm: number;
}

/** Validates sizes, finiteness of b and x0, and the options; returns the resolved settings. */
export function prepareSolve(method: string, A: Csr, b: Float64Array, x: Float64Array, opts: SolveOptions): SolveSetup {
  const where = `linalg/${method}`;
  assertSquareSystem(A, where, ['right-hand side b', b], ['initial guess x', x]);
  if (!allFinite(b)) throw new RungsInputError(`${method}: the right-hand side holds NaN or Inf; check the load vector`, where);
  if (!allFinite(x)) throw new RungsInputError(`${method}: the initial guess holds NaN or Inf`, where);
  const relTol = opts.relTol ?? DEFAULT_REL_TOL;
  if (!(relTol > 0 && relTol < 1)) throw new RungsInputError(`${method}: relTol must lie in (0, 1), got ${relTol}`, where);
  const maxIter = opts.maxIter ?? defaultMaxIter(A.nRows);
  if (!(Number.isInteger(maxIter) && maxIter >= 1)) {
    throw new RungsInputError(`${method}: maxIter must be a positive integer, got ${maxIter}`, where);
  }
  let bb = 0;
  for (let i = 0; i < b.length; i++) bb += b[i] * b[i];
  return { relTol, maxIter, M: opts.preconditioner ?? identityPreconditioner, bNorm: Math.sqrt(bb) };
}

/** Tracks the best residual and reports when it stopped improving (see STAGNATION_WINDOW). */
export function stagnationWatch(): (iteration: number, relativeResidual: number) => boolean {
  let mark = Infinity;
  let markIteration = 0;
  return (iteration, rel) => {
    if (rel < STAGNATION_DROP * mark) { mark = rel; markIteration = iteration; return false; }
    return iteration - markIteration >= STAGNATION_WINDOW;
  };
}

/** The error for a NaN/Inf met while iterating: names the solver, the iteration and the likely causes. */
export function nonFiniteError(method: string, iteration: number, what: string): RungsNumericalError {
  return new RungsNumericalError(
    `${method}: ${what} became non-finite (NaN or Inf) at iteration ${iteration}; the matrix or the preconditioner ` +
      'produced an overflow or a division by zero (check for a zero diagonal, NaN entries or a singular matrix)',
    `linalg/${method}`,
  );
}

/** The statistics record every iterative solver returns. */
export function solveStats(
  method: string, preconditioner: string, t0: number, iterations: number, relativeResidual: number,
  stoppedBy: SolveStats['stoppedBy'], converged: boolean, message?: string,
): SolveStats {
  return {
    method, preconditioner, iterations, relativeResidual, converged, stoppedBy,
    solveSeconds: (performance.now() - t0) / 1000, ...(message ? { message } : {}),
  };
}

/** Stats for the trivial solve b = 0 (x = 0 exactly). */
export function zeroRhsStats(method: string, M: Preconditioner, x: Float64Array, t0: number): SolveStats {
  x.fill(0);
  return {
    method, preconditioner: M.name, iterations: 0, relativeResidual: 0, converged: true, stoppedBy: 'residual',
    solveSeconds: (performance.now() - t0) / 1000,
  };
}

export function isAllZero(x: Float64Array): boolean {
  for (let i = 0; i < x.length; i++) if (x[i] !== 0) return false;
  return true;
}
