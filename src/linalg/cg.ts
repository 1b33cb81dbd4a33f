/** Preconditioned conjugate gradients for symmetric positive definite A.
 *  Hestenes & Stiefel (1952); preconditioned form as in Saad (2003), Iterative Methods for Sparse Linear Systems,
 *  2nd ed., Algorithm 9.1 (numbering from memory). When the preconditioner also returns A z (the multigrid V-cycle
 *  does, from its last sweep), A p = A z + β A p_old is updated without a product with A. */
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { assertFiniteMatrix, isSymmetric } from './csr.ts';
import {
  SINGULAR_HINT, isAllZero, nonFiniteError, prepareSolve, solveStats, stagnationWatch, zeroRhsStats,
} from './iteration-control.ts';
import type { Csr, SolveOptions, SolveStats } from './types.ts';
import { javascriptCgSteps, residualInto, spmvDot } from './cg-steps.ts';
import { dot } from './vector.ts';

/** Relative symmetry tolerance of the check CG runs before iterating (see isSymmetric). */
export const CG_SYMMETRY_TOL = 1e-10;
/** Delay d of the error estimate: ||x* − x_{k−d}||²_A ≈ Σ_{j=k−d}^{k−1} α_j r_j·z_j, a lower bound that is tight
 *  once the error falls by a good factor over d steps (Hestenes & Stiefel 1952, Thm 6:1; Strakoš & Tichý 2002,
 *  eq. 4.9). Since CG's A-norm error decreases monotonically, it also bounds the error of x_k from above
 *  whenever the bound for x_{k−d} is tight. */
export const CG_ERROR_DELAY = 3;
/** How often the recursively updated residual may be replaced by the true one when they disagree at the end. */
const MAX_RESIDUAL_REPLACEMENTS = 3;
/** With a preconditioner that also returns A z, q = A p is updated by recursion and recomputed every this many steps. */
const PRODUCT_REFRESH = 50;

/** Solves A x = b; x0InOut is the initial guess and receives the solution. Does not throw on non-convergence:
 *  stats.converged is true when relTol was met or stopWhen stopped the solve (relativeResidual is then the true
 *  ||b − A x|| / ||b||). Throws RungsInputError for a non-symmetric or indefinite A, RungsNumericalError for NaN/Inf
 *  met while iterating. */
