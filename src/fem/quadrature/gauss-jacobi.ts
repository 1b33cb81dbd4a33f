import { RungsInputError, RungsNumericalError } from '../../errors.ts';
import { checkPointCount } from './check-count.ts';
import { MAX_GAUSS_POINTS } from './gauss-legendre.ts';

/**
 * Gauss–Jacobi nodes (ascending) and weights on [-1, 1] for the weight (1 - x)^alpha, alpha > -1:
 * sum_i w_i f(x_i) = ∫ (1-x)^alpha f(x) dx exactly for polynomials f of degree <= 2n - 1.
 * Nodes: Newton's method with polynomial deflation on P_n^(alpha,0), started from Chebyshev points
 * averaged with the previous root (Karniadakis & Sherwin 2005, Appendix B), sorted, then one Newton
 * step without deflation to remove the deflation round-off.
 * Weights: w_i = 2^(a+b+1) Γ(n+a+1) Γ(n+b+1) / (Γ(n+a+b+1) n!) / ((1 - x_i²) P_n'(x_i)²)
 * (Abramowitz & Stegun 1964, §25.4; Karniadakis & Sherwin 2005, Appendix B); with b = 0 the Gamma
 * factors cancel and w_i = 2^(alpha+1) / ((1 - x_i²) P_n'(x_i)²).
 */
export function gaussJacobi(n: number, alpha: number): { points: Float64Array; weights: Float64Array } {
  checkPointCount(n, 'gaussJacobi(n, alpha)', MAX_GAUSS_POINTS);
  if (!Number.isFinite(alpha) || alpha <= -1) {
    throw new RungsInputError(
      `gaussJacobi(n, alpha): alpha must be a finite number greater than -1 (so that (1-x)^alpha is integrable), got ${String(alpha)}`,
      'gaussJacobi',
    );
  }
  const points = new Float64Array(n);
  const weights = new Float64Array(n);
  const scratch = new Float64Array(2);
  for (let k = 0; k < n; k++) {
    let r = -Math.cos(((2 * k + 1) * Math.PI) / (2 * n));
    if (k > 0) r = 0.5 * (r + points[k - 1]!);
    let converged = false;
    for (let iter = 0; iter < 200 && !converged; iter++) {
      jacobiWithDerivative(n, alpha, r, scratch);
      const p = scratch[0]!;
      const dp = scratch[1]!;
      let deflation = 0;
      for (let i = 0; i < k; i++) deflation += 1 / (r - points[i]!);
      const dr = -p / (dp - deflation * p);
      r += dr;
      converged = Math.abs(dr) <= 1e-15;
    }
    if (!converged) {
      throw new RungsNumericalError(`gaussJacobi(${n}, ${alpha}): Newton iteration did not converge for root ${k}`, 'gaussJacobi');
    }
    points[k] = r;
  }
  // deflation finds every root once but, for larger alpha, not always in ascending order
  points.sort();
  const scale = Math.pow(2, alpha + 1);
  for (let k = 0; k < n; k++) {
    let r = points[k]!;
    jacobiWithDerivative(n, alpha, r, scratch);
    r -= scratch[0]! / scratch[1]!;
    jacobiWithDerivative(n, alpha, r, scratch);
    const dp = scratch[1]!;
    points[k] = r;
    weights[k] = scale / ((1 - r * r) * dp * dp);
  }
  for (let k = 1; k < n; k++) {
    if (!(points[k]! > points[k - 1]!)) {
      throw new RungsNumericalError(`gaussJacobi(${n}, ${alpha}): roots not distinct and ascending`, 'gaussJacobi');
    }
  }
  return { points, weights };
}

/**
 * P_n^(a,0)(x) and its derivative into out[0], out[1], by the three-term recurrence
 * 2(j+1)(j+a+1)(2j+a) P_{j+1} = (2j+a+1)[(2j+a+2)(2j+a) x + a²] P_j - 2(j+a) j (2j+a+2) P_{j-1}
 * (Abramowitz & Stegun 1964, §22.7, Jacobi case with b = 0), differentiated term by term.
 */
function jacobiWithDerivative(n: number, a: number, x: number, out: Float64Array): void {
  let pPrev = 1;
  let dPrev = 0;
  let p = 0.5 * ((a + 2) * x + a);
  let d = 0.5 * (a + 2);
  for (let j = 1; j < n; j++) {
    const s = 2 * j + a;
    const c0 = 2 * (j + 1) * (j + a + 1) * s;
    const c1 = (s + 1) * (s + 2) * s;
    const c2 = (s + 1) * a * a;
    const c3 = 2 * (j + a) * j * (s + 2);
    const pNext = ((c1 * x + c2) * p - c3 * pPrev) / c0;
    const dNext = ((c1 * x + c2) * d + c1 * p - c3 * dPrev) / c0;
    pPrev = p;
    p = pNext;
    dPrev = d;
    d = dNext;
  }
  out[0] = p;
  out[1] = d;
}
