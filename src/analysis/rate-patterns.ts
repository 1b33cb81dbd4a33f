// Shapes of a rate sequence that explain a verdict in words (common practice, no source): rates climbing to
// the expected order from a pre-asymptotic start, rates that reach the order and then fall away, and rates
// that settle at the wrong order.

const fixed2 = (x: number): string => x.toFixed(2);
export const rateList = (rates: readonly number[]): string => rates.map(fixed2).join(', ');

/** Rates rise (or fall) monotonically — within half a tolerance of slack — from off-order toward `expected`. */
export function preAsymptoticDirection(
  rates: readonly number[],
  expected: number,
  tolerance: number,
): 'rising' | 'falling' | null {
  if (rates.length < 2) return null;
  const first = rates[0]!;
  const last = rates[rates.length - 1]!;
  const slack = tolerance / 2;
  let rising = first < expected - tolerance && last <= expected + tolerance && last - first > tolerance;
  let falling = first > expected + tolerance && last >= expected - tolerance && first - last > tolerance;
  for (let j = 1; j < rates.length; j++) {
    if (rates[j]! < rates[j - 1]! - slack) rising = false;
    if (rates[j]! > rates[j - 1]! + slack) falling = false;
  }
  return rising ? 'rising' : falling ? 'falling' : null;
}

/**
 * Rates that reached the expected order and then fell below it on the finest levels: returns the rates from
 * the peak on, or null.
 */
export function fallingAway(rates: readonly number[], expected: number, tolerance: number): number[] | null {
  if (rates.length < 2) return null;
  // The peak is the last rate (before the finest) within half a tolerance of the largest one, so a plateau
  // at the expected order is quoted by its end only.
  let top = -Infinity;
  for (let j = 0; j < rates.length - 1; j++) top = Math.max(top, rates[j]!);
  let peak = 0;
  for (let j = 0; j < rates.length - 1; j++) if (rates[j]! >= top - tolerance / 2) peak = j;
  const last = rates[rates.length - 1]!;
  if (!(rates[peak]! >= expected - tolerance && last < expected - tolerance && rates[peak]! - last > tolerance)) {
    return null;
  }
  for (let j = peak + 1; j < rates.length; j++) if (rates[j]! > rates[j - 1]! + tolerance / 2) return null;
  return rates.slice(peak);
}
