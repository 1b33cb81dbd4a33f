import type { CellKind } from '../../mesh/types.ts';

/** A continuous Lagrange element: data plus one evaluator. It declares its dofs per mesh entity (one per vertex,
 *  perEdge per edge, perFace per face of a 3D cell, perInterior inside), so that one dof map serves every element.
 *  Local dofs are ordered: vertices, then edges (k-1 per edge, from the edge's first local vertex to its second),
 *  then faces (3D cells; in the order of `faces`), then interior nodes. In 1D the cell's interior nodes come after
 *  the two vertices. */
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
  /** Local vertex lists of each 2D face of a 3D cell, in local dof order ([] for 1D and 2D cells). */
  faces: number[][];
  /** Dofs inside each face of a 3D cell (0 in 1D/2D; at most 1, so that no orientation is needed). */
  perFace: number;
  perInterior: number;
  /** Local dofs that lie on each facet (vertices + edge dofs + face dofs of that facet), per local facet index. */
  facetDofs: number[][];
  /** Local vertex indices of each facet. */
  facetVertices: number[][];
  /** Fill values[p*nDofs + i] = φ_i(ξ_p) and grads[(p*nDofs + i)*dim + d] = ∂φ_i/∂ξ_d (ξ_p) for nPoints points. */
  tabulate(points: Float64Array, nPoints: number, values: Float64Array, grads: Float64Array): void;
}
