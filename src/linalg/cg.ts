/** Preconditioned conjugate gradients for symmetric positive definite A.
 *  Hestenes & Stiefel (1952); preconditioned form as in Saad (2003), Iterative Methods for Sparse Linear Systems,
 *  2nd ed., Algorithm 9.1 (numbering from memory). */
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { isSymmetric } from './csr.ts';
import {
  SINGULAR_HINT, isAllZero, nonFiniteError, prepareSolve, stagnationWatch, zeroRhsStats,
} from './iteration-control.ts';
import type { Csr, SolveOptions, SolveStats } from './types.ts';

/** Relative symmetry tolerance of the check CG runs before iterating (see isSymmetric). */
export const CG_SYMMETRY_TOL = 1e-10;
/** How often the recursively updated residual may be replaced by the true one when they disagree at the end. */
const MAX_RESIDUAL_REPLACEMENTS = 3;

/** Solves A x = b; x0InOut is the initial guess and receives the solution. Does not throw on non-convergence:
 *  stats.converged says whether relTol was met (relativeResidual is the true ||b − A x|| / ||b||). */
export function cg(A: Csr, b: Float64Array, x0InOut: Float64Array, opts: SolveOptions = {}): SolveStats {
  const t0 = performance.now();
  const method = 'cg';
  const { relTol, maxIter, M, bNorm } = prepareSolve(method, A, b, x0InOut, opts);
  if (!opts.skipSymmetryCheck && !isSymmetric(A, CG_SYMMETRY_TOL)) {
    throw new RungsInputError(
      'cg: the matrix is not symmetric, and conjugate gradients needs a symmetric positive definite matrix; ' +
        "use method 'gmres' or 'bicgstab' (or solveSystem with symmetric: false)",
      'linalg/cg',
    );
  }
  const x = x0InOut;
  if (bNorm === 0) return zeroRhsStats(method, M, x, t0);

  const n = A.nRows;
  const { rowPtr, colIdx, values } = A;
  const r = new Float64Array(n);
  const z = new Float64Array(n);
  const p = new Float64Array(n);
  const q = new Float64Array(n);

  const trueResidual = (): number => {
    let rr = 0;
    for (let i = 0; i < n; i++) {
      let s = b[i];
      for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s -= values[k] * x[colIdx[k]];
      r[i] = s;
      rr += s * s;
    }
    return Math.sqrt(rr) / bNorm;
  };

  let rel: number;
  if (isAllZero(x)) { r.set(b); rel = 1; } else rel = trueResidual();
  if (!Number.isFinite(rel)) throw nonFiniteError(method, 0, 'the initial residual');
  const stats = (iterations: number, stoppedBy: SolveStats['stoppedBy'], converged: boolean, message?: string): SolveStats => ({
    method, preconditioner: M.name, iterations, relativeResidual: rel, converged, stoppedBy,
    solveSeconds: (performance.now() - t0) / 1000, ...(message ? { message } : {}),
  });
  if (rel <= relTol) return stats(0, 'residual', true);

  const stagnated = stagnationWatch();
  let replacements = 0;
  let rz = restartDirection(M, r, z, p);
  let normA = -1; // ||A||_inf, computed only if a curvature test needs a scale
  let it = 0;
  while (it < maxIter) {
    if (!(rz > 0)) {
      if (!Number.isFinite(rz)) throw nonFiniteError(method, it, 'the preconditioned residual');
      if (rz < 0) {
        throw new RungsNumericalError(
          `cg: r·M⁻¹r = ${rz} < 0 at iteration ${it}: the preconditioner '${M.name}' is not positive definite`, 'linalg/cg');
      }
      return stats(it, 'breakdown', false, `cg: the preconditioned residual vanished while ||r||/||b|| = ${rel}; ${SINGULAR_HINT}`);
    }
    // q = A p and p·q in one sweep.
    let pq = 0;
    for (let i = 0; i < n; i++) {
      let s = 0;
      for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s += values[k] * p[colIdx[k]];
      q[i] = s;
      pq += p[i] * s;
    }
    if (!(pq > 0)) {
      if (!Number.isFinite(pq)) throw nonFiniteError(method, it, 'p·Ap');
      if (normA < 0) normA = infinityNorm(A);
      let pp = 0;
      for (let i = 0; i < n; i++) pp += p[i] * p[i];
      if (pq < -1e-8 * normA * pp) {
        throw new RungsInputError(
          `cg: p·Ap = ${pq.toExponential(3)} < 0 at iteration ${it}: the matrix is not positive definite, which CG needs; ` +
            "check the sign of the operator, or use method 'gmres'",
          'linalg/cg',
        );
      }
      return stats(it, 'breakdown', false, `cg: p·Ap vanished at iteration ${it} (a direction in the null space); ${SINGULAR_HINT}`);
    }
    const alpha = rz / pq;
    let rr = 0;
    for (let i = 0; i < n; i++) {
      x[i] += alpha * p[i];
      const ri = r[i] - alpha * q[i];
      r[i] = ri;
      rr += ri * ri;
    }
    it++;
    rel = Math.sqrt(rr) / bNorm;
    if (!Number.isFinite(rel)) throw nonFiniteError(method, it, 'the residual');
    if (rel <= relTol) {
      // The recursion drifts from b − A x; accept only when the true residual agrees.
      rel = trueResidual();
      if (rel <= relTol) return stats(it, 'residual', true);
      if (++replacements > MAX_RESIDUAL_REPLACEMENTS) {
        return stats(it, 'stagnation', false,
          `cg: the true residual stays at ${rel.toExponential(2)} above relTol ${relTol}; ${SINGULAR_HINT}`);
      }
      rz = restartDirection(M, r, z, p);
      continue;
    }
    if (opts.stopWhen && opts.stopWhen({ iteration: it, relativeResidual: rel, x })) {
      rel = trueResidual();
      return stats(it, 'stopWhen', true);
    }
    if (stagnated(it, rel)) {
      rel = trueResidual();
      return stats(it, 'stagnation', false,
        `cg: the residual stopped decreasing at ${rel.toExponential(2)} (relTol ${relTol}); ${SINGULAR_HINT}`);
    }
    if (it >= maxIter) break;
    M.apply(r, z);
    let rzNew = 0;
    for (let i = 0; i < n; i++) rzNew += r[i] * z[i];
    const beta = rzNew / rz;
    rz = rzNew;
    for (let i = 0; i < n; i++) p[i] = z[i] + beta * p[i];
  }
  rel = trueResidual();
  return stats(it, 'maxIter', rel <= relTol,
    rel <= relTol ? undefined : `cg: not converged after ${it} iterations (||r||/||b|| = ${rel.toExponential(2)})`);
}

/** z = M⁻¹ r, p = z; returns r·z. */
function restartDirection(M: { apply(r: Float64Array, z: Float64Array): void }, r: Float64Array, z: Float64Array, p: Float64Array): number {
  M.apply(r, z);
  p.set(z);
  let rz = 0;
  for (let i = 0; i < r.length; i++) rz += r[i] * z[i];
  return rz;
}

/** max_i Σ_j |a_ij|, a cheap scale for the curvature test. */
function infinityNorm(A: Csr): number {
  let m = 0;
  for (let i = 0; i < A.nRows; i++) {
    let s = 0;
    for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) s += Math.abs(A.values[k]);
    if (s > m) m = s;
  }
  return m;
}
