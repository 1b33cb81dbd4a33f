import type { Mesh } from '../../mesh/types.ts';

/** A discrete solution that rungs can evaluate, with its physical gradient, at reference points of each cell.
 *  Built-in Lagrange fields implement it; a user's own discretization returns one of its own. */
export interface DiscreteField {
  mesh: Mesh;
  /** Number of unknowns of the discretization (reported as dofs). */
  nDofs: number;
  /** Polynomial degree, when meaningful (picks the error quadrature). */
  degree?: number;
  /** Number of components (1 for a scalar field, the dimension for a displacement or velocity). Default 1. */
  components?: number;
  /** Fill values[p*nc + i] and grads[(p*nc + i)*dim + d] (nc = components, i the component) at nPoints reference
   *  points of cell c; for a scalar field that is values[p] and grads[p*dim + d]. The same points array is passed
   *  for every cell of one integration, so implementations may cache work keyed on it. */
  evaluate(c: number, refPoints: Float64Array, nPoints: number, values: Float64Array, grads: Float64Array): void;
  /** Nodal values and their coordinates (nNodes*dim), for the largest nodal error (values: nNodes*nc, node-major). */
  nodes?: { coords: Float64Array; values: Float64Array };
}
