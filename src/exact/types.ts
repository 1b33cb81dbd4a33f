/** Spatial dimension of a manufactured solution. */
export type Dim = 1 | 2 | 3;

/** A scalar field. Coordinates beyond the dimension are ignored (pass 0). */
export type ScalarFn = (x: number, y: number, z: number) => number;

/** A vector field: writes its `dim` components into out[0 .. dim-1] (out is reused by the caller, never kept). */
export type VectorFn = (x: number, y: number, z: number, out: Float64Array) => void;
/** Writes ∇u(x, y, z) to out and returns u(x, y, z). */
export type ValueGradFn = (x: number, y: number, z: number, out: Float64Array) => number;

/** Normal flux k ∇u·n at a point, n the outward unit normal (components beyond the dimension are ignored). */
export type FluxFn = (x: number, y: number, z: number, nx: number, ny: number, nz: number) => number;

/** Axis-aligned box, one [low, high] pair per coordinate. */
export type BoundingBox = ReadonlyArray<readonly [number, number]>;

/** The formulas behind a solution, as text for reports. */
export interface ManufacturedFormulas {
  u: string;
  grad: string[];
  f: string;
  k: string;
  b: string[];
  c: string;
}

/** An exact solution of −∇·(k∇u) + b·∇u + c·u = f together with its data, ready to evaluate point by point. */
export interface ManufacturedSolution {
  dim: Dim;
  /** Where it came from: formula strings (derived symbolically) or user functions (checked by finite differences). */
  origin: 'formulas' | 'functions';
  u: ScalarFn;
  grad: VectorFn;
  /** u and ∇u in one call with shared sub-expressions (formulas only; the error integration uses it). */
  valueAndGrad?: ValueGradFn;
  f: ScalarFn;
  k: ScalarFn;
  b: VectorFn;
  c: ScalarFn;
  /** k ∇u·n with n the outward normal: Neumann data. */
  flux: FluxFn;
  /** Formula text; for user functions the entries say so. */
  formulas: ManufacturedFormulas;
  /** Total degree of u when u is a polynomial, else null (also null when unknown). */
  polynomialDegree: number | null;
  /** Total degree of k when k is a polynomial (0 for a constant), else null: helps pick a quadrature. */
  kDegreeHint: number | null;
  /** Total degree of f when f is a polynomial, else null: helps pick a quadrature for the load vector. */
  fDegreeHint: number | null;
}
