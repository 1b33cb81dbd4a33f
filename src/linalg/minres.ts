/** Preconditioned MINRES for symmetric, possibly indefinite, possibly singular but consistent systems A x = b with a
 *  symmetric positive definite preconditioner M. Paige & Saunders (1975), SIAM J. Numer. Anal. 12, 617–629; the
 *  recurrences are those of Saunders' reference implementation (SOL minres, preconditioned Lanczos + QR by Givens
 *  rotations), as also given by Elman, Silvester & Wathen (2014), Finite Elements and Fast Iterative Solvers, 2nd ed.,
 *  Algorithm 4.1 (numbering from memory).
 *
 *  What it tracks and stops on: the M⁻¹-norm of the residual, ||r||_{M⁻¹} = √(rᵀ M⁻¹ r), which MINRES minimises over
 *  the Krylov space; relTol is relative to ||b||_{M⁻¹} (so, as with CG's ||b||, the initial guess does not move the
 *  target). stats.relativeResidual is this relative M⁻¹-norm, recomputed from the true residual b − A x whenever
 *  the recursion claims convergence or the solve ends; when the two disagree the Lanczos process restarts from the
 *  current iterate (at most MAX_RESIDUAL_REPLACEMENTS times).
 *
 *  Singular consistent systems: every Lanczos vector lies in range(A) when b does, so, in exact arithmetic, x − x0
 *  stays in M⁻¹·range(A): from x0 = 0 the result is the solution that is M-orthogonal to null(A) (with M = I the
 *  minimum-norm, pseudo-inverse solution; Choi, Paige & Saunders 2011, SIAM J. Sci. Comput. 33, MINRES-QLP, §1–2,
 *  from memory). An inconsistent system makes the residual stall at its least-squares value: stoppedBy 'stagnation'.
 *
 *  Memory: nine vectors of length n, taken once per solve (or from a MinresWorkspace the caller keeps for many
 *  solves); the iteration swaps references and allocates nothing (Hot loops, DEVELOPERS.md: fresh memory is slow). */
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { assertFiniteMatrix, isSymmetric, spmv } from './csr.ts';
import { CG_SYMMETRY_TOL } from './cg.ts';
import {
  SINGULAR_HINT, defaultMaxIter, identityPreconditioner, isAllZero, nonFiniteError, solveStats, stagnationWatch,
  DEFAULT_REL_TOL,
} from './iteration-control.ts';
import type { Csr, Preconditioner, SolveOptions, SolveStats } from './types.ts';
import { allFinite, dot } from './vector.ts';

/** A symmetric linear operator y = A x given as a function (a block matrix applied block by block). */
export interface SymmetricOperator {
  n: number;
  /** y = A x; writes every entry of y, allocates nothing. */
  apply(x: Float64Array, y: Float64Array): void;
}

/** The vectors one MINRES solve works in; keep one to solve many right-hand sides without fresh memory. */
export interface MinresWorkspace {
  n: number;
  vectors: Float64Array[];
}

export interface MinresOptions extends SolveOptions {
  /** Vectors to work in (from minresWorkspace(n)); fresh ones when absent. */
  workspace?: MinresWorkspace;
}

/** Vectors one solve works in (the length of MinresWorkspace.vectors). */
export const MINRES_VECTORS = 8;
const VECTORS = MINRES_VECTORS;
/** How often the recursively updated residual may be replaced by the true one when they disagree at the end. */
const MAX_RESIDUAL_REPLACEMENTS = 3;
/** ||A r|| / (||A|| ||r||) at or below this, with ||r|| still above relTol: r lies numerically in the null space
 *  (inconsistent, or conditioned beyond 1e8). On a singular diagonal test matrix the ratio fell to 5e-9 at the step
 *  the Krylov space was exhausted and rose again afterwards, as the lost orthogonality let the recursion run on
 *  noise (x then grew to 1e13): the test must catch that step. */
const INCONSISTENT_TOL = 1e-8;
/** A Lanczos β (or the rotated γ) at or below this fraction of ||T||: the Krylov space is exhausted (round-off). */
const EXHAUSTED_TOL = 1e-14;

export function minresWorkspace(n: number): MinresWorkspace {
  const vectors: Float64Array[] = [];
  for (let i = 0; i < VECTORS; i++) vectors.push(new Float64Array(n));
  return { n, vectors };
}

const isCsr = (A: Csr | SymmetricOperator): A is Csr => (A as Csr).rowPtr !== undefined;

/** Solves A x = b; x0InOut is the initial guess and receives the solution. A is a symmetric CSR matrix (checked
 *  unless skipSymmetryCheck) or a SymmetricOperator (trusted). Does not throw on non-convergence: stats.converged
 *  tells, with stoppedBy and a message. Throws RungsInputError for bad input and a non-symmetric matrix,
 *  RungsNumericalError when the preconditioner is found not positive definite or NaN/Inf appears. */
