/** Restarted GMRES(m) with right preconditioning: Arnoldi by modified Gram–Schmidt, least-squares problem kept
 *  triangular by Givens rotations. Saad & Schultz (1986); Saad (2003), Iterative Methods for Sparse Linear Systems,
 *  2nd ed., Algorithm 6.2 (Arnoldi–MGS), §6.5.3 (Givens rotations), Algorithm 9.5 (right-preconditioned GMRES)
 *  (numbering from memory). Right preconditioning keeps the monitored residual the true ||b − A x||. */
import { RungsInputError } from '../errors.ts';
import { spmv } from './csr.ts';
import {
  SINGULAR_HINT, isAllZero, nonFiniteError, prepareSolve, solveStats, stagnationWatch, zeroRhsStats,
} from './iteration-control.ts';
import type { Csr, SolveOptions, SolveStats } from './types.ts';

export const DEFAULT_RESTART = 30;
const MAX_RESIDUAL_REPLACEMENTS = 3;

/** Solves A x = b; x0InOut is the initial guess and receives the solution. iterations counts Arnoldi steps.
 *  With stopWhen, the iterate is formed after every step (one extra preconditioner apply and O(m·n) work). */
export function gmres(A: Csr, b: Float64Array, x0InOut: Float64Array, opts: SolveOptions = {}): SolveStats {
  const t0 = performance.now();
  const method = 'gmres';
  const { relTol, maxIter, M, bNorm } = prepareSolve(method, A, b, x0InOut, opts);
  const x = x0InOut;
  if (bNorm === 0) return zeroRhsStats(method, M, x, t0);
  const n = A.nRows;
  const m = Math.min(opts.restart ?? DEFAULT_RESTART, n);
  if (!(Number.isInteger(m) && m >= 1)) {
    throw new RungsInputError(`gmres: restart must be a positive integer, got ${opts.restart}`, 'linalg/gmres');
  }
  const V: Float64Array[] = [];
  for (let j = 0; j <= m; j++) V.push(new Float64Array(n));
  const H = new Float64Array((m + 1) * m); // column-major, H[i + j (m+1)]
  const cs = new Float64Array(m);
  const sn = new Float64Array(m);
  const g = new Float64Array(m + 1);
  const y = new Float64Array(m);
  const z = new Float64Array(n);
  const w = new Float64Array(n);
  const xTry = opts.stopWhen ? new Float64Array(n) : null;
  const ld = m + 1;

  const trueResidual = (r: Float64Array): number => {
    spmv(A, x, r);
    let rr = 0;
    for (let i = 0; i < n; i++) { const ri = b[i] - r[i]; r[i] = ri; rr += ri * ri; }
    return Math.sqrt(rr) / bNorm;
  };
  /** Back substitution R y = g on the leading k×k block, then out = base + M⁻¹ (V y). */
  const formIterate = (k: number, base: Float64Array, out: Float64Array): void => {
    for (let i = k - 1; i >= 0; i--) {
      let s = g[i];
      for (let j = i + 1; j < k; j++) s -= H[i + j * ld] * y[j];
      y[i] = s / H[i + i * ld];
    }
    w.fill(0);
    for (let j = 0; j < k; j++) {
      const vj = V[j], yj = y[j];
      for (let i = 0; i < n; i++) w[i] += yj * vj[i];
    }
    M.apply(w, z);
    for (let i = 0; i < n; i++) out[i] = base[i] + z[i];
  };

  const r = V[0];
  let rel = isAllZero(x) ? (r.set(b), 1) : trueResidual(r);
  if (!Number.isFinite(rel)) throw nonFiniteError(method, 0, 'the initial residual');
  const stats = (iterations: number, stoppedBy: SolveStats['stoppedBy'], converged: boolean, message?: string): SolveStats =>
    solveStats(method, M.name, t0, iterations, rel, stoppedBy, converged, message);
  if (rel <= relTol) return stats(0, 'residual', true);

  const stagnated = stagnationWatch();
  let replacements = 0;
  let it = 0;
  for (;;) {
    // Start a cycle from the residual in V[0].
    const beta = rel * bNorm;
    for (let i = 0; i < n; i++) V[0][i] /= beta;
    g.fill(0);
    g[0] = beta;
    let k = 0; // Arnoldi steps in this cycle
    let stop: SolveStats['stoppedBy'] | null = null;
    let estimate = rel;
    while (k < m && it < maxIter) {
      const j = k;
      M.apply(V[j], z);
      spmv(A, z, w);
      // Modified Gram–Schmidt against v_0..v_j.
      for (let i = 0; i <= j; i++) {
        const vi = V[i];
        let h = 0;
        for (let l = 0; l < n; l++) h += w[l] * vi[l];
        H[i + j * ld] = h;
        for (let l = 0; l < n; l++) w[l] -= h * vi[l];
      }
      let hn = 0;
      for (let l = 0; l < n; l++) hn += w[l] * w[l];
      hn = Math.sqrt(hn);
      if (!Number.isFinite(hn)) throw nonFiniteError(method, it, 'the Arnoldi vector');
      H[j + 1 + j * ld] = hn;
      // Earlier rotations on the new column, then a new one to annihilate h_{j+1,j}.
      for (let i = 0; i < j; i++) {
        const a = H[i + j * ld], c = H[i + 1 + j * ld];
        H[i + j * ld] = cs[i] * a + sn[i] * c;
        H[i + 1 + j * ld] = -sn[i] * a + cs[i] * c;
      }
      const a = H[j + j * ld];
      const d = Math.hypot(a, hn);
      k++;
      it++;
      let colScale = 0;
      for (let i = 0; i <= j; i++) colScale = Math.max(colScale, Math.abs(H[i + j * ld]));
      if (d <= 1e-14 * Math.max(colScale, hn)) {
        // A M⁻¹ v_j lies in span(v_0..v_{j-1}) with a zero pivot: the operator is singular on the Krylov space.
        k--;
        stop = 'breakdown';
        break;
      }
      cs[j] = a / d;
      sn[j] = hn / d;
      H[j + j * ld] = d;
      H[j + 1 + j * ld] = 0;
      g[j + 1] = -sn[j] * g[j];
      g[j] = cs[j] * g[j];
      estimate = Math.abs(g[j + 1]) / bNorm;
      if (!Number.isFinite(estimate)) throw nonFiniteError(method, it, 'the residual estimate');
      if (estimate <= relTol || hn === 0) break;
      if (xTry && opts.stopWhen) {
        formIterate(k, x, xTry);
        if (opts.stopWhen({ iteration: it, relativeResidual: estimate, x: xTry })) { stop = 'stopWhen'; break; }
      }
      if (stagnated(it, estimate)) { stop = 'stagnation'; break; }
      const vNext = V[j + 1];
      for (let l = 0; l < n; l++) vNext[l] = w[l] / hn;
    }
    if (k > 0) formIterate(k, x, x);
    rel = trueResidual(V[0]);
    if (!Number.isFinite(rel)) throw nonFiniteError(method, it, 'the residual');
    if (rel <= relTol) return stats(it, 'residual', true);
    if (stop === 'stopWhen') return stats(it, 'stopWhen', true);
    if (stop === 'breakdown') {
      return stats(it, 'breakdown', false, `gmres: Arnoldi breakdown with a zero pivot at iteration ${it}; ${SINGULAR_HINT}`);
    }
    if (stop === 'stagnation') {
      return stats(it, 'stagnation', false,
        `gmres: the residual stopped decreasing at ${rel.toExponential(2)} (relTol ${relTol}, restart ${m}); ${SINGULAR_HINT}; ` +
          'a larger restart may also help');
    }
    if (it >= maxIter) {
      return stats(it, 'maxIter', false, `gmres: not converged after ${it} iterations (||r||/||b|| = ${rel.toExponential(2)})`);
    }
    if (estimate <= relTol && ++replacements > MAX_RESIDUAL_REPLACEMENTS) {
      return stats(it, 'stagnation', false,
        `gmres: the true residual stays at ${rel.toExponential(2)} above relTol ${relTol}; ${SINGULAR_HINT}`);
    }
  }
}
