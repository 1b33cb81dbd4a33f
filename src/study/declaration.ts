import type { Mesh } from '../mesh/types.ts';
import type { ScalarFn, VectorFn } from '../exact/types.ts';
import type { QuadratureDegrees } from '../fem/assemble/types.ts';
import type { DiscreteField } from '../norms/types.ts';
import type { SolveStats } from '../linalg/types.ts';
import type { Verdict } from '../analysis/types.ts';
import type { LevelContext } from './context.ts';
import type { ExternalDiscretization } from '../external/types.ts';
import type { PdeDeclaration } from '../equation/types.ts';
import type { TimeMethodName } from '../fem/time/methods.ts';

export type NormName = 'L2' | 'H1semi' | 'H1' | 'energy' | 'maxNodal';
export const NORM_NAMES: NormName[] = ['L2', 'H1semi', 'H1', 'energy', 'maxNodal'];

/** A domain: how to mesh it for a ladder parameter n (cells per unit length) and its boundary tags. */
export interface DomainSpec {
  kind: 'interval' | 'rectangle' | 'lshape' | 'box' | 'custom';
  dim: 1 | 2 | 3;
  /** Boundary tags the generated meshes carry. */
  tags: string[];
  /** Bounding box, for consistency checks of user functions. */
  bbox: [number, number][];
  /** Description for reports. */
  label: string;
  mesh(n: number): Mesh;
}

/** Exact solution given as functions (the escape hatch); rungs checks grad and f against finite differences of u. */
export interface ExactFunctions {
  u: ScalarFn;
  grad: VectorFn;
  /** Source term −∇·(k∇u) + b·∇u + c·u, checked against finite differences of u. */
  f: ScalarFn;
}

export type Coefficient = string | number;

/** Boundary tags per kind of condition. With a pde, a list applies to every field that takes boundary data (those
 *  whose equation has a flux) or every equation with a flux; a record gives them per field (dirichlet: { u: [...] })
 *  or per equation (neumann: { momentum: [...] }). */
export interface BoundaryDeclaration {
  dirichlet?: string[] | Record<string, string[]>;
  neumann?: string[] | Record<string, string[]>;
  robin?: { tags: string[] | Record<string, string[]>; alpha: Coefficient };
}

export interface SolverDeclaration {
  method?: 'auto' | 'cg' | 'gmres' | 'bicgstab' | 'direct';
  preconditioner?: 'auto' | 'none' | 'jacobi' | 'ssor' | 'ic0' | 'ilu0' | 'amg';
  relTol?: number;
  maxIter?: number;
  /** Stop when the algebraic error estimate is this fraction of the previous level's discretization error
   *  (default 1e-3); 0 switches the test off. */
  errorFraction?: number;
}

/** What a user's own discretization returns for one level. */
export interface LevelSolution {
  field: DiscreteField;
  solver?: SolveStats;
}

export interface LagrangeDiscretization {
  kind: 'lagrange';
  degree: number;
  /** Quadrature degree per term, to study under-integration on purpose. */
  quadrature?: QuadratureDegrees;
  label?: string;
}

export interface CustomDiscretization {
  kind: 'custom';
  label: string;
  /** Element degree, when the discretization has one (sets the error quadrature and derived orders). */
  degree?: number;
  solve(level: LevelContext): LevelSolution | Promise<LevelSolution>;
}

/** Built-in Lagrange, the user's own TypeScript solve(level), or an external solver run per level. */
export type Discretization = LagrangeDiscretization | CustomDiscretization | ExternalDiscretization;

export interface LadderDeclaration {
  /** Cells per unit length on each level, increasing (one value: a temporal ladder on a fixed mesh). */
  n: number[];
  /** Studies with time: equal time steps over [0, T] on each level, increasing (one value: a spatial ladder at a
   *  fixed time step). With several values of both n and steps, `grid: true` runs every (n, steps) pair and fits
   *  e = C_h h^p + C_t Δt^q jointly. */
  steps?: number[];
  /** Studies with time: the time steps themselves instead of `steps`, decreasing; each must divide T. */
  dt?: number[];
  /** Studies with time: a coupled path Δt = c·h^exponent (exponent p/q balances the two errors, so that one fit in
   *  h shows the spatial order); each level takes the smallest whole number of steps with Δt ≤ c·h^exponent. */
  coupled?: { c: number; exponent: number };
  /** Studies with time: every pair of n and steps, fitted jointly (a two-axis design). */
  grid?: boolean;
  /** Seeded random displacement of interior nodes by up to fraction × local h. */
  perturb?: { fraction: number; seed?: number };
  /** Levels used by `rungs check --quick` (the coarsest that still give a fit); default the first 3. */
  quick?: number;
}

