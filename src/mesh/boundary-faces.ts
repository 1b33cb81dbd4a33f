import { RungsInputError } from '../errors.ts';
import { CELL_FACES, type SolidCellKind } from './cell-faces.ts';

/**
 * Boundary faces of a tetrahedral or hexahedral mesh: the faces that belong to exactly one cell (a face on three or
 * more cells counts as interior here; the mesh checks report such meshes), in order of first appearance in a loop
 * over cells and their faces (CELL_FACES order). Each face is turned so that its normal points out of its cell:
 * a triangle (a, b, c) of a tetrahedron has (b − a) × (c − a) pointing away from the cell's fourth vertex; a
 * quadrilateral (a, b, c, d) of a hexahedron has (c − a) × (d − b), its vector area doubled, pointing away from the
 * cell's vertex centroid. Returns nFaces * 3 (tetrahedra) or nFaces * 4 (hexahedra) vertex indices.
 *
 * Faces are grouped by their smallest vertex (counting sort) and compared by their sorted vertices: O(faces) time,
 * typed arrays only, no hashing and no object per face.
 */
export function findBoundaryFaces(
  kind: SolidCellKind,
  nVertices: number,
  coords: Float64Array,
  cells: Int32Array,
  where = 'mesh',
): Int32Array {
  const index = buildFaceIndex(kind, nVertices, cells, where);
  const { faces, vpc, m, nf, nFaces, count, firstSlot } = index;
  let nBoundary = 0;
  for (let id = 0; id < nFaces; id++) if (count[id] === 1) nBoundary++;
  const out = new Int32Array(nBoundary * m);
  let o = 0;
  for (let id = 0; id < nFaces; id++) {
    if (count[id] !== 1) continue;
    const s = firstSlot[id]!;
    const c = Math.floor(s / nf), f = s - c * nf;
    const fv = faces[f]!;
    const base = c * vpc;
    if (m === 3) {
      const a = cells[base + fv[0]!]!, b = cells[base + fv[1]!]!, d = cells[base + fv[2]!]!;
      out[o++] = a;
      if (faceNormalOutward(coords, cells, kind, base, f, a, b, d, -1)) { out[o++] = b; out[o++] = d; }
      else { out[o++] = d; out[o++] = b; }
    } else {
      const a = cells[base + fv[0]!]!, b = cells[base + fv[1]!]!, d = cells[base + fv[2]!]!, e = cells[base + fv[3]!]!;
      if (faceNormalOutward(coords, cells, kind, base, f, a, b, d, e)) { out[o++] = a; out[o++] = b; out[o++] = d; out[o++] = e; }
      else { out[o++] = a; out[o++] = e; out[o++] = d; out[o++] = b; }
    }
  }
  return out;
}

/** The distinct faces of a 3D mesh: each cell face ("slot", cell * facesPerCell + local face) grouped by its sorted
 *  vertices. Face ids are given in order of first appearance. */
export interface FaceIndex {
  faces: readonly (readonly number[])[];
  /** Vertices per cell, vertices per face, faces per cell. */
  vpc: number;
  m: number;
  nf: number;
  nFaces: number;
  /** Per face id: cells holding it, and the slot where it first appears. */
  count: Int32Array;
  firstSlot: Int32Array;
  /** The id of the face whose sorted vertices are sorted[0..m), or −1. */
  find(sorted: Int32Array): number;
}

/** Builds the FaceIndex of a tetrahedral or hexahedral mesh; throws RungsInputError on a vertex index out of range.
 *  Faces are bucketed by their smallest vertex (counting sort) and compared by their other sorted vertices. */
export function buildFaceIndex(kind: SolidCellKind, nVertices: number, cells: Int32Array, where = 'mesh'): FaceIndex {
  const faces = CELL_FACES[kind];
  const vpc = kind === 'tetrahedron' ? 4 : 8;
  const m = faces[0].length;
  const nf = faces.length;
  const nCells = Math.floor(cells.length / vpc);
  for (let k = 0; k < nCells * vpc; k++) {
    const v = cells[k]!;
    if (!(v >= 0 && v < nVertices)) {
      const c = Math.floor(k / vpc);
      throw new RungsInputError(
        `${where}: cell ${c} refers to vertex ${v}, but valid vertex indices are 0..${nVertices - 1}`,
        `${where}.cells[${c}]`,
      );
    }
  }
  const nSlots = nCells * nf;
  const sorted = new Int32Array(4);
  const sortSlot = (s: number): void => {
    const c = Math.floor(s / nf);
    const fv = faces[s - c * nf]!;
    for (let i = 0; i < m; i++) sorted[i] = cells[c * vpc + fv[i]!]!;
    sortSmall(sorted, m);
  };
  const start = new Int32Array(nVertices + 1);
  for (let s = 0; s < nSlots; s++) { sortSlot(s); start[sorted[0]! + 1]!++; }
  for (let v = 0; v < nVertices; v++) start[v + 1]! += start[v]!;
  const fill = start.slice(0, nVertices);
  const w = m - 1;
  const rest = new Int32Array(nSlots * w); // the other sorted vertices of each distinct face, in its bucket
  const bucketFace = new Int32Array(nSlots); // face id of each bucket entry
  const firstSlot = new Int32Array(nSlots);
  const count = new Int32Array(nSlots);
  const find = (key: Int32Array): number => {
    const lo = key[0]!;
    if (!(lo >= 0 && lo < nVertices)) return -1;
    for (let e = start[lo]!; e < fill[lo]!; e++) {
      let same = true;
      for (let i = 0; i < w; i++) if (rest[e * w + i] !== key[i + 1]) { same = false; break; }
      if (same) return bucketFace[e]!;
    }
    return -1;
  };
  let nFaces = 0;
  for (let s = 0; s < nSlots; s++) {
    sortSlot(s);
    let id = find(sorted);
    if (id < 0) {
      id = nFaces++;
      const lo = sorted[0]!;
      const e = fill[lo]!++;
      for (let i = 0; i < w; i++) rest[e * w + i] = sorted[i + 1]!;
      bucketFace[e] = id;
      firstSlot[id] = s;
    }
    count[id]!++;
  }
  return { faces, vpc, m, nf, nFaces, count, firstSlot, find };
}

