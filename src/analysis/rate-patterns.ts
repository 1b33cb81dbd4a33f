// Shapes of a sequence of pairwise rates, so that a verdict can say what the rates do: approach the expected order
// (pre-asymptotic), fall away from it, stop at a constant, stay flat, settle at another order, drift, or scatter.
// The thresholds are ours (common practice, no source); each is named where it is defined.

const fixed2 = (x: number): string => x.toFixed(2);
export const rateList = (rates: readonly number[]): string => rates.map(fixed2).join(', ');

/** A rate at or below this in size means the error has stopped decreasing (the floors' stall rate, floors.ts). */
export const STALL_RATE = 0.3;
/** A pre-asymptotic approach closes at least this fraction of the first rate's distance to the expected order
 *  (rates that merely rise, −0.15 → −0.03 against 2, do not approach it). */
export const APPROACH_CLOSURE = 0.5;

export type RateShape =
  /** Every rate near zero: the error never decreased. */
  | { kind: 'flat'; rates: number[] }
  /** Rates that were well above zero end in a run near zero: the error stopped at a constant. */
  | { kind: 'stopped'; rates: number[] }
  /** Monotone toward the expected order, closing at least half the gap: the coarse levels are pre-asymptotic. */
  | { kind: 'approaching'; direction: 'rising' | 'falling'; rates: number[] }
  /** Falling from the peak to below the band: the error stalls. `rates` starts at the peak. */
  | { kind: 'falling-away'; rates: number[] }
  /** The finest rates agree within the tolerance: settled at `mean`. */
  | { kind: 'stable'; mean: number; rates: number[] }
  /** Monotone, but not toward the expected order (or not enough of the way). */
  | { kind: 'drifting'; direction: 'rising' | 'falling'; rates: number[] }
  /** No trend and a spread above the tolerance: jitter (perturbed meshes, noisy errors). */
  | { kind: 'scattered'; rates: number[] }
  | { kind: 'none'; rates: number[] };

/** Whether the rates never fall (or rise) by more than `slack` from one pair to the next. */
function monotone(rates: readonly number[], direction: 'rising' | 'falling', slack: number): boolean {
  for (let j = 1; j < rates.length; j++) {
    const step = rates[j]! - rates[j - 1]!;
    if (direction === 'rising' ? step < -slack : step > slack) return false;
  }
  return true;
}

/** Rates rise (or fall) monotonically — within half a tolerance of slack — from outside the band toward
 *  `expected`, changing by more than the tolerance and closing at least APPROACH_CLOSURE of the gap. */
export function approachDirection(rates: readonly number[], expected: number, tolerance: number): 'rising' | 'falling' | null {
  if (rates.length < 2) return null;
  const first = rates[0]!;
  const last = rates[rates.length - 1]!;
  const gap0 = Math.abs(first - expected);
  const closes = Math.abs(last - expected) <= (1 - APPROACH_CLOSURE) * gap0 && Math.abs(last - first) > tolerance;
  if (!closes) return null;
  if (first < expected - tolerance && last <= expected + tolerance && monotone(rates, 'rising', tolerance / 2)) return 'rising';
  if (first > expected + tolerance && last >= expected - tolerance && monotone(rates, 'falling', tolerance / 2)) return 'falling';
  return null;
}

/**
 * Rates that fall, from their peak on, to below the band expected ± tolerance: returns the rates from the peak, or
 * null. The fall must exceed the tolerance; a single step must be a clear one (the last rate below expected − 2 ×
 * tolerance and a drop above twice the tolerance, from a peak no higher than the band), so that one jittered pair
 * is not read as a trend.
 */
export function fallingAway(rates: readonly number[], expected: number, tolerance: number): number[] | null {
  if (rates.length < 2) return null;
  // The peak is the last rate (before the finest) within half a tolerance of the largest one, so a plateau
  // at the expected order is quoted by its end only.
  let top = -Infinity;
  for (let j = 0; j < rates.length - 1; j++) top = Math.max(top, rates[j]!);
  let peak = 0;
  for (let j = 0; j < rates.length - 1; j++) if (rates[j]! >= top - tolerance / 2) peak = j;
  const tail = rates.slice(peak);
  // One step from above the band to below it swings across the expected order: scatter, not a fall
  // (2.60, 1.45 against 2).
  if (tail.length === 2 && tail[0]! > expected + tolerance) return null;
  const last = tail[tail.length - 1]!;
  const drop = tail[0]! - last;
  if (!(last < expected - tolerance && drop > tolerance && monotone(tail, 'falling', tolerance / 2))) return null;
  if (tail.length === 2 && !(last < expected - 2 * tolerance && drop > 2 * tolerance)) return null;
  return tail;
}

/** The shape of the usable rates (coarse to fine) against the expected order. */
export function rateShape(rates: readonly number[], expected: number, tolerance: number): RateShape {
  const all = [...rates];
  if (all.length === 0) return { kind: 'none', rates: all };
  const near0 = (r: number) => Math.abs(r) <= STALL_RATE;
  // Only meaningful when the expected order is clearly above the stall rate.
  if (expected - tolerance > STALL_RATE) {
    if (all.every(near0)) return { kind: 'flat', rates: all };
    let k = all.length;
    while (k > 0 && near0(all[k - 1]!)) k--;
    if (k < all.length && all[k - 1]! > STALL_RATE + tolerance) return { kind: 'stopped', rates: all.slice(k - 1) };
  }
  const direction = approachDirection(all, expected, tolerance);
  if (direction) return { kind: 'approaching', direction, rates: all };
  // The finest run that agrees within the tolerance (the asymptotic range, asymptotic-range.ts).
  let lo = Infinity;
  let hi = -Infinity;
  let from = all.length;
  while (from > 0) {
    const r = all[from - 1]!;
    if (Math.max(hi, r) - Math.min(lo, r) > tolerance) break;
    lo = Math.min(lo, r);
    hi = Math.max(hi, r);
    from--;
  }
  const run = all.slice(from);
  // Rates that reached the order and then fell are falling away; rates that only settle lower (2.16, 2.06, 2.01,
  // 2.00 against 3) are stable at their lower order.
  const fallen = fallingAway(all, expected, tolerance);
  if (fallen && (fallen[0]! >= expected - tolerance || run.length < 2)) return { kind: 'falling-away', rates: fallen };
  if (run.length >= 2 || all.length === 1) {
    return { kind: 'stable', mean: run.reduce((a, b) => a + b, 0) / run.length, rates: run };
  }
  for (const d of ['rising', 'falling'] as const) {
    if (monotone(all, d, tolerance / 2) && Math.abs(all[all.length - 1]! - all[0]!) > tolerance) return { kind: 'drifting', direction: d, rates: all };
  }
  return { kind: 'scattered', rates: all };
}
