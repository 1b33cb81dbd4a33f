import type { CellKind } from '../../mesh/types.ts';

/** A continuous Lagrange element: data plus one evaluator.
 *  Local dofs are ordered: vertices, then edges (k-1 per edge, from the edge's first local vertex to its second),
 *  then interior nodes. In 1D the cell's interior nodes come after the two vertices. */
export interface LagrangeElement {
  cell: CellKind;
  family: 'P' | 'Q';
  degree: number;
  dim: number;
  nDofs: number;
  /** nDofs * dim reference node coordinates. */
  nodes: Float64Array;
  /** Local vertex pairs of each edge (2D/3D cells), in local dof order. */
  edges: number[][];
  /** Dofs per vertex (1), per edge (k-1 in 2D/3D), per cell interior. */
  perEdge: number;
  perInterior: number;
  /** Local dofs that lie on each facet (vertices + edge dofs of that facet), per local facet index. */
  facetDofs: number[][];
  /** Local vertex indices of each facet. */
  facetVertices: number[][];
  /** Fill values[p*nDofs + i] = φ_i(ξ_p) and grads[(p*nDofs + i)*dim + d] = ∂φ_i/∂ξ_d (ξ_p) for nPoints points. */
  tabulate(points: Float64Array, nPoints: number, values: Float64Array, grads: Float64Array): void;
}
