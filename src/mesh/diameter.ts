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

/** Mesh size h: the largest cell diameter. Triangles have their loop written out (the same squared distances,
 *  each summed as cellDiameterSquared sums it, so the same largest one): 2M triangles 37.5 → 17.5 ms, a first call in a
 *  fresh process (Intel Xeon VM, 2 cores, idle). */
export function computeH(mesh: Mesh): number {
  let largest = 0;
  if (mesh.dim === 2 && mesh.verticesPerCell === 3) {
    const { coords, cells, nCells } = mesh;
    for (let c = 0; c < nCells; c++) {
      const a = 2 * cells[3 * c], b = 2 * cells[3 * c + 1], e = 2 * cells[3 * c + 2];
      const ax = coords[a], ay = coords[a + 1], bx = coords[b], by = coords[b + 1], ex = coords[e], ey = coords[e + 1];
      let t = ax - bx, u = ay - by;
      const ab = t * t + u * u;
      t = ax - ex; u = ay - ey;
      const ae = t * t + u * u;
      t = bx - ex; u = by - ey;
      const be = t * t + u * u;
      if (ab > largest) largest = ab;
      if (ae > largest) largest = ae;
      if (be > largest) largest = be;
    }
    return Math.sqrt(largest);
  }
  for (let c = 0; c < mesh.nCells; c++) {
    const d2 = cellDiameterSquared(mesh, c);
    if (d2 > largest) largest = d2;
  }
  return Math.sqrt(largest);
}