export function cg(A: Csr, b: Float64Array, x0InOut: Float64Array, opts: SolveOptions = {}): SolveStats {
  const t0 = performance.now();
  const method = 'cg';
  const { relTol, maxIter, M, bNorm } = prepareSolve(method, A, b, x0InOut, opts);
  if (!opts.skipSymmetryCheck && !isSymmetric(A, CG_SYMMETRY_TOL)) {
    assertFiniteMatrix(A, 'linalg/cg'); // a NaN also fails the symmetry test: name the real problem
    throw new RungsInputError(
      'cg: the matrix is not symmetric, and conjugate gradients needs a symmetric positive definite matrix; ' +
        "use method 'gmres' or 'bicgstab' (or solveSystem with symmetric: false)",
      'linalg/cg',
    );
  }
  if (bNorm === 0) return zeroRhsStats(method, M, x0InOut, t0);

  const n = A.nRows;
  const taken: Float64Array[] = [];
  const vector = (): Float64Array => {
    if (!M.vector) return new Float64Array(n);
    const v = M.vector(n);
    taken.push(v);
    return v;
  };
  const r = vector();
  const z = vector();
  const p = vector();
  const q = vector();
  const t = { t0, method, M: M.name };

  // With a preconditioner that keeps its own memory (the multigrid arena), every vector it touches, and the
  // iterate, live there: the cycle and the vector updates then run as WebAssembly kernels without copies.
  const x = M.vector ? vector() : x0InOut;
  if (x !== x0InOut) x.set(x0InOut);
  const steps = M.cgSteps ?? javascriptCgSteps;
  // q = A p through the preconditioner's copy of A when it offers one (WebAssembly), else here.
  const product = M.product && M.product.matrix === A ? M.product : null;
  const applyA = (v: Float64Array, out: Float64Array): number => (product ? product.spmvDot(v, out) : spmvDot(A, v, out));
  /** r = b − A x, returning ||r||: through the preconditioner's kernel when it offers one (the same bits). */
  const trueResidual = (_A: Csr, b: Float64Array, x: Float64Array, r: Float64Array): number =>
    Math.sqrt(product?.residual ? product.residual(b, x, r) : residualInto(A, b, x, r));
  const iterate = (): SolveStats => {
    let rel = isAllZero(x) ? (r.set(b), 1) : trueResidual(A, b, x, r) / bNorm;
    if (!Number.isFinite(rel)) throw nonFiniteError(method, 0, 'the initial residual');
    if (rel <= relTol) return finish(t, 0, rel, 'residual', true);

    const stagnated = stagnationWatch();
    const fusedM = M.withProduct && M.withProduct.matrix === A ? M.withProduct : null;
    const w = fusedM ? vector() : q;
    let replacements = 0;
    let sinceProduct = 0;
    let rz = 0, pq = 0;
    /** Search direction from the current residual: z = M⁻¹r, p = z, q = A p, and r·z, p·q. */
    const restart = (): void => {
      if (fusedM) { rz = fusedM.apply(r, z, w); p.set(z); q.set(w); pq = dot(p, q); }
      else { M.apply(r, z); p.set(z); rz = dot(r, z); pq = applyA(p, q); }
      sinceProduct = 0;
    };
    restart();
    let it = 0;
    const hs = new Float64Array(CG_ERROR_DELAY);
    let errorEstimate = Infinity;
    while (it < maxIter) {
      if (!(rz > 0)) {
        if (!Number.isFinite(rz)) throw nonFiniteError(method, it, 'the preconditioned residual');
        if (rz < 0) {
          throw new RungsNumericalError(
            `cg: r·M⁻¹r = ${rz} < 0 at iteration ${it}: the preconditioner '${M.name}' is not positive definite`, 'linalg/cg');
        }
        return finish(t, it, rel, 'breakdown', false,
          `cg: the preconditioned residual vanished while ||r||/||b|| = ${rel}; ${SINGULAR_HINT}`);
      }
      if (!(pq > 0)) {
        if (!Number.isFinite(pq)) throw nonFiniteError(method, it, 'p·Ap');
        if (pq < -1e-8 * infinityNorm(A) * dot(p, p)) {
          throw new RungsInputError(
            `cg: p·Ap = ${pq.toExponential(3)} < 0 at iteration ${it}: the matrix is not positive definite, which CG needs; ` +
              "check the sign of the operator, or use method 'gmres'",
            'linalg/cg',
          );
        }
        return finish(t, it, rel, 'breakdown', false,
          `cg: p·Ap vanished at iteration ${it} (a direction in the null space); ${SINGULAR_HINT}`);
      }
      const alpha = rz / pq;
      const rr = steps.update(alpha, p, q, x, r);
      // Ring buffer of the last d terms α_j r_j·z_j of the Hestenes–Stiefel error sum.
      // Summed afresh each step: a running sum would keep the round-off of the large early terms.
      hs[it % CG_ERROR_DELAY] = alpha * rz;
      it++;
      if (it >= CG_ERROR_DELAY) {
        let sum = 0;
        for (let j = 0; j < CG_ERROR_DELAY; j++) sum += hs[j];
        errorEstimate = Math.sqrt(sum);
      }
      rel = Math.sqrt(rr) / bNorm;
      if (!Number.isFinite(rel)) throw nonFiniteError(method, it, 'the residual');
      if (rel <= relTol) {
        // The recursion drifts from b − A x; accept only when the true residual agrees.
        rel = trueResidual(A, b, x, r) / bNorm;
        if (rel <= relTol) return { ...finish(t, it, rel, 'residual', true), energyErrorEstimate: errorEstimate };
        if (++replacements > MAX_RESIDUAL_REPLACEMENTS) {
          return finish(t, it, rel, 'stagnation', false,
            `cg: the true residual stays at ${rel.toExponential(2)} above relTol ${relTol}; ${SINGULAR_HINT}`);
        }
        restart();
        continue;
      }
      if (opts.stopWhen && opts.stopWhen({ iteration: it, relativeResidual: rel, x, energyErrorEstimate: errorEstimate })) {
        const s = finish(t, it, trueResidual(A, b, x, r) / bNorm, 'stopWhen', true);
        s.energyErrorEstimate = errorEstimate;
        return s;
      }
      if (stagnated(it, rel)) {
        rel = trueResidual(A, b, x, r) / bNorm;
        return finish(t, it, rel, 'stagnation', false,
          `cg: the residual stopped decreasing at ${rel.toExponential(2)} (relTol ${relTol}); ${SINGULAR_HINT}`);
      }
      if (it >= maxIter) break;
      let rzNew: number;
      if (fusedM) {
        rzNew = fusedM.apply(r, z, w);
        const beta = rzNew / rz;
        // q = A p by the recursion A(z + βp) = Az + βAp, refreshed by a true product now and then against drift.
        if (++sinceProduct < PRODUCT_REFRESH) pq = steps.direction(beta, z, w, p, q);
        else { nextDirection(beta, z, p); pq = applyA(p, q); sinceProduct = 0; }
      } else {
        M.apply(r, z);
        rzNew = dot(r, z);
        nextDirection(rzNew / rz, z, p);
        pq = applyA(p, q);
      }
      rz = rzNew;
    }
    rel = trueResidual(A, b, x, r) / bNorm;
    return finish(t, it, rel, 'maxIter', rel <= relTol,
      rel <= relTol ? undefined : `cg: not converged after ${it} iterations (||r||/||b|| = ${rel.toExponential(2)})`);
  };
  try {
    return iterate();
  } finally {
    if (x !== x0InOut) x0InOut.set(x);
    if (M.release) for (const v of taken) M.release(v);
  }
}

/** p = z + β p. */
function nextDirection(beta: number, z: Float64Array, p: Float64Array): void {
  const n = p.length;
  for (let i = 0; i < n; i++) p[i] = z[i] + beta * p[i];
}

function finish(
  t: { t0: number; method: string; M: string }, iterations: number, relativeResidual: number,
  stoppedBy: SolveStats['stoppedBy'], converged: boolean, message?: string,
): SolveStats {
  return solveStats(t.method, t.M, t.t0, iterations, relativeResidual, stoppedBy, converged, message);
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
