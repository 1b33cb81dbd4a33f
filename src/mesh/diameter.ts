import type { Mesh } from './types.ts';

/** Squared diameter of cell c: the largest squared distance between two of its vertices, which is the diameter of
 *  any cell with straight edges (the farthest pair of points of a polytope are vertices; common practice, no source). */
export function cellDiameterSquared(mesh: Mesh, c: number): number {
  const { coords, cells, dim } = mesh;
  const n = mesh.verticesPerCell;
  const base = c * n;
  let largest = 0;
  for (let a = 0; a < n - 1; a++) {
    const pa = cells[base + a]! * dim;
    for (let b = a + 1; b < n; b++) {
      const pb = cells[base + b]! * dim;
      let d2 = 0;
      for (let k = 0; k < dim; k++) {
        const t = coords[pa + k]! - coords[pb + k]!;
        d2 += t * t;
      }
      if (d2 > largest) largest = d2;
    }
  }
  return largest;
}

/** Diameter of cell c (the longest edge for a simplex; edge or diagonal, whichever is longest, for a quadrilateral or
 *  hexahedron). */
export function cellDiameter(mesh: Mesh, c: number): number {
  return Math.sqrt(cellDiameterSquared(mesh, c));
}

/** Largest and smallest cell diameters. */
export function diameterRange(mesh: Mesh): { hMax: number; hMin: number } {
  let largest = 0;
  let smallest = Infinity;
  for (let c = 0; c < mesh.nCells; c++) {
    const d2 = cellDiameterSquared(mesh, c);
    if (d2 > largest) largest = d2;
    if (d2 < smallest) smallest = d2;
  }
  return { hMax: Math.sqrt(largest), hMin: mesh.nCells > 0 ? Math.sqrt(smallest) : 0 };
}

/** Mesh size h: the largest cell diameter. */
export function computeH(mesh: Mesh): number {
  let largest = 0;
  for (let c = 0; c < mesh.nCells; c++) {
    const d2 = cellDiameterSquared(mesh, c);
    if (d2 > largest) largest = d2;
  }
  return Math.sqrt(largest);
}
