import type { CellKind } from '../../mesh/types.ts';

/** Reference vertices of each cell (see src/mesh/types.ts). */
export const REFERENCE_VERTICES: Record<CellKind, number[][]> = {
  interval: [[0], [1]],
  triangle: [[0, 0], [1, 0], [0, 1]],
  quadrilateral: [[0, 0], [1, 0], [1, 1], [0, 1]],
  tetrahedron: [[0, 0, 0], [1, 0, 0], [0, 1, 0], [0, 0, 1]],
};

/** Edges as local vertex pairs, in the order their dofs are numbered. */
export const REFERENCE_EDGES: Record<CellKind, number[][]> = {
  interval: [],
  triangle: [[0, 1], [1, 2], [2, 0]],
  quadrilateral: [[0, 1], [1, 2], [2, 3], [3, 0]],
  tetrahedron: [[0, 1], [1, 2], [2, 0], [0, 3], [1, 3], [2, 3]],
};

/** Facets as local vertex lists: points in 1D, edges in 2D, triangles in 3D. */
export const REFERENCE_FACETS: Record<CellKind, number[][]> = {
  interval: [[0], [1]],
  triangle: [[0, 1], [1, 2], [2, 0]],
  quadrilateral: [[0, 1], [1, 2], [2, 3], [3, 0]],
  tetrahedron: [[1, 2, 3], [0, 2, 3], [0, 1, 3], [0, 1, 2]],
};

/** Interior (not on any vertex or edge) equispaced nodes of degree k. */
function interiorNodes(cell: CellKind, k: number): number[][] {
  const out: number[][] = [];
  if (cell === 'interval') for (let i = 1; i < k; i++) out.push([i / k]);
  else if (cell === 'triangle') {
    for (let j = 1; j < k; j++) for (let i = 1; i + j < k; i++) out.push([i / k, j / k]);
  } else if (cell === 'quadrilateral') {
    for (let j = 1; j < k; j++) for (let i = 1; i < k; i++) out.push([i / k, j / k]);
  } else {
    // Tetrahedron: face-interior nodes appear from k = 3; rungs uses P1/P2 tetrahedra only.
    if (k > 2) throw new Error('tetrahedra are supported up to degree 2');
  }
  return out;
}

/** Equispaced Lagrange nodes of degree k in local dof order: vertices, edges, interior. */
export function lagrangeNodes(cell: CellKind, k: number): { nodes: number[][]; perEdge: number; perInterior: number } {
  const verts = REFERENCE_VERTICES[cell];
  const nodes = verts.map((v) => v.slice());
  const perEdge = cell === 'interval' ? 0 : k - 1;
  for (const [a, b] of REFERENCE_EDGES[cell]) {
    for (let j = 1; j < k; j++) {
      const t = j / k;
      nodes.push(verts[a].map((va, d) => (1 - t) * va + t * verts[b][d]));
    }
  }
  const interior = interiorNodes(cell, k);
  nodes.push(...interior);
  return { nodes, perEdge, perInterior: interior.length };
}
