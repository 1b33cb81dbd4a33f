import { REFERENCE_FACETS } from '../fem/element/nodes.ts';

/**
 * Boundary faces of a tetrahedral mesh: the faces that belong to exactly one cell, each ordered so that its normal
 * (b − a) × (c − a) points out of its cell. src/mesh finds boundary facets in 1D and 2D only; a mesh read from an
 * external solver's file needs them in 3D too, because meshFromArrays asks tetrahedral meshes for their facets.
 * Returns nFaces * 3 vertex indices, in order of first appearance.
 */
export function tetrahedronBoundaryFacets(nVertices: number, coords: Float64Array, cells: Int32Array): Int32Array {
  const faces = REFERENCE_FACETS.tetrahedron;
  const numeric = nVertices ** 3 < Number.MAX_SAFE_INTEGER;
  // Sorted-triple key → first (cell * 4 + local face) while seen once, −1 once shared.
  const seen = new Map<number | string, number>();
  const nCells = cells.length / 4;
  for (let c = 0; c < nCells; c++) {
    for (let f = 0; f < 4; f++) {
      const fv = faces[f]!;
      let a = cells[4 * c + fv[0]!]!, b = cells[4 * c + fv[1]!]!, d = cells[4 * c + fv[2]!]!;
      if (a > b) [a, b] = [b, a];
      if (b > d) [b, d] = [d, b];
      if (a > b) [a, b] = [b, a];
      const key = numeric ? (a * nVertices + b) * nVertices + d : `${a},${b},${d}`;
      const slot = seen.get(key);
      seen.set(key, slot === undefined ? 4 * c + f : -1);
    }
  }
  const out: number[] = [];
  for (const slot of seen.values()) {
    if (slot < 0) continue;
    const c = slot >> 2, f = slot & 3;
    const fv = faces[f]!;
    const a = cells[4 * c + fv[0]!]!, b = cells[4 * c + fv[1]!]!, d = cells[4 * c + fv[2]!]!;
    const opposite = cells[4 * c + f]!; // local face f is opposite local vertex f
    if (facingAway(coords, a, b, d, opposite)) out.push(a, b, d);
    else out.push(a, d, b);
  }
  return Int32Array.from(out);
}

/** Whether the normal (b − a) × (c − a) points away from vertex o. */
function facingAway(x: Float64Array, a: number, b: number, c: number, o: number): boolean {
  const ux = x[3 * b]! - x[3 * a]!, uy = x[3 * b + 1]! - x[3 * a + 1]!, uz = x[3 * b + 2]! - x[3 * a + 2]!;
  const vx = x[3 * c]! - x[3 * a]!, vy = x[3 * c + 1]! - x[3 * a + 1]!, vz = x[3 * c + 2]! - x[3 * a + 2]!;
  const wx = x[3 * o]! - x[3 * a]!, wy = x[3 * o + 1]! - x[3 * a + 1]!, wz = x[3 * o + 2]! - x[3 * a + 2]!;
  const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
  return nx * wx + ny * wy + nz * wz < 0;
}
