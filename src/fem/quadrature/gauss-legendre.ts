import { RungsNumericalError } from '../../errors.ts';
import { checkPointCount } from './check-count.ts';

/** Largest point count accepted; Newton on the three-term recurrence stays accurate well beyond this. */
export const MAX_GAUSS_POINTS = 4096;

/**
 * Gauss–Legendre nodes (ascending) and weights on [-1, 1] for any n >= 1.
 * Nodes: Newton's method on P_n from the Bonnet three-term recurrence (Abramowitz & Stegun 1964, §22.7),
 * started from Tricomi's (1950) asymptotic guess cos(π(4k-1)/(4n+2)) (1 - 1/(8n²) + 1/(8n³)), as used by
 * Hale & Townsend (2013, SIAM J. Sci. Comput. 35). Weights: 2 / ((1 - x²) P'_n(x)²) (A&S 1964, 25.4.29).
 * Only the non-negative half is computed; the rule is symmetric about 0.
 */
export function gaussLegendre(n: number): { points: Float64Array; weights: Float64Array } {
  checkPointCount(n, 'gaussLegendre(n)', MAX_GAUSS_POINTS);
  const points = new Float64Array(n);
  const weights = new Float64Array(n);
  const half = Math.floor(n / 2);
  const shrink = 1 - 1 / (8 * n * n) + 1 / (8 * n * n * n);
  for (let k = 1; k <= half; k++) {
    // k-th largest root
    let x = shrink * Math.cos((Math.PI * (4 * k - 1)) / (4 * n + 2));
    let converged = false;
    for (let iter = 0; iter < 100 && !converged; iter++) {
      const { p, dp } = legendreWithDerivative(n, x);
      const dx = p / dp;
      x -= dx;
      // quadratic convergence: a step this small means x is at round-off level
      converged = Math.abs(dx) <= 1e-15;
    }
    if (!converged) {
      throw new RungsNumericalError(`gaussLegendre(${n}): Newton iteration did not converge for root ${k}`, 'gaussLegendre');
    }
    const dP = legendreWithDerivative(n, x).dp;
    const w = 2 / ((1 - x * x) * dP * dP);
    points[n - k] = x;
    points[k - 1] = -x;
    weights[n - k] = w;
    weights[k - 1] = w;
  }
  if (n % 2 === 1) {
    const mid = half;
    points[mid] = 0;
    const { dp } = legendreWithDerivative(n, 0);
    weights[mid] = 2 / (dp * dp);
  }
  return { points, weights };
}

/** P_n(x) and P_n'(x) by the Bonnet recurrence (n+1)P_{n+1} = (2n+1)x P_n - n P_{n-1}, and the derivative
 *  identity (x² - 1) P_n' = n (x P_n - P_{n-1}) (Abramowitz & Stegun 1964, §22.7 and §22.8); |x| < 1. */
function legendreWithDerivative(n: number, x: number): { p: number; dp: number } {
  let pPrev = 1;
  let p = x;
  for (let j = 1; j < n; j++) {
    const pNext = ((2 * j + 1) * x * p - j * pPrev) / (j + 1);
    pPrev = p;
    p = pNext;
  }
  const dp = (n * (x * p - pPrev)) / (x * x - 1);
  return { p, dp };
}
