import type { CellKind } from './types.ts';

/** Local vertex pairs of each cell's edges. For 2D cells they run counter-clockwise around the cell (vertex k to
 *  k + 1), so a boundary edge taken from a cell already has the domain on its left. Hexahedra: the bottom face's
 *  four edges, the top face's four, then the four vertical ones (k to k + 4). */
export const CELL_EDGES: Record<CellKind, readonly (readonly [number, number])[]> = {
  interval: [[0, 1]],
  triangle: [[0, 1], [1, 2], [2, 0]],
  quadrilateral: [[0, 1], [1, 2], [2, 3], [3, 0]],
  tetrahedron: [[0, 1], [1, 2], [2, 0], [0, 3], [1, 3], [2, 3]],
  hexahedron: [[0, 1], [1, 2], [2, 3], [3, 0], [4, 5], [5, 6], [6, 7], [7, 4], [0, 4], [1, 5], [2, 6], [3, 7]],
};
