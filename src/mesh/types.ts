/** Reference cell shapes. Reference cells: interval [0,1]; triangle (0,0),(1,0),(0,1);
 *  quadrilateral [0,1]^2 with vertices counter-clockwise from (0,0); tetrahedron (0,0,0),(1,0,0),(0,1,0),(0,0,1). */
export type CellKind = 'interval' | 'triangle' | 'quadrilateral' | 'tetrahedron';

/** A mesh on typed arrays. Cells are listed by vertex index, counter-clockwise in 2D. */
export interface Mesh {
  dim: 1 | 2 | 3;
  cellKind: CellKind;
  nVertices: number;
  /** nVertices * dim coordinates, vertex-major. */
  coords: Float64Array;
  nCells: number;
  verticesPerCell: number;
  /** nCells * verticesPerCell vertex indices. */
  cells: Int32Array;
  /** Boundary facets (points in 1D, edges in 2D, faces in 3D): nFacets * verticesPerFacet vertex indices. */
  nFacets: number;
  verticesPerFacet: number;
  facets: Int32Array;
  /** Tag index of each boundary facet into tagNames. */
  facetTags: Int32Array;
  tagNames: string[];
  /** Largest cell diameter. */
  h: number;
}

export const VERTICES_PER_CELL: Record<CellKind, number> = {
  interval: 2,
  triangle: 3,
  quadrilateral: 4,
  tetrahedron: 4,
};

export const CELL_DIM: Record<CellKind, 1 | 2 | 3> = {
  interval: 1,
  triangle: 2,
  quadrilateral: 2,
  tetrahedron: 3,
};
