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
