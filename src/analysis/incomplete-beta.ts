// Regularized incomplete beta function I_x(a, b) by its continued fraction (A&S 1964 eq. 26.5.8), evaluated
// with the modified Lentz method and the symmetry I_x(a, b) = 1 - I_{1-x}(b, a) (A&S 26.5.2) as in
// Press et al., Numerical Recipes, 3rd ed. 2007, section 6.4.
import { logGamma } from './log-gamma.ts';

const EPS = Number.EPSILON;
const TINY = 1e-300;
const MAX_TERMS = 100_000;

function continuedFraction(a: number, b: number, x: number): number {
  const qab = a + b;
  const qap = a + 1;
  const qam = a - 1;
  let c = 1;
  let d = 1 - (qab * x) / qap;
  if (Math.abs(d) < TINY) d = TINY;
  d = 1 / d;
  let h = d;
  for (let m = 1; m < MAX_TERMS; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((qam + m2) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (qab + m) * x) / ((a + m2) * (qap + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < TINY) d = TINY;
    c = 1 + aa / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < EPS) break;
  }
  return h;
}

/**
 * I_x(a, b) for a, b > 0 and 0 ≤ x ≤ 1. `oneMinusX` may be passed when 1 - x is known more accurately than
 * the subtraction gives (for example t²/(ν + t²) in the Student-t tail).
 */
export function regularizedIncompleteBeta(x: number, a: number, b: number, oneMinusX = 1 - x): number {
  if (!(a > 0) || !(b > 0) || !(x >= 0) || !(x <= 1)) return Number.NaN;
  if (x === 0) return 0;
  if (oneMinusX === 0) return 1;
  const logFront =
    logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(oneMinusX);
  const front = Math.exp(logFront);
  // The fraction converges fast for x < (a+1)/(a+b+2); on the other side use the symmetry.
  if (x < (a + 1) / (a + b + 2)) return (front * continuedFraction(a, b, x)) / a;
  return 1 - (front * continuedFraction(b, a, oneMinusX)) / b;
}