/** Sorts a[0..m) ascending in place (insertion sort of 3 or 4 entries). */
export function sortSmall(a: Int32Array, m: number): void {
  for (let i = 1; i < m; i++) {
    const v = a[i]!;
    let j = i - 1;
    while (j >= 0 && a[j]! > v) { a[j + 1] = a[j]!; j--; }
    a[j + 1] = v;
  }
}

/** Whether the face (a, b, c) (d < 0) or (a, b, c, d) of the cell whose vertices start at cells[base] has its normal
 *  pointing out of the cell: for a triangle of a tetrahedron (b − a) × (c − a) against the vertex opposite local
 *  face f; for a quadrilateral of a hexahedron (c − a) × (d − b) against the cell's vertex centroid. */
export function faceNormalOutward(
  x: Float64Array, cells: Int32Array, kind: SolidCellKind, base: number, f: number, a: number, b: number, c: number, d: number,
): boolean {
  if (kind === 'tetrahedron') return facingAway(x, a, b, c, cells[base + f]!); // face f is opposite vertex f
  return quadFacesOut(x, cells, base, a, b, c, d);
}

/** The boundary faces of a tetrahedral mesh (findBoundaryFaces for tetrahedra), nFaces * 3 vertex indices. */
export function tetrahedronBoundaryFacets(nVertices: number, coords: Float64Array, cells: Int32Array): Int32Array {
  return findBoundaryFaces('tetrahedron', nVertices, coords, cells);
}

/** Whether the normal (b − a) × (c − a) points away from vertex o. */
function facingAway(x: Float64Array, a: number, b: number, c: number, o: number): boolean {
  const ux = x[3 * b]! - x[3 * a]!, uy = x[3 * b + 1]! - x[3 * a + 1]!, uz = x[3 * b + 2]! - x[3 * a + 2]!;
  const vx = x[3 * c]! - x[3 * a]!, vy = x[3 * c + 1]! - x[3 * a + 1]!, vz = x[3 * c + 2]! - x[3 * a + 2]!;
  const wx = x[3 * o]! - x[3 * a]!, wy = x[3 * o + 1]! - x[3 * a + 1]!, wz = x[3 * o + 2]! - x[3 * a + 2]!;
  const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
  return nx * wx + ny * wy + nz * wz < 0;
}

/** Whether (c − a) × (d − b) of the quadrilateral (a, b, c, d) points from the centroid of the hexahedron whose
 *  vertices start at cells[base] towards the quadrilateral's centroid. */
function quadFacesOut(x: Float64Array, cells: Int32Array, base: number, a: number, b: number, c: number, d: number): boolean {
  const px = x[3 * c]! - x[3 * a]!, py = x[3 * c + 1]! - x[3 * a + 1]!, pz = x[3 * c + 2]! - x[3 * a + 2]!;
  const qx = x[3 * d]! - x[3 * b]!, qy = x[3 * d + 1]! - x[3 * b + 1]!, qz = x[3 * d + 2]! - x[3 * b + 2]!;
  const nx = py * qz - pz * qy, ny = pz * qx - px * qz, nz = px * qy - py * qx;
  let wx = 2 * (x[3 * a]! + x[3 * b]! + x[3 * c]! + x[3 * d]!);
  let wy = 2 * (x[3 * a + 1]! + x[3 * b + 1]! + x[3 * c + 1]! + x[3 * d + 1]!);
  let wz = 2 * (x[3 * a + 2]! + x[3 * b + 2]! + x[3 * c + 2]! + x[3 * d + 2]!);
  for (let k = 0; k < 8; k++) {
    const v = cells[base + k]!;
    wx -= x[3 * v]!; wy -= x[3 * v + 1]!; wz -= x[3 * v + 2]!;
  }
  // (w / 8) = face centroid − cell centroid; only its sign against n matters.
  return nx * wx + ny * wy + nz * wz > 0;
}
