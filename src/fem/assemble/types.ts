/** Scalar field of position; unused coordinates are 0. */
export type ScalarFn = (x: number, y: number, z: number) => number;
/** Vector field of position written into out[0..dim). */
export type VectorFn = (x: number, y: number, z: number, out: Float64Array) => void;
/** Boundary data that may depend on the outward unit normal. */
export type FluxFn = (x: number, y: number, z: number, nx: number, ny: number, nz: number) => number;

/** Coefficients of −∇·(k∇u) + b·∇u + c·u = f. Absent terms are skipped. */
export interface FormCoefficients {
  k?: ScalarFn;
  b?: VectorFn;
  c?: ScalarFn;
  f?: ScalarFn;
  /** Polynomial degree of each coefficient, or null when it is not a polynomial (used to pick quadrature). */
  hints?: { k?: number | null; b?: number | null; c?: number | null; f?: number | null };
}

/** Boundary conditions on tagged facets. Neumann: k∇u·n = g. Robin: k∇u·n + α u = g. */
export interface BoundarySpec {
  dirichlet?: { tags: string[]; value: ScalarFn };
  neumann?: { tags: string[]; flux: FluxFn };
  robin?: { tags: string[]; alpha: ScalarFn; g: FluxFn };
}

export type Term = 'stiffness' | 'convection' | 'reaction' | 'load' | 'boundary';

/** Quadrature degree per term; anything not given is chosen from the element degree and the coefficient hints. */
export type QuadratureDegrees = Partial<Record<Term, number>>;
