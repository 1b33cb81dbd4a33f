// The asymptotic range of a ladder: the finest levels over which the pairwise rate has settled (common
// practice, no source — the rates agree with each other within the tolerance).

export interface AsymptoticRange {
  /** Coarsest level of the range, or null when no rate is available. */
  from: number | null;
  /** The rates inside the range, coarse to fine (rates[i] joins levels i-1 and i). */
  rates: number[];
}

/**
 * Longest run of rates ending at level `last` whose spread (max - min) is at most `tolerance`. The run stops at
 * the first missing rate. A run of one rate spans two levels.
 */
export function asymptoticRange(
  rates: readonly (number | null)[],
  last: number,
  tolerance: number,
): AsymptoticRange {
  const run: number[] = [];
  let lo = Infinity;
  let hi = -Infinity;
  let from: number | null = null;
  for (let i = last; i >= 1; i--) {
    const r = rates[i];
    if (r === null || r === undefined) break;
    const nextLo = Math.min(lo, r);
    const nextHi = Math.max(hi, r);
    if (nextHi - nextLo > tolerance) break;
    lo = nextLo;
    hi = nextHi;
    run.unshift(r);
    from = i - 1;
  }
  return { from, rates: run };
}
