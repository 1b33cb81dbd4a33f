import type { SeriesAnalysis, TimeAxis, TwoAxisAnalysis, Verdict } from '../analysis/types.ts';
import type { SolveStats } from '../linalg/types.ts';
import type { QuantityReport } from '../analysis/quantities.ts';
import type { EncodedErrorMap } from '../mesh/raster.ts';

export type NormName = 'L2' | 'H1semi' | 'H1' | 'energy' | 'maxNodal';

export interface LevelResult {
  /** 0-based level index. */
  index: number;
  /** Ladder parameter (cells per unit side), or null when given by h. */
  n: number | null;
  h: number;
  /** Studies with time: the number of equal time steps over [0, T] and their size Δt = T/steps. */
  steps?: number;
  dt?: number;
  dofs: number;
  cells: number;
  /** Error per norm name (or quantity name). */
  errors: Record<string, number>;
  /** Same norms for u - I_h u (nodal interpolant), when computed. */
  interpolationErrors?: Record<string, number>;
  /** ||u-u_h||_E / ||u-I_h u||_E, symmetric problems only. */
  quasiOptimality?: number | null;
  solver?: SolveStats | null;
  /** The algebraic error of the solve, tied to the discretization error: the CG estimate of ||U* − U||_A, the
   *  target it had to reach (fraction × the interpolation error) and the bound it implies on each norm's floor. */
  algebraic?: { estimate: number; target: number; fraction: number; floors: Record<string, number> } | null;
  /** Wall seconds per phase: mesh, assemble, solve, errors, total. */
  seconds: Record<string, number>;
  /** Quantities of interest reported for this level (external solvers). */
  quantities?: Record<string, number>;
  /** The errors in each boundary strip and the interior (src/mesh/regions.ts), when measured per cell. */
  regions?: import('../mesh/regions.ts').RegionErrors;
  /** The finest two levels' meshes and errors per cell, taken off the row as soon as it arrives (src/study/where.ts). */
  cellErrors?: import('./where.ts').LevelCellErrors;
  /** The finest level's error maps, moved to StudyResult.errorMaps when the study completes. */
  maps?: ErrorMapEntry[];
  /** Peak resident set size in bytes while this level ran, when measured. */
  peakRssBytes?: number;
}

/** A map of where the error lives on one level, for the report (src/mesh/raster.ts makes and encodes it).
 *  'density': per cell sqrt(∫_K e² / |K|) of the norm's integrand (e = u − u_h for L2, ∇(u − u_h) for H1semi), drawn
 *  on level `level` (0-based). 'local-order': per cell of level `level` the local observed order of the norm from its
 *  error and its children's on level `level` + 1. */
export interface ErrorMapEntry {
  level: number;
  norm: string;
  what: 'density' | 'local-order';
  map: EncodedErrorMap;
  /** Local orders: their measure-weighted quantiles and the shares of the area off the expected order's band. */
  summary?: import('../analysis/local-orders.ts').LocalOrderSummary;
}

export interface StudyResult {
  study: string;
  file: string;
  description?: string;
  dim: number;
  /** What the study expects of its verdicts: 'pass' or a declared expected flaw. */
  expectation: { verdict: Verdict | 'pass'; flaw?: string };
  levels: LevelResult[];
  analyses: SeriesAnalysis[];
  /** Solution verification of each declared quantity (Richardson extrapolation, GCI). */
  quantities?: QuantityReport[];
  /** The verdicts match the expectation. */
  asExpected: boolean;
  warnings: string[];
  inputs: Record<string, unknown>;
  versions: Record<string, string>;
  startedAt: string;
  seconds: number;
  /** Studies with time: the final time, the stepper (built-in) or null (a code of its own), the axis the ladder
   *  refines, the expected temporal order and, for a coupled path, Δt = c·h^exponent. */
  time?: { final: number; stepper: string | null; axis: TimeAxis; order: number | null; coupled?: { c: number; exponent: number } };
  /** Where the error lives: per norm (L2, H1 seminorm of the first field), the order in each boundary strip and in
   *  the interior, and the reason that names the place (src/analysis/regions.ts). */
  where?: { norm: string; analysis: import('../analysis/regions.ts').RegionAnalysis }[];
  /** A two-axis (h, Δt) design: the joint fit e = C_h h^p + C_t Δt^q of every norm, with a verdict per order. */
  twoAxis?: TwoAxisAnalysis[];
  /** For a member of a sweep over a coefficient: the sweep's robustness verdict (the same for every member). */
  robustness?: import('./sweep.ts').SweepVerdict;
  /** Maps of where the error lives (the HTML report draws them in a section of their own). */
  errorMaps?: ErrorMapEntry[];
}
