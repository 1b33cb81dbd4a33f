import type { Mesh } from '../../mesh/types.ts';
import type { LagrangeElement } from '../element/types.ts';

/** A continuous Lagrange space on a mesh: the global dof of every local dof of every cell. */
export interface FunctionSpace {
  mesh: Mesh;
  element: LagrangeElement;
  nDofs: number;
  /** nCells * element.nDofs global dof indices. */
  cellDofs: Int32Array;
  /** nDofs * dim physical coordinates of each dof's node. */
  dofCoords: Float64Array;
  /** Number of distinct edges (0 in 1D). */
  nEdges: number;
}
