import type { CellKind, Mesh } from '../../mesh/types.ts';
import { shared } from './shared.ts';

/** A mesh's cells and vertices as plain data in shared memory: what a worker of the cell team reads (no boundary
 *  facets: the cell loops do not read them). */
export interface SharedMesh {
  dim: 1 | 2 | 3;
  cellKind: CellKind;
  nVertices: number;
  nCells: number;
  verticesPerCell: number;
  coords: Float64Array;
  cells: Int32Array;
  h: number;
}

export function sharedMesh(mesh: Mesh): SharedMesh {
  return {
    dim: mesh.dim, cellKind: mesh.cellKind, nVertices: mesh.nVertices, nCells: mesh.nCells, verticesPerCell: mesh.verticesPerCell,
    coords: shared(mesh.coords), cells: shared(mesh.cells), h: mesh.h,
  };
}

/** The Mesh of shared data (in a worker): cells and vertices, no boundary facets. */
export function meshOf(m: SharedMesh): Mesh {
  return {
    dim: m.dim, cellKind: m.cellKind, nVertices: m.nVertices, coords: m.coords, nCells: m.nCells, verticesPerCell: m.verticesPerCell,
    cells: m.cells, nFacets: 0, verticesPerFacet: 0, facets: new Int32Array(0), facetTags: new Int32Array(0), tagNames: [], h: m.h,
  };
}
