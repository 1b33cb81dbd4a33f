/** The pressure block of the saddle-point preconditioner: a fixed, symmetric positive definite approximation of
 *  M⁻¹ for the pressure mass matrix M.
 *
 *  'chebyshev' (default): k steps of the Chebyshev semi-iteration for M z = r with diagonal (Jacobi) scaling, from
 *  z = 0 (Wathen & Rees 2008, ETNA 34, 125–135: a fixed number of Chebyshev steps is a fixed linear operator, unlike
 *  CG to a tolerance, so it may precondition MINRES). The iteration is Saad (2003), Iterative Methods for Sparse
 *  Linear Systems, 2nd ed., Algorithm 12.1 (numbering from memory) on D⁻¹M with the eigenvalue interval [a, b].
 *  It computes z = p(D⁻¹M) D⁻¹ r = D^{-1/2} p(D^{-1/2} M D^{-1/2}) D^{-1/2} r, symmetric. With the residual polynomial
 *  q(λ) = 1 − λ p(λ) = T_k(ξ(λ)) / T_k(ξ(0)), ξ(λ) = (b + a − 2λ)/(b − a), positivity needs q(λ) < 1 on the spectrum:
 *  true for every λ in (0, b] (|q| ≤ 1/T_k(ξ(0)) on [a, b], and 0 < q < 1 on (0, a)), and above b for λ < a + b
 *  (then |ξ(λ)| < ξ(0)). So a may be overestimated freely; b is made to satisfy a + b > G, G Gershgorin's bound of
 *  λ_max(D⁻¹M), which keeps the operator SPD whatever the estimates.
 *  [a, b] come from Lanczos on D^{-1/2} M D^{-1/2} (Ritz values lie inside the spectrum; the largest is inflated
 *  by 5 %): for P1 triangles the exact interval is [1/2, 2] (Wathen 1987, IMA J. Numer. Anal. 7, 449–457), a
 *  condition number the semi-iteration reduces by (√κ−1)/(√κ+1) = 1/3 per step.
 *
 *  'diagonal': z = D⁻¹ r. Spectrally equivalent to M⁻¹ as well (Wathen 1987), cheaper per application, but the
 *  constants enter the MINRES count.
 *
 *  Measured (Taylor–Hood P2–P1, unit square, N×N squares, no-slip everywhere, random f and g, relTol 1e-8 on the
 *  preconditioned residual, default multigrid; 2 shared cores AMD EPYC; test/linalg/helpers/taylor-hood-grid.ts):
 *      N (velocity / pressure unknowns)   diagonal  chebyshev(2)  chebyshev(4)  chebyshev(8)
 *      8    (450 / 81)                        71          60            54            54
 *      16   (1922 / 289)                      82          64            57            57
 *      32   (7938 / 1089)                     85          65            57            57
 *      64   (32258 / 4225)                    85          67            58            59
 *      128  (130050 / 16641)                  83          65            57            57
 *  All stay flat; four steps reach what eight (and an exact velocity solve with twelve: 52 at N = 16) give, and
 *  cost less than the 45 % more iterations of the diagonal, whose each iteration includes a multigrid cycle. Hence
 *  the default chebyshev(4). With ν = 1e-2 (A scaled, viscosity: 1e-2) the counts are 52–60.
 *
 *  Nothing is allocated per application: the work vectors are taken once at setup. */
import { RungsInputError } from '../../errors.ts';
import { mulberry32 } from '../random.ts';
import type { Csr } from '../types.ts';

export type PressureMassSolve = 'chebyshev' | 'diagonal';
/** Chebyshev steps of the default pressure block (measured: see the table above). */
export const DEFAULT_CHEBYSHEV_STEPS = 4;
/** Lanczos steps for the interval of D⁻¹M; a mass matrix is well conditioned, so its extremes converge fast. */
const LANCZOS_STEPS = 30;
/** The largest Ritz value approaches λ_max from below; this factor covers the rest. */
const UPPER_INFLATION = 1.05;

