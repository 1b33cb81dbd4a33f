export type Verdict = 'on-order' | 'below-order' | 'above-order' | 'exact' | 'inconclusive';

/** Least-squares fit of ln e = a + p ln h (or ln e = a + s ln N, reported as p = -d s). */
export interface OrderFit {
  order: number;
  /** Standard error of the order; NaN with only two points. */
  stderr: number;
  /** Two-sided 95% Student-t confidence interval; [-inf, inf] with two points. */
  ciLow: number;
  ciHigh: number;
  /** Level indices (0-based) used in the fit. */
  levels: number[];
  /** Intercept of ln e against ln h (constant C in e = C h^p). */
  logConstant: number;
}

/** One series of errors to be analysed: one norm, or one quantity's error. */
export interface SeriesInput {
  name: string;
  /** Mesh size per level, decreasing; or null to fit in dofs. */
  h: number[] | null;
  dofs: number[];
  /** Spatial dimension, used for rates in dofs (p = -d * slope). */
  dim: number;
  errors: number[];
  /** Expected order, or null when none is known. */
  expected: number | null;
  /** Allowed |p - expected| (default 0.1). */
  tolerance: number;
  /** How many of the finest usable levels to fit (default 3). */
  fitWindow: number;
  /** Per level: a lower bound on the error that the solver or arithmetic can resolve
   *  (for example the algebraic error estimate); errors at or below a few times this are floors. */
  floorHint?: (number | null)[];
  /** Per level: the magnitude of the exact solution in this norm, for round-off detection. */
  scale?: number[];
}

export interface SeriesAnalysis {
  name: string;
  expected: number | null;
  tolerance: number;
  /** Pairwise rates; rates[i] is between level i-1 and i; rates[0] is null. */
  rates: (number | null)[];
  fit: OrderFit | null;
  /** First level index from which errors sit on a floor, or null. */
  floorFrom: number | null;
  floorKind: 'round-off' | 'solver' | null;
  /** Coarsest level of the asymptotic range (finest levels whose rates agree within the tolerance), or null.
   *  Optional so that hand-built analyses (fixtures, older JSON) stay valid; analyseSeries always sets it. */
  asymptoticFrom?: number | null;
  verdict: Verdict;
  /** Reasons in words, most important first. */
  reasons: string[];
  warnings: string[];
}
