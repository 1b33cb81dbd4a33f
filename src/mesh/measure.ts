import type { Mesh } from './types.ts';

/** Signed measure of cell c (length, area or volume): positive when the cell follows the orientation convention
 *  (increasing x in 1D, counter-clockwise in 2D, positive triple product in 3D). Quadrilaterals use the shoelace
 *  formula (Meister 1769 / Gauss; common practice, no source). A trilinear hexahedron's volume is ∫ det J over
 *  [0,1]^3; det J has degree at most 2 in each reference variable (each column of J is constant in its own
 *  variable and linear in the other two), so the 2×2×2 Gauss–Legendre rule, exact to degree 3 per variable
 *  (Abramowitz & Stegun 1964, 25.4.29), gives it exactly. */
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
  if (mesh.cellKind === 'hexahedron') {
    let volume = 0;
    for (let k = 0; k < 8; k++) {
      volume += hexahedronJacobian(coords, cells, base, GAUSS2[k & 1]!, GAUSS2[(k >> 1) & 1]!, GAUSS2[k >> 2]!);
    }
    return volume / 8;
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
 *  leaving that corner (common practice, no source). For a trilinear hexahedron det J has degree 2 per variable and
 *  its minimum need not be at a corner; the smallest of the eight corner values (the triple products of the three
 *  edges leaving each corner) is taken, the usual validity test (Knupp 2000, "Achieving finite element mesh quality
 *  via optimization of the Jacobian matrix norm and associated quantities", Part II), exact for parallelepipeds and
 *  necessary, though not sufficient, in general. */
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
    case 'hexahedron': {
      let smallest = Infinity;
      for (let k = 0; k < 8; k++) {
        const j = hexahedronJacobian(coords, cells, base, k & 1, (k >> 1) & 1, k >> 2);
        if (j < smallest) smallest = j;
      }
      return smallest;
    }
  }
}

/** The two Gauss–Legendre points on [0,1]: 1/2 ∓ 1/(2√3) (Abramowitz & Stegun 1964, 25.4.29). */
const GAUSS2 = [0.5 - 0.5 / Math.sqrt(3), 0.5 + 0.5 / Math.sqrt(3)];

/** det J at (s, t, u) of the trilinear map of the hexahedron whose 8 vertices start at cells[base] (vertex order of
 *  src/mesh/types.ts): the columns of J are ∂x/∂s, ∂x/∂t, ∂x/∂u of x = Σ N_v x_v. */
export function hexahedronJacobian(coords: Float64Array, cells: Int32Array, base: number, s: number, t: number, u: number): number {
  const p0 = 3 * cells[base]!, p1 = 3 * cells[base + 1]!, p2 = 3 * cells[base + 2]!, p3 = 3 * cells[base + 3]!;
  const p4 = 3 * cells[base + 4]!, p5 = 3 * cells[base + 5]!, p6 = 3 * cells[base + 6]!, p7 = 3 * cells[base + 7]!;
  const s0 = 1 - s, t0 = 1 - t, u0 = 1 - u;
  let a0 = 0, a1 = 0, a2 = 0, b0 = 0, b1 = 0, b2 = 0, c0 = 0, c1 = 0, c2 = 0;
  for (let d = 0; d < 3; d++) {
    const x0 = coords[p0 + d]!, x1 = coords[p1 + d]!, x2 = coords[p2 + d]!, x3 = coords[p3 + d]!;
    const x4 = coords[p4 + d]!, x5 = coords[p5 + d]!, x6 = coords[p6 + d]!, x7 = coords[p7 + d]!;
    const ds = t0 * u0 * (x1 - x0) + t * u0 * (x2 - x3) + t0 * u * (x5 - x4) + t * u * (x6 - x7);
    const dt = s0 * u0 * (x3 - x0) + s * u0 * (x2 - x1) + s0 * u * (x7 - x4) + s * u * (x6 - x5);
    const du = s0 * t0 * (x4 - x0) + s * t0 * (x5 - x1) + s * t * (x6 - x2) + s0 * t * (x7 - x3);
    if (d === 0) { a0 = ds; b0 = dt; c0 = du; } else if (d === 1) { a1 = ds; b1 = dt; c1 = du; } else { a2 = ds; b2 = dt; c2 = du; }
  }
  // det [a b c] with columns a = ∂x/∂s, b = ∂x/∂t, c = ∂x/∂u: a · (b × c).
  return a0 * (b1 * c2 - b2 * c1) - a1 * (b0 * c2 - b2 * c0) + a2 * (b0 * c1 - b1 * c0);
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
