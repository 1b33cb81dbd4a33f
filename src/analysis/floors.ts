// Floors: levels whose error no longer measures the discretization because it sits at what the arithmetic
// (round-off) or the algebraic solver can resolve. The thresholds are common practice, no source.

/** 'solver': the floor of rungs's own solver (its algebraic error tied to the discretization error); 'setup': the
 *  floor a code under test reported about its own solve (its residual), which its setup must remove. */
export type FloorKind = 'round-off' | 'solver' | 'setup';

export interface FloorOptions {
  /** Round-off threshold is roundOffFactor · eps · sqrt(dofs) relative to the scale (default 1e3). */
  roundOffFactor?: number;
  /** An error ≤ hintFactor · floorHint is at the solver floor (default 3). */
  hintFactor?: number;
  /** A rate at or below this counts as "stopped falling" (default 0.3). */
  stallRate?: number;
  /** A stalled error within stallFactor of a floor (hint or round-off threshold) is on it (default 30). */
  stallFactor?: number;
}

export interface FloorDetection {
  /** First level of the trailing run of floor levels, or null. */
  from: number | null;
  kind: FloorKind | null;
  /** Per level: which floor it sits on, if any. */
  levels: (FloorKind | null)[];
}

const DEFAULTS: Required<FloorOptions> = { roundOffFactor: 1e3, hintFactor: 3, stallRate: 0.3, stallFactor: 30 };

/**
 * Relative error below which a level is at round-off. Round-off in an assembled and solved system grows with
 * its condition number, which grows with the number of unknowns; sqrt(N) is a deliberately mild growth so
 * that genuine small discretization errors are not mistaken for round-off.
 */
export function roundOffThreshold(dofs: number, factor = DEFAULTS.roundOffFactor): number {
  return factor * Number.EPSILON * Math.sqrt(Math.max(1, dofs));
}

/**
 * Classify each level, then report the trailing run of floor levels (a floor, once reached, persists; an
 * isolated coarse level that happens to be small is not a floor).
 * `scale` defaults to 1 per level (an exact solution of unit size).
 */
export function detectFloor(
  errors: readonly number[],
  dofs: readonly number[],
  rates: readonly (number | null)[],
  scale?: readonly number[],
  floorHint?: readonly (number | null)[],
  options: FloorOptions = {},
  setupFloor?: readonly (number | null)[],
): FloorDetection {
  const o = { ...DEFAULTS, ...options };
  const levels: (FloorKind | null)[] = errors.map((e, i) => {
    const relative = e / Math.abs(scale?.[i] ?? 1);
    const roundOff = roundOffThreshold(dofs[i]!, o.roundOffFactor);
    const rate = rates[i];
    const stalled = rate !== null && rate !== undefined && rate <= o.stallRate;
    if (relative <= roundOff || (stalled && relative <= o.stallFactor * roundOff)) return 'round-off';
    const near = (hint: number | null | undefined) =>
      hint !== null && hint !== undefined && hint > 0 && (e <= o.hintFactor * hint || (stalled && e <= o.stallFactor * hint));
    // rungs's own solver floor explains a level before the code under test is blamed for it.
    if (near(floorHint?.[i])) return 'solver';
    if (near(setupFloor?.[i])) return 'setup';
    return null;
  });
  let from: number | null = null;
  for (let i = levels.length - 1; i >= 0 && levels[i] !== null; i--) from = i;
  return { from, kind: from === null ? null : levels[from]!, levels };
}
