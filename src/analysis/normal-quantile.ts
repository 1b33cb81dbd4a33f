// Quantiles of the standard normal distribution: a rational starting value (Abramowitz & Stegun 1964,
// eq. 26.2.23, |error| < 4.5e-4) polished by Newton steps on ln Q(z), with Q(z) = erfc(z/√2)/2 (A&S 26.2.29).
import { erfc } from './incomplete-gamma.ts';

const SQRT_HALF = Math.SQRT1_2;
const INV_SQRT_TWO_PI = 1 / Math.sqrt(2 * Math.PI);

/** Upper tail Q(z) = P(Z > z) of the standard normal. */
export function normalUpperTail(z: number): number {
  return 0.5 * erfc(z * SQRT_HALF);
}

/** A&S 26.2.23: z with Q(z) = p for 0 < p ≤ 0.5. */
function rationalStart(p: number): number {
  const t = Math.sqrt(-2 * Math.log(p));
  const num = 2.515517 + t * (0.802853 + t * 0.010328);
  const den = 1 + t * (1.432788 + t * (0.189269 + t * 0.001308));
  return t - num / den;
}

/** z such that P(Z > z) = p, for 0 < p < 1. */
export function normalUpperQuantile(p: number): number {
  if (!(p > 0 && p < 1)) return Number.NaN;
  if (p > 0.5) return -normalUpperQuantile(1 - p);
  let z = rationalStart(p);
  const logP = Math.log(p);
  // Newton on g(z) = ln Q(z) - ln p, g'(z) = -φ(z)/Q(z); the start is within 4.5e-4, so a few steps reach
  // machine precision.
  for (let k = 0; k < 8; k++) {
    const q = normalUpperTail(z);
    const density = INV_SQRT_TWO_PI * Math.exp(-0.5 * z * z);
    const step = ((Math.log(q) - logP) * q) / density;
    z += step;
    if (Math.abs(step) <= 4 * Number.EPSILON * Math.max(1, Math.abs(z))) break;
  }
  return z;
}
