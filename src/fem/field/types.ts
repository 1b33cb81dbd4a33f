import type { Mesh } from '../../mesh/types.ts';

/** A discrete solution that rungs can evaluate, with its physical gradient, at reference points of each cell.
 *  Built-in Lagrange fields implement it; a user's own discretization returns one of its own. */
export interface DiscreteField {
  mesh: Mesh;
  /** Number of unknowns of the discretization (reported as dofs). */
  nDofs: number;
  /** Polynomial degree, when meaningful (picks the error quadrature). */
  degree?: number;
  /** Fill values[p] and grads[p*dim + d] at nPoints reference points of cell c. The same points array is passed
   *  for every cell of one integration, so implementations may cache work keyed on it. */
  evaluate(c: number, refPoints: Float64Array, nPoints: number, values: Float64Array, grads: Float64Array): void;
  /** Nodal values and their coordinates (nNodes*dim), for the largest nodal error. */
  nodes?: { coords: Float64Array; values: Float64Array };
}
