import type { Mesh } from '../../mesh/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';

/** A space of fields with `components` components, each in the same scalar Lagrange space (mesh, element,
 *  components). Unknowns are interleaved node by node: component i at scalar dof g is unknown g·components + i, so
 *  that the unknowns of one node form a block (the block size multigrid for systems works with). */
export interface VectorSpace {
  scalar: FunctionSpace;
  components: number;
  nDofs: number;
}

/** One field of a mixed space and where its unknowns start in the one global numbering. */
export interface MixedField {
  name: string;
  space: VectorSpace;
  /** First global unknown of this field; its unknowns are offset … offset + space.nDofs − 1. */
  offset: number;
  /** First local unknown of this field in a cell's local vector (local unknown a·components + i for scalar local
   *  dof a and component i). */
  localOffset: number;
  /** Local unknowns of this field per cell: element dofs × components. */
  nLocal: number;
}

/** A product of spaces on one mesh with one numbering: the fields one after another (velocity then pressure). */
export interface MixedSpace {
  mesh: Mesh;
  fields: MixedField[];
  nDofs: number;
  /** Local unknowns per cell, all fields. */
  nLocal: number;
  /** nCells · nLocal global unknowns, cell by cell in local order. */
  cellDofs: Int32Array;
}
