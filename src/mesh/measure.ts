import type { Mesh } from './types.ts';

/** Signed measure of cell c (length, area or volume): positive when the cell follows the orientation convention
 *  (increasing x in 1D, counter-clockwise in 2D, positive triple product in 3D). Quadrilaterals use the shoelace
 *  formula (Meister 1769 / Gauss; common practice, no source). */
export function signedCellMeasure(mesh: Mesh, c: number): number {
  const { coords, cells, dim } = mesh;
  const n = mesh.verticesPerCell;
  const base = c * n;
  if (mesh.cellKind === 'interval') {
    return coords[cells[base + 1]!]! - coords[cells[base]!]!;
  }
  if (mesh.cellKind === 'tetrahedron') {
    return simplex3Jacobian(coords, cells[base]!, cells[base + 1]!, cells[base + 2]!, cells[base + 3]!) / 6;
  }
  // Triangle or quadrilateral: shoelace sum over consecutive vertices.
  let twice = 0;
  for (let k = 0; k < n; k++) {
    const a = cells[base + k]! * dim;
    const b = cells[base + ((k + 1) % n)]! * dim;
    twice += coords[a]! * coords[b + 1]! - coords[b]! * coords[a + 1]!;
  }
  return twice / 2;
}

/** Smallest determinant of the Jacobian of the reference-to-physical map of cell c. For simplices the map is affine,
 *  so this is its one determinant (d! × measure); for a bilinear quadrilateral det J is affine in each reference
 *  variable, so its minimum over [0,1]^2 is attained at a corner, where it is the cross product of the two edges
 *  leaving that corner (common practice, no source). */
export function minJacobian(mesh: Mesh, c: number): number {
  const { coords, cells } = mesh;
  const n = mesh.verticesPerCell;
  const base = c * n;
  switch (mesh.cellKind) {
    case 'interval':
      return coords[cells[base + 1]!]! - coords[cells[base]!]!;
    case 'triangle':
      return corner2Jacobian(coords, cells[base + 2]!, cells[base]!, cells[base + 1]!);
    case 'quadrilateral': {
      let smallest = Infinity;
      for (let k = 0; k < 4; k++) {
        const j = corner2Jacobian(coords, cells[base + ((k + 3) % 4)]!, cells[base + k]!, cells[base + ((k + 1) % 4)]!);
        if (j < smallest) smallest = j;
      }
      return smallest;
    }
    case 'tetrahedron':
      return simplex3Jacobian(coords, cells[base]!, cells[base + 1]!, cells[base + 2]!, cells[base + 3]!);
  }
}

/** Cross product (next − corner) × (previous − corner) in 2D: positive when previous, corner, next turn left. */
function corner2Jacobian(coords: Float64Array, previous: number, corner: number, next: number): number {
  const cx = coords[2 * corner]!;
  const cy = coords[2 * corner + 1]!;
  const ax = coords[2 * next]! - cx;
  const ay = coords[2 * next + 1]! - cy;
  const bx = coords[2 * previous]! - cx;
  const by = coords[2 * previous + 1]! - cy;
  return ax * by - ay * bx;
}

/** Triple product (v1 − v0) · ((v2 − v0) × (v3 − v0)). */
function simplex3Jacobian(coords: Float64Array, v0: number, v1: number, v2: number, v3: number): number {
  const x0 = coords[3 * v0]!, y0 = coords[3 * v0 + 1]!, z0 = coords[3 * v0 + 2]!;
  const ax = coords[3 * v1]! - x0, ay = coords[3 * v1 + 1]! - y0, az = coords[3 * v1 + 2]! - z0;
  const bx = coords[3 * v2]! - x0, by = coords[3 * v2 + 1]! - y0, bz = coords[3 * v2 + 2]! - z0;
  const cx = coords[3 * v3]! - x0, cy = coords[3 * v3 + 1]! - y0, cz = coords[3 * v3 + 2]! - z0;
  return ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
}