export interface MassApproximation {
  /** 'chebyshev(k)' or 'diagonal'. */
  name: string;
  /** The interval [a, b] the Chebyshev steps work on (absent for 'diagonal'). */
  interval?: [number, number];
  /** z ≈ M⁻¹ r; r is not modified; allocates nothing. */
  apply(r: Float64Array, z: Float64Array): void;
}

const WHERE = 'linalg/saddle';

/** Diagonal of a square mass matrix, checked positive. */
function massDiagonal(M: Csr): Float64Array {
  const n = M.nRows;
  const d = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let k = M.rowPtr[i]; k < M.rowPtr[i + 1]; k++) if (M.colIdx[k] === i) d[i] += M.values[k];
    if (!(d[i] > 0 && Number.isFinite(d[i]))) {
      throw new RungsInputError(
        `saddle point: the pressure mass matrix M has diagonal entry ${i} = ${d[i]}; a mass matrix has a positive ` +
          'diagonal (give the matrix of ∫ q_i q_j over the pressure basis)', WHERE);
    }
  }
  return d;
}

export function pressureMassApproximation(M: Csr, kind: PressureMassSolve = 'chebyshev', steps = DEFAULT_CHEBYSHEV_STEPS): MassApproximation {
  const n = M.nRows;
  const d = massDiagonal(M);
  const invD = new Float64Array(n);
  for (let i = 0; i < n; i++) invD[i] = 1 / d[i];
  if (kind === 'diagonal') {
    return {
      name: 'diagonal',
      apply(r, z) { for (let i = 0; i < n; i++) z[i] = invD[i] * r[i]; },
    };
  }
  if (kind !== 'chebyshev') {
    throw new RungsInputError(`saddle point: pressureMass must be 'chebyshev' or 'diagonal', got '${String(kind)}'`, WHERE);
  }
  if (!(Number.isInteger(steps) && steps >= 1)) {
    throw new RungsInputError(`saddle point: chebyshevSteps must be a positive integer, got ${steps}`, WHERE);
  }
  const [a, b] = chebyshevInterval(M, d);
  const theta = (b + a) / 2, delta = (b - a) / 2, sigma1 = theta / delta;
  const res = new Float64Array(n);
  const dir = new Float64Array(n);
  const { rowPtr, colIdx, values } = M;
  return {
    name: `chebyshev(${steps})`,
    interval: [a, b],
    apply(r, z) {
      // Saad (2003) Alg. 12.1 from z = 0: res = r, dir = D⁻¹ r / θ.
      let rho = 1 / sigma1;
      for (let i = 0; i < n; i++) { res[i] = r[i]; dir[i] = invD[i] * r[i] / theta; z[i] = 0; }
      for (let k = 1; ; k++) {
        for (let i = 0; i < n; i++) z[i] += dir[i];
        if (k === steps) return;
        // res −= M dir (row by row: dir is not overwritten until the next loop).
        for (let i = 0; i < n; i++) {
          let s = 0;
          for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) s += values[p] * dir[colIdx[p]];
          res[i] -= s;
        }
        const rhoNew = 1 / (2 * sigma1 - rho);
        const c1 = rhoNew * rho, c2 = (2 * rhoNew) / delta;
        for (let i = 0; i < n; i++) dir[i] = c1 * dir[i] + c2 * invD[i] * res[i];
        rho = rhoNew;
      }
    },
  };
}

/** [a, b] ⊇-ish the spectrum of D⁻¹M (see the file comment for why the result is safe either way). */
export function chebyshevInterval(M: Csr, d: Float64Array): [number, number] {
  const n = M.nRows;
  const { rowPtr, colIdx, values } = M;
  // Gershgorin: λ_max(D⁻¹M) ≤ max_i Σ_j |m_ij| / m_ii.
  let gershgorin = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s += Math.abs(values[k]);
    gershgorin = Math.max(gershgorin, s / d[i]);
  }
  const [ritzMin, ritzMax] = lanczosExtremes(M, d);
  if (!(ritzMin > 0)) {
    throw new RungsInputError(
      `saddle point: the pressure mass matrix M is not positive definite (a Ritz value of D⁻¹M is ${ritzMin.toExponential(3)}); ` +
        'give the symmetric positive definite matrix of ∫ q_i q_j', WHERE);
  }
  let b = UPPER_INFLATION * ritzMax;
  if (!(ritzMin + b > gershgorin)) b = gershgorin;
  // A degenerate interval (M a multiple of its diagonal: Lanczos ends at once) is widened so that δ > 0.
  const a = Math.min(ritzMin, 0.99 * b);
  return [a, b];
}

