/** Reference cell shapes. Reference cells: interval [0,1]; triangle (0,0),(1,0),(0,1);
 *  quadrilateral [0,1]^2 with vertices counter-clockwise from (0,0); tetrahedron (0,0,0),(1,0,0),(0,1,0),(0,0,1);
 *  hexahedron [0,1]^3 with the bottom face z = 0 counter-clockwise (seen from above) from the origin, then the top
 *  face z = 1 in the same order: (0,0,0),(1,0,0),(1,1,0),(0,1,0),(0,0,1),(1,0,1),(1,1,1),(0,1,1) (the order of
 *  VTK_HEXAHEDRON). */
export type CellKind = 'interval' | 'triangle' | 'quadrilateral' | 'tetrahedron' | 'hexahedron';

/** A mesh on typed arrays. Cells are listed by vertex index, counter-clockwise in 2D, with a positive Jacobian
 *  determinant in 3D. */
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
  /** Boundary facets (points in 1D, edges in 2D, faces in 3D: triangles of tetrahedra, quadrilaterals of
   *  hexahedra given cyclically): nFacets * verticesPerFacet vertex indices. */
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
  hexahedron: 8,
};

/** Vertices of one boundary facet: a point, an edge, a triangle or a quadrilateral. */
export const VERTICES_PER_FACET: Record<CellKind, number> = {
  interval: 1,
  triangle: 2,
  quadrilateral: 2,
  tetrahedron: 3,
  hexahedron: 4,
};

export const CELL_DIM: Record<CellKind, 1 | 2 | 3> = {
  interval: 1,
  triangle: 2,
  quadrilateral: 2,
  tetrahedron: 3,
  hexahedron: 3,
};

/** Whether the reference map of a cell kind is affine (simplices: one Jacobian per cell). Quadrilaterals
 *  (bilinear) and hexahedra (trilinear) are not: their Jacobian varies from point to point. */
export const AFFINE_CELL: Record<CellKind, boolean> = {
  interval: true,
  triangle: true,
  quadrilateral: false,
  tetrahedron: true,
  hexahedron: false,
};
