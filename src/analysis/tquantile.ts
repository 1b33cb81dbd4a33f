// Two-sided Student-t quantiles t_{1-α/2, ν}. The two-sided tail is P(|T| > t) = I_x(ν/2, 1/2) with
// x = ν/(ν + t²) (Abramowitz & Stegun 1964, eq. 26.7.1 with 26.5.27); the quantile inverts it by safeguarded
// Newton steps from the Cornish–Fisher start of A&S eq. 26.7.5, with the incomplete beta evaluated as in
// Numerical Recipes (Press et al. 2007, section 6.4).
// Kept rather than a statistics library (measured against 40-digit mpmath roots): @stdlib/stats-base-dists-t-quantile
// 0.2.3 is accurate to 1.1e-15 relative (this code to 1e-14 for ν ≤ 60, the ν rungs's fits have, 1.3e-10 at ν = 1e5)
// but loads 410 modules in about 125 ms, paid by every `rungs run`, and installs 223 packages; jstat 1.9.6's studentt.inv
// is off by up to 5.7e-8; simple-statistics has no t quantile.
import { RungsInputError } from '../errors.ts';
import { regularizedIncompleteBeta } from './incomplete-beta.ts';
import { logGamma } from './log-gamma.ts';
import { normalUpperQuantile } from './normal-quantile.ts';

/** Above this the four-term expansion A&S 26.7.5 is exact to rounding (its next term is O(ν^-5)). */
const EXPANSION_FROM_NU = 1e5;

/** P(|T| > t) for Student's t with ν degrees of freedom (ν > 0, t ≥ 0). */
export function studentTTwoSidedTail(t: number, nu: number): number {
  if (!(nu > 0) || Number.isNaN(t)) return Number.NaN;
  const t2 = t * t;
  if (t2 === Infinity) return 0;
  // Pass both x and 1 - x so neither is formed by cancellation.
  return regularizedIncompleteBeta(nu / (nu + t2), nu / 2, 0.5, t2 / (nu + t2));
}

/** Density of Student's t with ν degrees of freedom. */
export function studentTDensity(t: number, nu: number): number {
  const logNorm = logGamma((nu + 1) / 2) - logGamma(nu / 2) - 0.5 * Math.log(nu * Math.PI);
  return Math.exp(logNorm - ((nu + 1) / 2) * Math.log1p((t * t) / nu));
}

/** A&S 26.7.5: t_p ≈ x + g1/ν + g2/ν² + g3/ν³ + g4/ν⁴ with x the normal quantile. */
function cornishFisherStart(z: number, nu: number): number {
  const z2 = z * z;
  const g1 = (z * (z2 + 1)) / 4;
  const g2 = (z * ((5 * z2 + 16) * z2 + 3)) / 96;
  const g3 = (z * (((3 * z2 + 19) * z2 + 17) * z2 - 15)) / 384;
  const g4 = (z * ((((79 * z2 + 776) * z2 + 1482) * z2 - 1920) * z2 - 945)) / 92160;
  return z + (g1 + (g2 + (g3 + g4 / nu) / nu) / nu) / nu;
}

/**
 * t with P(|T| > t) = alpha, i.e. the two-sided quantile t_{1-α/2, ν}; ν may be any real ≥ 1 or Infinity
 * (the normal quantile). alpha defaults to 0.05 (a 95% interval).
 */
export function tQuantileTwoSided(nu: number, alpha = 0.05): number {
  if (!(nu >= 1)) {
    throw new RungsInputError(`degrees of freedom must be a number ≥ 1, got ${nu}`, 'nu');
  }
  if (!(alpha > 0 && alpha < 1)) {
    throw new RungsInputError(`two-sided tail probability must lie strictly between 0 and 1, got ${alpha}`, 'alpha');
  }
  const z = normalUpperQuantile(alpha / 2);
  if (nu === Infinity) return z;
  const start = cornishFisherStart(z, nu);
  if (nu >= EXPANSION_FROM_NU) return start;

  // Bracket [lo, hi] with tail(lo) > alpha > tail(hi); the tail falls monotonically in t.
  let lo = 0;
  let hi = Math.max(start, 1);
  while (studentTTwoSidedTail(hi, nu) > alpha) {
    lo = hi;
    hi *= 2;
  }
  let t = start > lo && start < hi ? start : 0.5 * (lo + hi);
  const logAlpha = Math.log(alpha);
  // Newton on g(t) = ln tail(t) - ln α, g'(t) = -2 f(t) / tail(t); fall back to bisection when a step leaves
  // the bracket.
  for (let k = 0; k < 200; k++) {
    const tail = studentTTwoSidedTail(t, nu);
    if (tail > alpha) lo = t;
    else hi = t;
    const g = Math.log(tail) - logAlpha;
    const slope = (-2 * studentTDensity(t, nu)) / tail;
    let next = t - g / slope;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    const moved = Math.abs(next - t);
    t = next;
    if (moved <= 2 * Number.EPSILON * t || hi - lo <= 2 * Number.EPSILON * t) break;
  }
  return t;
}