/** Extreme Ritz values of D^{-1/2} M D^{-1/2} after at most LANCZOS_STEPS Lanczos steps from a seeded random start
 *  (Lanczos 1950; Saad 2003, §6.6), the tridiagonal's extremes found by Sturm-sequence bisection (Golub & Van Loan
 *  2013, Matrix Computations, 4th ed., §8.4.1, from memory). */
function lanczosExtremes(M: Csr, d: Float64Array): [number, number] {
  const n = M.nRows;
  const { rowPtr, colIdx, values } = M;
  const s = new Float64Array(n);
  for (let i = 0; i < n; i++) s[i] = 1 / Math.sqrt(d[i]);
  const rand = mulberry32(0x3a55);
  let v = new Float64Array(n), vPrev = new Float64Array(n), w = new Float64Array(n);
  let nrm = 0;
  for (let i = 0; i < n; i++) { v[i] = rand() - 0.5; nrm += v[i] * v[i]; }
  nrm = Math.sqrt(nrm);
  for (let i = 0; i < n; i++) v[i] /= nrm;
  const k = Math.min(LANCZOS_STEPS, n);
  const alpha: number[] = [], beta: number[] = [];
  let betaPrev = 0;
  for (let j = 0; j < k; j++) {
    let a = 0;
    for (let i = 0; i < n; i++) {
      let acc = 0;
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) acc += values[p] * s[colIdx[p]] * v[colIdx[p]];
      w[i] = s[i] * acc - betaPrev * vPrev[i];
      a += w[i] * v[i];
    }
    alpha.push(a);
    let bb = 0;
    for (let i = 0; i < n; i++) { w[i] -= a * v[i]; bb += w[i] * w[i]; }
    const bNext = Math.sqrt(bb);
    if (j === k - 1 || !(bNext > 1e-10 * Math.abs(a))) break;
    beta.push(bNext);
    for (let i = 0; i < n; i++) w[i] /= bNext;
    const t = vPrev; vPrev = v; v = w; w = t;
    betaPrev = bNext;
  }
  return tridiagonalExtremes(alpha, beta);
}

/** Smallest and largest eigenvalue of the symmetric tridiagonal matrix (diagonal alpha, off-diagonal beta). */
function tridiagonalExtremes(alpha: number[], beta: number[]): [number, number] {
  const m = alpha.length;
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < m; i++) {
    const r = (i > 0 ? Math.abs(beta[i - 1]) : 0) + (i < m - 1 ? Math.abs(beta[i]) : 0);
    lo = Math.min(lo, alpha[i] - r);
    hi = Math.max(hi, alpha[i] + r);
  }
  /** Number of eigenvalues below x (negative pivots of T − x I). */
  const below = (x: number): number => {
    let count = 0, q = 1;
    for (let i = 0; i < m; i++) {
      q = alpha[i] - x - (i > 0 ? (beta[i - 1] * beta[i - 1]) / q : 0);
      if (q === 0) q = 1e-300;
      if (q < 0) count++;
    }
    return count;
  };
  const bisect = (index: number): number => {
    let l = lo, h = hi;
    for (let it = 0; it < 200 && h - l > 1e-14 * Math.max(Math.abs(l), Math.abs(h), 1e-300); it++) {
      const mid = 0.5 * (l + h);
      if (below(mid) > index) h = mid; else l = mid;
    }
    return 0.5 * (l + h);
  };
  return [bisect(0), bisect(m - 1)];
}
