export type { DiscreteField } from '../fem/field/types.ts';

export interface ExactSolution {
  u: (x: number, y: number, z: number) => number;
  grad: (x: number, y: number, z: number, out: Float64Array) => void;
}

export interface NormValues {
  L2: number;
  H1semi: number;
  H1: number;
  energy: number;
  maxNodal: number;
}
