import type { CellKind } from '../../mesh/types.ts';
import { CELL_FACES } from '../../mesh/cell-faces.ts';

/** Reference vertices of each cell (see src/mesh/types.ts). */
export const REFERENCE_VERTICES: Record<CellKind, number[][]> = {
  interval: [[0], [1]],
  triangle: [[0, 0], [1, 0], [0, 1]],
  quadrilateral: [[0, 0], [1, 0], [1, 1], [0, 1]],
  tetrahedron: [[0, 0, 0], [1, 0, 0], [0, 1, 0], [0, 0, 1]],
  hexahedron: [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0], [0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 1, 1]],
};

/** Edges as local vertex pairs, in the order their dofs are numbered. */
export const REFERENCE_EDGES: Record<CellKind, number[][]> = {
  interval: [],
  triangle: [[0, 1], [1, 2], [2, 0]],
  quadrilateral: [[0, 1], [1, 2], [2, 3], [3, 0]],
  tetrahedron: [[0, 1], [1, 2], [2, 0], [0, 3], [1, 3], [2, 3]],
  hexahedron: [[0, 1], [1, 2], [2, 3], [3, 0], [4, 5], [5, 6], [6, 7], [7, 4], [0, 4], [1, 5], [2, 6], [3, 7]],
};

/** Facets as local vertex lists: points in 1D, edges in 2D, triangles (tetrahedra: face f opposite vertex f) or
 *  quadrilaterals (hexahedra: x = 0, x = 1, y = 0, y = 1, z = 0, z = 1, each cyclic with (v1 − v0) × (v3 − v0)
 *  outward) in 3D; the 3D lists are src/mesh's CELL_FACES. In 3D they are also the cell's faces (`faces` of the
 *  element), so local facet f carries face dofs of face f. */
export const REFERENCE_FACETS: Record<CellKind, number[][]> = {
  interval: [[0], [1]],
  triangle: [[0, 1], [1, 2], [2, 0]],
  quadrilateral: [[0, 1], [1, 2], [2, 3], [3, 0]],
  tetrahedron: CELL_FACES.tetrahedron.map((f) => [...f]),
  hexahedron: CELL_FACES.hexahedron.map((f) => [...f]),
};

/** Faces (2D pieces) of 3D cells as local vertex lists, in local dof order; none for 1D and 2D cells. */
export const REFERENCE_FACES: Record<CellKind, number[][]> = {
  interval: [],
  triangle: [],
  quadrilateral: [],
  tetrahedron: REFERENCE_FACETS.tetrahedron,
  hexahedron: REFERENCE_FACETS.hexahedron,
};

/** Interior (not on any vertex, edge or face) equispaced nodes of degree k. */
function interiorNodes(cell: CellKind, k: number): number[][] {
  const out: number[][] = [];
  if (cell === 'interval') for (let i = 1; i < k; i++) out.push([i / k]);
  else if (cell === 'triangle') {
    for (let j = 1; j < k; j++) for (let i = 1; i + j < k; i++) out.push([i / k, j / k]);
  } else if (cell === 'quadrilateral') {
    for (let j = 1; j < k; j++) for (let i = 1; i < k; i++) out.push([i / k, j / k]);
  } else if (cell === 'tetrahedron') {
    for (let l = 1; l < k; l++) for (let j = 1; j + l < k; j++) for (let i = 1; i + j + l < k; i++) out.push([i / k, j / k, l / k]);
  } else {
    for (let l = 1; l < k; l++) for (let j = 1; j < k; j++) for (let i = 1; i < k; i++) out.push([i / k, j / k, l / k]);
  }
  return out;
}

/** Equispaced nodes inside face [v0, v1, v2(, v3)] of a 3D cell: for a triangle the points v0 + (i/k)(v1 − v0) +
 *  (j/k)(v2 − v0) with i, j ≥ 1, i + j < k (the centroid for k = 3); for a quadrilateral, cyclic, the points
 *  v0 + (i/k)(v1 − v0) + (j/k)(v3 − v0) with 1 ≤ i, j < k (the centre for k = 2). */
function faceNodes(verts: number[][], face: number[], k: number): number[][] {
  const out: number[][] = [];
  const p0 = verts[face[0]], p1 = verts[face[1]], p2 = verts[face[face.length === 3 ? 2 : 3]];
  for (let j = 1; j < k; j++) {
    for (let i = 1; i < k; i++) {
      if (face.length === 3 && i + j >= k) continue;
      out.push(p0.map((a, d) => a + (i / k) * (p1[d] - a) + (j / k) * (p2[d] - a)));
    }
  }
  return out;
}

/** Equispaced Lagrange nodes of degree k in local dof order: vertices, edges, faces (3D cells), interior. */
export function lagrangeNodes(cell: CellKind, k: number): { nodes: number[][]; perEdge: number; perFace: number; perInterior: number } {
  const verts = REFERENCE_VERTICES[cell];
  const nodes = verts.map((v) => v.slice());
  const perEdge = cell === 'interval' ? 0 : k - 1;
  for (const [a, b] of REFERENCE_EDGES[cell]) {
    for (let j = 1; j < k; j++) {
      const t = j / k;
      nodes.push(verts[a].map((va, d) => (1 - t) * va + t * verts[b][d]));
    }
  }
  let perFace = 0;
  for (const face of REFERENCE_FACES[cell]) {
    const inside = faceNodes(verts, face, k);
    perFace = inside.length;
    nodes.push(...inside);
  }
  const interior = interiorNodes(cell, k);
  nodes.push(...interior);
  return { nodes, perEdge, perFace, perInterior: interior.length };
}
