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
  /** Per level: the error floor implied by what the code under test reported about its own solve (its relative
   *  residual times the size of u). A level on it is a failure of the setup, named as such, not a quiet floor. */
  setupFloor?: (number | null)[];
  /** What the norm measures, which decides what an order above the expected one means: 'global' (L2, H1
   *  seminorm, H1, energy: bounded by the best approximation), 'pointwise' (nodal values), 'other' (default). */
  normKind?: NormKind;
  /** The study accepts an order above the expected one in this series; the text is the study's reason. */
  allowAboveOrder?: string;
  /** The study accepts a verdict from a fit over fewer than three levels (or a window floors cut short); the text
   *  is the study's reason. */
  allowFewLevels?: string;
  /** What the ladder refines: 'h' (default) or 'dt' (a study with time refined in Δt on one mesh), which words the
   *  reasons for a consistent loss of order in terms of the time stepper. */
  axis?: 'h' | 'dt';
}

export type NormKind = 'global' | 'pointwise' | 'other';

export interface SeriesAnalysis {
  name: string;
  expected: number | null;
  tolerance: number;
  /** Pairwise rates; rates[i] is between level i-1 and i; rates[0] is null. */
  rates: (number | null)[];
  fit: OrderFit | null;
  /** First level index from which errors sit on a floor, or null. */
  floorFrom: number | null;
  /** 'solver': the built-in solver's own floor; 'setup': a floor the code under test reported (its residual). */
  floorKind: 'round-off' | 'solver' | 'setup' | null;
  /** Coarsest level of the asymptotic range (finest levels whose rates agree within the tolerance), or null.
   *  Optional so that hand-built analyses (fixtures, older JSON) stay valid; analyseSeries always sets it. */
  asymptoticFrom?: number | null;
  verdict: Verdict;
  /** Departures from the default rules the study declared for this series, with the study's reasons; an
   *  above-order verdict passes a plain study only when `aboveOrder` is set. */
  allowed?: { aboveOrder?: string; fewLevels?: string };
  /** Set to 'dt' for a series refined in Δt (SeriesInput.axis); absent for one refined in h. */
  axis?: 'dt';
  /** Reasons in words, most important first. */
  reasons: string[];
  warnings: string[];
}

/** How a study with time refines: 'h' (mesh refined at a fixed fine Δt: the spatial order), 'dt' (time step refined
 *  on a fixed fine mesh: the temporal order), 'coupled' (Δt = c·h^s on every rung: one fit in h), 'grid' (a two-axis
 *  design of (h, Δt) pairs fitted jointly as e = C_h h^p + C_t Δt^q). */
export type TimeAxis = 'h' | 'dt' | 'coupled' | 'grid';

/** The joint fit of e = C_h h^p + C_t Δt^q over a two-axis design: nonlinear least squares on ln e, so that every
 *  point weighs by its relative error (Kamm, Rider & Brock 2003, from memory). */
export interface TwoAxisFit {
  /** Spatial and temporal orders and their constants. */
  p: number;
  q: number;
  Ch: number;
  Ct: number;
  /** Two-sided 95% confidence intervals of p and q. */
  pInterval: [number, number];
  qInterval: [number, number];
  /** Residual standard deviation of ln e and its degrees of freedom (points − 4). */
  sigma: number;
  dof: number;
  /** Points (levels) fitted. */
  points: number;
  converged: boolean;
  /** Smallest and largest ratio C_t Δt^q / (C_h h^p) over the fitted points: how much each term weighs in the design
   *  (a term negligible at every point leaves its order unidentifiable). Optional: fits built by hand may omit it. */
  termRatio?: [number, number];
}

/** The verdict of one norm over a two-axis design: one per order, with reasons in words. */
export interface TwoAxisAnalysis {
  name: string;
  fit: TwoAxisFit | null;
  expected: { space: number | null; time: number | null };
  tolerance: number;
  verdict: { space: Verdict; time: Verdict };
  reasons: string[];
}
