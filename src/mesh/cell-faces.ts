/** Local vertex lists of the faces (2D boundary pieces) of each 3D cell kind, in local facet order.
 *
 *  Tetrahedron: face f is opposite vertex f, its vertices ascending (the order src/fem numbers facets in); these
 *  are not all outward, so a boundary face taken from a cell is turned outward against the opposite vertex.
 *
 *  Hexahedron (reference [0,1]^3, vertices as in src/mesh/types.ts): faces x = 0, x = 1, y = 0, y = 1, z = 0, z = 1,
 *  each listed cyclically so that (v1 − v0) × (v3 − v0) points out of the reference cube, hence out of any cell with
 *  a positive Jacobian. */
export const CELL_FACES = {
  tetrahedron: [[1, 2, 3], [0, 2, 3], [0, 1, 3], [0, 1, 2]],
  hexahedron: [[0, 4, 7, 3], [1, 2, 6, 5], [0, 1, 5, 4], [3, 7, 6, 2], [0, 3, 2, 1], [4, 5, 6, 7]],
} as const satisfies Record<'tetrahedron' | 'hexahedron', readonly (readonly number[])[]>;

/** Cell kinds with faces: the 3D ones. */
export type SolidCellKind = keyof typeof CELL_FACES;
