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
