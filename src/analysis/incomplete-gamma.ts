// Regularized incomplete gamma functions P(a, x) and Q(a, x) = 1 - P(a, x), by the power series for x < a + 1
// and the continued fraction otherwise (A&S 1964 eqs. 6.5.29 and 6.5.31; the split and the modified Lentz
// evaluation as in Press, Teukolsky, Vetterling & Flannery, Numerical Recipes, 3rd ed. 2007, section 6.2).
import { logGamma } from './log-gamma.ts';

const EPS = Number.EPSILON;
const TINY = 1e-300;
const MAX_TERMS = 100_000;

function lowerSeries(a: number, x: number): number {
  let term = 1 / a;
  let sum = term;
  for (let n = 1; n < MAX_TERMS; n++) {
    term *= x / (a + n);
    sum += term;
    if (Math.abs(term) < Math.abs(sum) * EPS) break;
  }
  return sum * Math.exp(-x + a * Math.log(x) - logGamma(a));
}

function upperContinuedFraction(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < MAX_TERMS; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return Math.exp(-x + a * Math.log(x) - logGamma(a)) * h;
}

/** P(a, x) = γ(a, x) / Γ(a). */
export function regularizedGammaP(a: number, x: number): number {
  if (!(a > 0) || !(x >= 0)) return Number.NaN;
  if (x === 0) return 0;
  return x < a + 1 ? lowerSeries(a, x) : 1 - upperContinuedFraction(a, x);
}

/** Q(a, x) = Γ(a, x) / Γ(a), computed directly (not as 1 - P) so small tails keep their digits. */
export function regularizedGammaQ(a: number, x: number): number {
  if (!(a > 0) || !(x >= 0)) return Number.NaN;
  if (x === 0) return 1;
  return x < a + 1 ? 1 - lowerSeries(a, x) : upperContinuedFraction(a, x);
}

/** Complementary error function, erfc(x) = Q(1/2, x²) for x ≥ 0 (A&S 6.5.17 with 7.1.2). */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return Number.NaN;
  return x >= 0 ? regularizedGammaQ(0.5, x * x) : 2 - regularizedGammaQ(0.5, x * x);
}
