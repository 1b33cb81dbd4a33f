// Floors of one-axis studies with time. A temporal study refines Δt on a fixed mesh, so its errors tend to the
// spatial error of that mesh; a spatial study refines h at a fixed Δt, so its errors tend to the temporal error of
// that step. Either way the measured error is e = E + C x^r with a floor E > 0, the pairwise rates fall level by
// level and the study reports an order lower than the scheme's, a pitfall described by Nishikawa (2023,
// arXiv:2305.10331). The floor cancels in the differences d_i = e_i − e_{i+1} = C (x_i^r − x_{i+1}^r), which still
// converge at the order r: rates that fall while the differences converge on order, with a floor that is a
// significant share of the finest error, are the signature detected here. Thresholds are common practice, no source.
import { RungsInputError } from '../errors.ts';
import { DEFAULT_TOLERANCE } from './verdict.ts';

/** Four levels give three differences and two rates of differences: the fewest for a call that is checked twice. */
export const MIN_FLOOR_LEVELS = 4;
/** The floor must be at least this share of the finest error to be worth reporting. */
export const FLOOR_SHARE = 0.2;
/** Differences of noisy errors scatter more than the errors: their rates may depart from the expected order by this
 *  many tolerances. */
export const DIFFERENCE_TOLERANCE_FACTOR = 2;

export interface AxisFloor {
  /** The floor E of e = E + C x^r, extrapolated from the finest levels. */
  floor: number;
  /** The order r at which the differences of successive errors converge (mean of the two finest rates). */
  orderOfDifferences: number;
  /** First level (0-based) whose error is at most twice the floor (the floor is half of it or more), or null when
   *  no level has come that close yet. */
  from: number | null;
  /** E / e of the finest level. */
  share: number;
}

function checkInput(x: readonly number[], e: readonly number[], expected: number, tolerance: number): void {
  if (x.length !== e.length) throw new RungsInputError(`floor detection needs one step size per error; got ${x.length} and ${e.length}`, 'x');
  x.forEach((v, i) => {
    if (!(v > 0) || !Number.isFinite(v)) throw new RungsInputError(`step size at level ${i + 1} is ${v}; give positive sizes`, 'x');
    if (i > 0 && !(v < x[i - 1]!)) throw new RungsInputError(`step sizes must decrease from level to level (level ${i + 1})`, 'x');
  });
  e.forEach((v, i) => {
    if (!(v >= 0) || !Number.isFinite(v)) throw new RungsInputError(`error at level ${i + 1} is ${v}; errors must be finite and ≥ 0`, 'errors');
  });
  if (!Number.isFinite(expected)) throw new RungsInputError(`expected order ${expected} is not a number`, 'expected');
  if (!(tolerance > 0) || !Number.isFinite(tolerance)) throw new RungsInputError(`tolerance ${tolerance} must be a positive number`, 'tolerance');
}

/** Rate between two values at two sizes: ln(a/b) / ln(xa/xb). */
const rate = (a: number, b: number, xa: number, xb: number): number => Math.log(a / b) / Math.log(xa / xb);

const DIFFERENCE_RATE_MAX = 50;

/**
 * The order r with d0 / d1 = (x0^r − x1^r) / (x1^r − x2^r), the ratio of successive differences of E + C x^r. With
 * a = x0/x1 and b = x1/x2 its logarithm is r ln b + ln(a^r − 1) − ln(b^r − 1), strictly increasing in r (its slope
 * is ln a + ln a/(a^r − 1) − ln b/(b^r − 1) ≥ min(ln a, (ln a + ln b)/2) > 0, since u/(e^u − 1) is convex with slope
 * in [−1/2, 0); algebra), so bisection finds it; for a constant ratio a = b it is ln(d0/d1) / ln a. Returns
 * −Infinity or Infinity when no r in (0, 50] matches.
 */
