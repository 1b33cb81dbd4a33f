/** BiCGStab for non-symmetric A, right-preconditioned (A M⁻¹ u = b, x = M⁻¹ u).
 *  van der Vorst (1992), SIAM J. Sci. Stat. Comput. 13(2) 631–644; unpreconditioned form Saad (2003), Iterative
 *  Methods for Sparse Linear Systems, 2nd ed., Algorithm 7.7; preconditioned form as in Barrett et al. (1994),
 *  Templates for the Solution of Linear Systems, Fig. 2.10 (numbering from memory). */
import { spmv } from './csr.ts';
import {
  SINGULAR_HINT, isAllZero, nonFiniteError, prepareSolve, solveStats, stagnationWatch, zeroRhsStats,
} from './iteration-control.ts';
import type { Csr, SolveOptions, SolveStats } from './types.ts';
import { dot } from './vector.ts';

const MAX_RESIDUAL_REPLACEMENTS = 3;
/** |r̂·r| below this fraction of ||r̂||·||r|| means the shadow residual is (nearly) orthogonal: restart it with r̂ = r. */
const SHADOW_ORTHOGONALITY = 1e-14;

/** Solves A x = b; x0InOut is the initial guess and receives the solution. One iteration = two products with A. */
export function bicgstab(A: Csr, b: Float64Array, x0InOut: Float64Array, opts: SolveOptions = {}): SolveStats {
  const t0 = performance.now();
  const method = 'bicgstab';
  const { relTol, maxIter, M, bNorm } = prepareSolve(method, A, b, x0InOut, opts);
  const x = x0InOut;
  if (bNorm === 0) return zeroRhsStats(method, M, x, t0);
  const n = A.nRows;
  const r = new Float64Array(n);
  const rHat = new Float64Array(n);
  const p = new Float64Array(n);
  const v = new Float64Array(n);
  const pHat = new Float64Array(n);
  const sHat = new Float64Array(n);
  const t = new Float64Array(n);

  const trueResidual = (): number => {
    spmv(A, x, r);
    let rr = 0;
    for (let i = 0; i < n; i++) { const ri = b[i] - r[i]; r[i] = ri; rr += ri * ri; }
    return Math.sqrt(rr) / bNorm;
  };
  let rel: number;
  if (isAllZero(x)) { r.set(b); rel = 1; } else rel = trueResidual();
  if (!Number.isFinite(rel)) throw nonFiniteError(method, 0, 'the initial residual');
  const stats = (iterations: number, stoppedBy: SolveStats['stoppedBy'], converged: boolean, message?: string): SolveStats =>
    solveStats(method, M.name, t0, iterations, rel, stoppedBy, converged, message);
  if (rel <= relTol) return stats(0, 'residual', true);

  const stagnated = stagnationWatch();
  let replacements = 0;
  let restartShadow = true;
  let rhoOld = 1, alpha = 1, omega = 1;
  let it = 0;
  while (it < maxIter) {
    if (restartShadow) { rHat.set(r); restartShadow = false; rhoOld = 0; }
    const rho = dot(rHat, r);
    if (!Number.isFinite(rho)) throw nonFiniteError(method, it, 'r̂·r');
    if (rhoOld !== 0 && Math.abs(rho) <= SHADOW_ORTHOGONALITY * Math.sqrt(dot(rHat, rHat)) * rel * bNorm) {
      restartShadow = true;
      continue;
    }
    if (rhoOld === 0) p.set(r);
    else {
      const beta = (rho / rhoOld) * (alpha / omega);
      for (let i = 0; i < n; i++) p[i] = r[i] + beta * (p[i] - omega * v[i]);
    }
    M.apply(p, pHat);
    spmv(A, pHat, v);
    const rHatV = dot(rHat, v);
    if (!Number.isFinite(rHatV)) throw nonFiniteError(method, it, 'r̂·Ap');
    if (rHatV === 0) return stats(it, 'breakdown', false, `bicgstab: breakdown (r̂·Ap = 0) at iteration ${it}; ${SINGULAR_HINT}`);
    alpha = rho / rHatV;
    // s = r − α v, kept in r.
    let ss = 0;
    for (let i = 0; i < n; i++) { const si = r[i] - alpha * v[i]; r[i] = si; ss += si * si; }
    it++;
    if (Math.sqrt(ss) / bNorm <= relTol) {
      for (let i = 0; i < n; i++) x[i] += alpha * pHat[i];
      rel = trueResidual();
      if (rel <= relTol) return stats(it, 'residual', true);
      if (++replacements > MAX_RESIDUAL_REPLACEMENTS) return stats(it, 'stagnation', false, driftMessage(rel, relTol));
      restartShadow = true;
      continue;
    }
    M.apply(r, sHat);
    spmv(A, sHat, t);
    let ts = 0, tt = 0;
    for (let i = 0; i < n; i++) { ts += t[i] * r[i]; tt += t[i] * t[i]; }
    if (!Number.isFinite(ts) || !Number.isFinite(tt)) throw nonFiniteError(method, it, 'the stabilising step');
    omega = tt > 0 ? ts / tt : 0;
    let rr = 0;
    for (let i = 0; i < n; i++) {
      x[i] += alpha * pHat[i] + omega * sHat[i];
      const ri = r[i] - omega * t[i];
      r[i] = ri;
      rr += ri * ri;
    }
    rel = Math.sqrt(rr) / bNorm;
    if (!Number.isFinite(rel)) throw nonFiniteError(method, it, 'the residual');
    if (rel <= relTol) {
      rel = trueResidual();
      if (rel <= relTol) return stats(it, 'residual', true);
      if (++replacements > MAX_RESIDUAL_REPLACEMENTS) return stats(it, 'stagnation', false, driftMessage(rel, relTol));
      restartShadow = true;
      continue;
    }
    if (omega === 0) {
      rel = trueResidual();
      return stats(it, 'breakdown', false, `bicgstab: breakdown (ω = 0) at iteration ${it}; ${SINGULAR_HINT}`);
    }
    if (opts.stopWhen && opts.stopWhen({ iteration: it, relativeResidual: rel, x })) {
      rel = trueResidual();
      return stats(it, 'stopWhen', true);
    }
    if (stagnated(it, rel)) {
      rel = trueResidual();
      return stats(it, 'stagnation', false,
        `bicgstab: the residual stopped decreasing at ${rel.toExponential(2)} (relTol ${relTol}); ${SINGULAR_HINT}`);
    }
    rhoOld = rho;
  }
  rel = trueResidual();
  return stats(it, 'maxIter', rel <= relTol,
    rel <= relTol ? undefined : `bicgstab: not converged after ${it} iterations (||r||/||b|| = ${rel.toExponential(2)})`);
}

function driftMessage(rel: number, relTol: number): string {
  return `bicgstab: the true residual stays at ${rel.toExponential(2)} above relTol ${relTol}; ${SINGULAR_HINT}`;
}
