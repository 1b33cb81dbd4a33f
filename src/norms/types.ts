import type { ScalarFn } from '../fem/assemble/types.ts';
export type { DiscreteField } from '../fem/field/types.ts';

export interface ExactSolution {
  u: (x: number, y: number, z: number) => number;
  grad: (x: number, y: number, z: number, out: Float64Array) => void;
  /** Optional u and ∇u in one call (same values as u and grad), used when present. */
  valueAndGrad?: (x: number, y: number, z: number, out: Float64Array) => number;
}

export interface NormValues {
  L2: number;
  H1semi: number;
  H1: number;
  energy: number;
  maxNodal: number;
}

/** An exact field with any number of components, for systems: value writes out[0..nc), grad writes
 *  out[i*dim + d] = ∂u_i/∂x_d (row-major, component i). A scalar field is the case nc = 1. */
export interface ExactField {
  components: number;
  value(x: number, y: number, z: number, out: Float64Array): void;
  grad(x: number, y: number, z: number, out: Float64Array): void;
}

export interface ErrorOptions {
  /** Conductivity and reaction for the energy norm sqrt(∫ k|∇e|² + c e²). */
  k?: ScalarFn;
  c?: ScalarFn;
  /** Quadrature degree of the error integrals (default errorRuleDegree: 2·degree + 2 on simplices, + 4 on
   *  quadrilaterals and hexahedra). */
  degree?: number;
  /** Integrate over every stride-th cell only and scale up: an estimate for tolerances, not for reporting. */
  cellStride?: number;
  /** Where the error lives: filled with each cell's share of the first field's (the discrete solution's) squared
   *  norms; see PerCellErrors. Refused together with cellStride > 1. */
  perCell?: PerCellErrors;
}

/**
 * Error densities per cell, given by the caller (length mesh.nCells each) and filled by the error integration for
 * the first field only: L2[c] = ∫_K |e|² and H1semi[c] = ∫_K |∇e|² over cell K = c, e = u − u_h, with the same
 * quadrature as the totals. These are the SQUARED contributions (no square root): summed over the cells they give
 * L2² and H1semi² of the totals (to round-off; the totals are summed in their own order and keep their bits).
 * For fields with components (fieldErrors) the sums run over the components as in the totals; for a mean-free field
 * L2[c] is ∫_K |e − ē|² of the second pass (ē the mean error over the domain), H1semi[c] is unaffected by the mean.
 */
export interface PerCellErrors {
  L2: Float64Array;
  H1semi: Float64Array;
}