function differenceRate(d0: number, d1: number, x0: number, x1: number, x2: number): number {
  const la = Math.log(x0 / x1), lb = Math.log(x1 / x2);
  const target = Math.log(d0 / d1);
  const logRatio = (r: number): number => r * lb + Math.log(Math.expm1(r * la)) - Math.log(Math.expm1(r * lb));
  // As r → 0 the ratio tends to ln a / ln b: a smaller ratio of differences has no positive order.
  if (!(target > Math.log(la / lb))) return -Infinity;
  let lo = 0, hi = DIFFERENCE_RATE_MAX;
  if (logRatio(hi) < target) return Infinity;
  for (let k = 0; k < 200 && hi - lo > 1e-13 * hi; k++) {
    const mid = (lo + hi) / 2;
    if (logRatio(mid) < target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Detect an error floor in a one-axis series e_i at sizes x_i (decreasing): null unless all of
 * - at least MIN_FLOOR_LEVELS levels (with three levels there is one rate of differences and nothing to check it
 *   against, so no confident call: null);
 * - the errors decrease and the pairwise rates over the finest three intervals fall level by level;
 * - the two finest rates of the differences (differenceRate: any refinement ratios) lie within
 *   DIFFERENCE_TOLERANCE_FACTOR × tolerance of the expected order;
 * - the floor E = e_n − C x_n^r (C from the finest difference) is at least FLOOR_SHARE of the finest error.
 */
export function detectAxisFloor(x: readonly number[], e: readonly number[], expected: number, tolerance = DEFAULT_TOLERANCE): AxisFloor | null {
  checkInput(x, e, expected, tolerance);
  const n = e.length;
  if (n < MIN_FLOOR_LEVELS) return null;
  const d: number[] = [];
  for (let i = 0; i + 1 < n; i++) d.push(e[i]! - e[i + 1]!);
  if (!d.every((v) => v > 0)) return null;

  const rates: number[] = [];
  for (let i = n - 4; i + 1 < n; i++) rates.push(rate(e[i]!, e[i + 1]!, x[i]!, x[i + 1]!));
  if (!(rates[0]! > rates[1]! && rates[1]! > rates[2]!)) return null;

  const r0 = differenceRate(d[n - 4]!, d[n - 3]!, x[n - 4]!, x[n - 3]!, x[n - 2]!);
  const r1 = differenceRate(d[n - 3]!, d[n - 2]!, x[n - 3]!, x[n - 2]!, x[n - 1]!);
  const band = DIFFERENCE_TOLERANCE_FACTOR * tolerance;
  if (!(Math.abs(r0 - expected) <= band && Math.abs(r1 - expected) <= band)) return null;
  const r = (r0 + r1) / 2;

  // d_{n-2} = C (x_{n-2}^r − x_{n-1}^r) gives C, and the finest error less C x_{n-1}^r is the floor.
  const xa = x[n - 2]! ** r, xb = x[n - 1]! ** r;
  const floor = e[n - 1]! - (d[n - 2]! * xb) / (xa - xb);
  const share = floor / e[n - 1]!;
  if (!(share >= FLOOR_SHARE)) return null;
  const at = e.findIndex((v) => floor >= v / 2);
  return { floor, orderOfDifferences: r, from: at < 0 ? null : at, share };
}

const sci = (v: number): string => v.toExponential(1);

/**
 * The reason in words for a floor found by detectAxisFloor. `axis` is the one the study refines: 'dt' (a temporal
 * study on a fixed mesh: the floor is that mesh's spatial error; `n` names the mesh) or 'h' (a spatial study at a fixed
 * step: the floor is that step's temporal error; `steps` names the step count). Levels are named 1-based.
 */
export function axisFloorReason(axis: 'dt' | 'h', f: AxisFloor, context: { n?: number; steps?: number } = {}): string {
  const where = f.from === null
    ? `a floor of ${sci(f.floor)} (${Math.round(100 * f.share)}% of the finest error)`
    : `a floor of ${sci(f.floor)} from level ${f.from + 1}`;
  const order = f.orderOfDifferences.toFixed(1);
  if (axis === 'dt') {
    const mesh = context.n === undefined ? 'the fixed mesh' : `the fixed mesh (n = ${context.n})`;
    return `the errors approach ${where}: the spatial error of ${mesh} — the temporal order ${order} of the ` +
      'differences of successive errors is on order; refine the mesh or stop Δt earlier';
  }
  const step = context.steps === undefined ? 'the fixed time step' : `the fixed time step (${context.steps} steps)`;
  return `the errors approach ${where}: the temporal error of ${step} limits the spatial study — the spatial ` +
    `order ${order} of the differences of successive errors is on order; take more steps`;
}