export function minres(
  A: Csr | SymmetricOperator, b: Float64Array, x0InOut: Float64Array, opts: MinresOptions = {},
): SolveStats {
  const t0 = performance.now();
  const method = 'minres';
  const where = 'linalg/minres';
  const n = isCsr(A) ? A.nRows : A.n;
  if (isCsr(A) && A.nRows !== A.nCols) {
    throw new RungsInputError(`minres: the matrix is ${A.nRows}×${A.nCols}; a square symmetric matrix is needed`, where);
  }
  if (b.length !== n) throw new RungsInputError(`minres: the right-hand side b has length ${b.length}, expected ${n}`, where);
  if (x0InOut.length !== n) throw new RungsInputError(`minres: the initial guess x has length ${x0InOut.length}, expected ${n}`, where);
  if (!allFinite(b)) throw new RungsInputError('minres: the right-hand side holds NaN or Inf; check the load vector', where);
  if (!allFinite(x0InOut)) throw new RungsInputError('minres: the initial guess holds NaN or Inf', where);
  const relTol = opts.relTol ?? DEFAULT_REL_TOL;
  if (!(relTol > 0 && relTol < 1)) throw new RungsInputError(`minres: relTol must lie in (0, 1), got ${relTol}`, where);
  const maxIter = opts.maxIter ?? defaultMaxIter(n);
  if (!(Number.isInteger(maxIter) && maxIter >= 1)) {
    throw new RungsInputError(`minres: maxIter must be a positive integer, got ${maxIter}`, where);
  }
  if (isCsr(A) && !opts.skipSymmetryCheck && !isSymmetric(A, CG_SYMMETRY_TOL)) {
    assertFiniteMatrix(A, where);
    throw new RungsInputError(
      "minres: the matrix is not symmetric, and MINRES needs a symmetric matrix; use method 'gmres' or 'bicgstab'", where);
  }
  const ws = opts.workspace ?? minresWorkspace(n);
  if (ws.n !== n || ws.vectors.length < VECTORS) {
    throw new RungsInputError(`minres: the workspace is for n = ${ws.n}, the system has n = ${n}`, where);
  }
  const M: Preconditioner = opts.preconditioner ?? identityPreconditioner;
  const applyA = isCsr(A) ? (v: Float64Array, out: Float64Array): void => spmv(A, v, out) : A.apply.bind(A);
  const x = x0InOut;
  const t = { t0, M: M.name };
  const [va, vb, vc, v, wa, wb, wc, z] = ws.vectors;
  let r1 = va, r2 = vb, y = vc;

  /** r = b − A x and y = M⁻¹ r; returns rᵀ M⁻¹ r. */
  const preconditionedResidual = (r: Float64Array, out: Float64Array): number => {
    applyA(x, r);
    for (let i = 0; i < n; i++) r[i] = b[i] - r[i];
    M.apply(r, out);
    return dot(r, out);
  };
  const checkedSqrt = (rz: number, it: number, what: string): number => {
    if (!Number.isFinite(rz)) throw nonFiniteError(method, it, what);
    if (rz < 0) {
      throw new RungsNumericalError(
        `minres: rᵀM⁻¹r = ${rz} < 0 at iteration ${it}: the preconditioner '${M.name}' is not positive definite, ` +
          'which MINRES needs', where);
    }
    return Math.sqrt(rz);
  };

  // ||b||_{M⁻¹}: the scale of relTol. From x0 = 0 it is the first Lanczos β, otherwise one more preconditioner apply.
  const startsAtZero = isAllZero(x);
  let bNormM: number;
  if (startsAtZero) {
    r1.set(b);
    M.apply(r1, y);
    bNormM = checkedSqrt(dot(r1, y), 0, 'the preconditioned right-hand side');
  } else {
    M.apply(b, z);
    bNormM = checkedSqrt(dot(b, z), 0, 'the preconditioned right-hand side');
  }
  if (bNormM === 0) {
    x.fill(0);
    return solveStats(method, t.M, t0, 0, 0, 'residual', true);
  }
  let beta1 = startsAtZero ? bNormM : checkedSqrt(preconditionedResidual(r1, y), 0, 'the initial residual');
  let rel = beta1 / bNormM;
  if (rel <= relTol) return solveStats(method, t.M, t0, 0, rel, 'residual', true);

  const stagnated = stagnationWatch();
  let it = 0;
  let replacements = 0;
  const finishTrue = (stoppedBy: SolveStats['stoppedBy'], converged: boolean, message?: string): SolveStats => {
    rel = checkedSqrt(preconditionedResidual(r1, y), it, 'the final residual') / bNormM;
    return solveStats(method, t.M, t0, it, rel, stoppedBy, converged, message);
  };

  // Outer loop: one Lanczos process from the current residual (r1, y = M⁻¹ r1, β₁); again after a replacement.
  for (;;) {
    r2.set(r1);
    let oldb = 0, beta = beta1, dbar = 0, epsln = 0, phibar = beta1, cs = -1, sn = 0, tnorm2 = 0;
    let w = wa, w1 = wb, w2 = wc; // search directions w_k, w_{k−1}, w_{k−2}
    w.fill(0); w1.fill(0); w2.fill(0);
    let inner = 0;
    let checkTrue = false;
    while (it < maxIter) {
      // Lanczos step: v = y/β, then the next (unpreconditioned) vector r2 and y = M⁻¹ r2.
      const s = 1 / beta;
      for (let i = 0; i < n; i++) v[i] = s * y[i];
      applyA(v, y);
      // y −= (β/β_old) r1 and α = v·y in one pass (the same operations in the same order as two loops).
      let alfa = 0;
      if (inner >= 1) {
        const c = beta / oldb;
        for (let i = 0; i < n; i++) { const yi = y[i] - c * r1[i]; y[i] = yi; alfa += v[i] * yi; }
      } else {
        alfa = dot(v, y);
      }
      if (!Number.isFinite(alfa)) throw nonFiniteError(method, it, 'vᵀAv');
      const c2 = alfa / beta;
      for (let i = 0; i < n; i++) y[i] -= c2 * r2[i];
      // r1 ← r2, r2 ← y, and y takes the free buffer: references swap, nothing is copied.
      const free = r1;
      r1 = r2; r2 = y; y = free;
      M.apply(r2, y);
      oldb = beta;
      beta = checkedSqrt(dot(r2, y), it, 'the Lanczos vector');
      tnorm2 += alfa * alfa + oldb * oldb + beta * beta;
      const aNorm = Math.sqrt(tnorm2);
      // Givens rotation of the new column of the tridiagonal matrix (Paige & Saunders 1975, §5).
      const oldeps = epsln;
      const delta = cs * dbar + sn * alfa;
      const gbar = sn * dbar - cs * alfa;
      epsln = sn * beta;
      dbar = -cs * beta;
      const gamma = Math.hypot(gbar, beta);
      // ||A r||/(||A|| ||r||) of the current iterate is hypot(γ̄, d̄)/||T|| (SOL minres's test 2, with ||A|| estimated
      // by the Frobenius norm of the Lanczos matrix). Small while ||r|| is not: r lies in the null space, the system
      // is inconsistent; stop before the iterate grows without bound (Choi, Paige & Saunders 2011, §1, from memory).
      // A vanishing γ (β = 0 = γ̄: the Krylov space exhausted inside the null space) is the same case.
      if (Math.hypot(gbar, dbar) <= INCONSISTENT_TOL * aNorm || !(gamma > EXHAUSTED_TOL * aNorm)) {
        return finishTrue('stagnation', false,
          `minres: the system is singular and inconsistent (after ${it} iterations the residual, at ` +
            `${rel.toExponential(2)} of ||b||, lies in the null space of the matrix: ||A r|| ≈ 0), or conditioned beyond ` +
            `1e8; x is a least-squares solution; ${SINGULAR_HINT}`);
      }
      it++;
      inner++;
      cs = gbar / gamma;
      sn = beta / gamma;
      const phi = cs * phibar;
      phibar = sn * phibar;
      // w_new = (v − ε w_{k−2} − δ w_{k−1}) / γ, written into the buffer of the oldest direction.
      const inv = 1 / gamma;
      const wNew = w2;
      for (let i = 0; i < n; i++) {
        const wi = (v[i] - oldeps * w1[i] - delta * w[i]) * inv;
        wNew[i] = wi;
        x[i] += phi * wi;
      }
      w2 = w1; w1 = w; w = wNew;
      rel = Math.abs(phibar) / bNormM;
      if (!Number.isFinite(rel)) throw nonFiniteError(method, it, 'the residual estimate');
      if (rel <= relTol) { checkTrue = true; break; }
      if (opts.stopWhen && opts.stopWhen({ iteration: it, relativeResidual: rel, x })) return finishTrue('stopWhen', true);
      if (stagnated(it, rel)) {
        return finishTrue('stagnation', false,
          `minres: the residual stopped decreasing at ${rel.toExponential(2)} (relTol ${relTol}); ${SINGULAR_HINT}`);
      }
      // Lanczos ended (an invariant subspace) short of relTol: the next vector would be noise; check the true
      // residual and start afresh from x (the recursion may have lost the last digits).
      if (!(beta > EXHAUSTED_TOL * aNorm)) { checkTrue = true; break; }
    }
    if (!checkTrue) {
      const s = finishTrue('maxIter', false);
      s.converged = s.relativeResidual <= relTol;
      if (!s.converged) s.message = `minres: not converged after ${it} iterations (||r||_M⁻¹/||b||_M⁻¹ = ${s.relativeResidual.toExponential(2)})`;
      return s;
    }
    // The recursion drifts from b − A x; accept only when the true residual agrees, else restart from x.
    const trueRel = checkedSqrt(preconditionedResidual(r1, y), it, 'the residual') / bNormM;
    rel = trueRel;
    if (trueRel <= relTol) return solveStats(method, t.M, t0, it, trueRel, 'residual', true);
    if (++replacements > MAX_RESIDUAL_REPLACEMENTS || it >= maxIter) {
      return solveStats(method, t.M, t0, it, trueRel, replacements > MAX_RESIDUAL_REPLACEMENTS ? 'stagnation' : 'maxIter', false,
        `minres: the true residual stays at ${trueRel.toExponential(2)} above relTol ${relTol}; ${SINGULAR_HINT}`);
    }
    beta1 = trueRel * bNormM;
  }
}