export interface StudyDeclaration {
  name: string;
  description?: string;
  domain: DomainSpec;
  /** The PDE as data: its fields, coefficients and equations (a preset such as linearElasticity({ lambda, mu }) or
   *  your own). Without it the study solves −∇·(k∇u) + b·∇u + c·u = f with the `coefficients` below. */
  pde?: PdeDeclaration;
  /** The manufactured solution: a formula (one scalar field), formulas per field ({ u: [...], p: '...' }) with a
   *  pde, or functions; may be left out only by an external study that declares quantities instead. */
  exact?: string | Record<string, string | string[]> | ExactFunctions;
  coefficients?: { k?: Coefficient; b?: Coefficient[]; c?: Coefficient };
  boundary?: BoundaryDeclaration;
  discretization: Discretization;
  ladder: LadderDeclaration;
  /** A study with time: the final time T, and for rungs's own elements the stepper; the expected temporal order is
   *  the stepper's (backward Euler 1, Crank–Nicolson 2, BDF2 2, DIRK 3) or, for a code of its own, `order`. */
  time?: TimeDeclaration;
  /** Norms rungs measures (NormName), or for an external code the names of the errors it reports itself (each with
   *  its expected order in `expected`). */
  norms?: (NormName | (string & {}))[];
  /** Quantities of interest reported per level (external solvers); analysed by Richardson extrapolation and the
   *  grid convergence index from the three finest levels (Celik et al. 2008). */
  quantities?: string[];
  /** Expected order per norm; derived for Lagrange elements (L2: k+1, H1semi/H1/energy: k, maxNodal: k+1). */
  expected?: Partial<Record<NormName, number>> & Record<string, number>;
  /** Allowed |fitted − expected| (default 0.1). */
  tolerance?: number;
  /** Number of finest levels in the fit (default 3). */
  fitWindow?: number;
  /** Departures from the default verdict rules, per norm, each with the study's reason (quoted in the verdict):
   *  `aboveOrder` accepts an order above the expected one (nodal values, superconvergent points, functionals);
   *  `fewLevels` accepts a verdict from a fit over fewer than three levels, or a window floors cut short. */
  allow?: { aboveOrder?: Record<string, string>; fewLevels?: Record<string, string> };
  /** A demonstration of a flaw declares the verdict it must produce, like an expected failure in a test suite. */
  expect?: { verdict: Verdict; flaw?: string };
  solver?: SolverDeclaration;
  /** Relative tolerance of the baseline comparison of `rungs check` (default 0.05). */
  baselineTolerance?: number;
  /** Memory (MB = 2^20 bytes) one level may take; a level estimated above it is refused before it is meshed, and the
   *  other studies still run (default: the memory available when the level starts; see src/study/memory-budget.ts). */
  memoryBudgetMB?: number;
  /** Robustness in a parameter: the whole ladder is run for each value of one scalar coefficient (ordered toward its
   *  limit: λ → ∞, a Péclet number → ∞), each as a study of its own named `<name>-<coefficient>-<value>`, and rungs
   *  says whether the error constant e/h^p stays within `growth` (default 10) over the sweep (Babuška & Suri 1992).
   *  `expect: 'not-robust'` declares a demonstration of locking: then the sweep must find it, and the orders of the
   *  members are reported without deciding. */
  sweep?: SweepDeclaration;
  /** Set by rungs on each study a sweep expands into (not written by users). */
  sweepMember?: { group: string; coefficient: string; value: number; index: number; count: number; expect: 'robust' | 'not-robust'; growth: number };
}

export interface TimeDeclaration {
  /** The final time T > 0; the solution is measured at T (and over the time levels for Linf_L2, L2_H1). */
  final: number;
  /** rungs's own stepper: 'backward-euler', 'crank-nicolson', 'bdf2' (started by one Crank–Nicolson step) or
   *  'dirk3' (Alexander's three-stage L-stable DIRK). */
  stepper?: TimeMethodName;
  /** The expected order in time of an external or custom code's stepper (rungs's own: derived). */
  order?: number;
}

export interface SweepDeclaration {
  coefficient: string;
  values: number[];
  expect?: 'robust' | 'not-robust';
  growth?: number;
}

/** Declares a study; the default export of a *.study.ts file. Validation happens when rungs loads it. */
export function defineStudy(declaration: StudyDeclaration): StudyDeclaration {
  return declaration;
}

/** The built-in Lagrange discretization. */
export function lagrange(opts: { degree: number; quadrature?: QuadratureDegrees; label?: string }): LagrangeDiscretization {
  return { kind: 'lagrange', ...opts };
}

/** A user's own discretization: solve(level) returns a discrete field. */
export function custom(opts: Omit<CustomDiscretization, 'kind'>): CustomDiscretization {
  return { kind: 'custom', ...opts };
}
