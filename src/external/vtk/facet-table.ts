// Shared facets of a mesh read from a file, found without a hash map. Every facet occurrence ("slot", numbered
// cell * facetsPerCell + local facet, so slots ascend in the order a loop over cells and their facets meets them) is
// keyed by its sorted vertex numbers and grouped with counting sorts that keep slots ascending within a key: edges by
// their smaller vertex (edgeTable), faces by all three vertices, least significant first (faceTable). Each group
// then tells a facet's first occurrence, how many cells share it and which occurrences come second and third:
// everything the boundary search (src/mesh's findBoundaryFacets, src/mesh/boundary-faces.ts) and the fold check (overlap.ts,
// check 1) read from their maps, in the same order, in O(slots + vertices) time and memory on typed arrays.

/** Outward faces of a positively oriented tetrahedron (0, 1, 2, 3); face f is opposite vertex f. */
export const TET_FACES: readonly (readonly [number, number, number])[] = [[1, 2, 3], [0, 3, 2], [0, 1, 3], [0, 2, 1]];
/** The same faces in src/fem's REFERENCE_FACETS vertex order, in which src/mesh/boundary-faces.ts writes boundary faces. */
const REF_FACES: readonly (readonly [number, number, number])[] = [[1, 2, 3], [0, 2, 3], [0, 1, 3], [0, 1, 2]];

/** The first problem a loop over cells and their facets meets: a facet's second occurrence running the same way as
 *  its first, or a facet's third occurrence. */
export interface SharedFacetProblem {
  kind: 'same-side' | 'third';
  /** Slot where the loop meets it (cell * facetsPerCell + local facet). */
  slot: number;
  cell: number;
  /** For 'same-side': the cell of the facet's first occurrence. */
  other: number;
}

export interface FacetTable {
  /** Boundary facets (on one cell only) in order of first appearance, vertices per facet as described by the builder. */
  boundary: Int32Array;
  /** Cell of each boundary facet. */
  boundaryCell: Int32Array;
  /** Largest number of cells on one facet. */
  maxShare: number;
  problem: SharedFacetProblem | null;
}

/** Slots ordered by (keys[0], keys[1], …, slot): stable counting sorts by the last key first. Keys lie in [0, range). */
function sortSlots(keys: Int32Array[], range: number): Int32Array {
  const n = keys[0]!.length;
  let order = new Int32Array(n);
  for (let s = 0; s < n; s++) order[s] = s;
  let next = new Int32Array(n);
  const count = new Int32Array(range + 1);
  for (let d = keys.length - 1; d >= 0; d--) {
    const key = keys[d]!;
    count.fill(0);
    for (let s = 0; s < n; s++) count[key[s]! + 1]!++;
    for (let v = 0; v < range; v++) count[v + 1]! += count[v]!;
    for (let r = 0; r < n; r++) {
      const s = order[r]!;
      next[count[key[s]!]!++] = s;
    }
    const t = order; order = next; next = t;
  }
  return order;
}

/**
 * Walks the runs of equal keys in `order` and fills `mark` (1 on the slot of a facet with one cell). `side` of a slot
 * tells which way its facet runs (orientation relative to the sorted key); a second occurrence with the same side is a
 * fold, a third occurrence a crowded facet. Returns the number of boundary facets, the largest run and the first
 * problem in slot order.
 */
function scanRuns(
  order: Int32Array, k0: Int32Array, k1: Int32Array, k2: Int32Array | null, side: Uint8Array, perCell: number, mark: Uint8Array,
): { nBoundary: number; maxShare: number; problem: SharedFacetProblem | null } {
  const n = order.length;
  let nBoundary = 0, maxShare = 0, best = -1, bestOther = -1, bestSame = false;
  let r0 = 0;
  while (r0 < n) {
    const s0 = order[r0]!;
    const a = k0[s0]!, b = k1[s0]!, c = k2 === null ? 0 : k2[s0]!;
    let r1 = r0 + 1;
    while (r1 < n) {
      const s = order[r1]!;
      if (k0[s] !== a || k1[s] !== b || (k2 !== null && k2[s] !== c)) break;
      r1++;
    }
    const k = r1 - r0;
    if (k > maxShare) maxShare = k;
    if (k === 1) {
      mark[s0] = 1;
      nBoundary++;
    } else {
      const s1 = order[r0 + 1]!;
      const same = side[s1] === side[s0];
      const cand = same ? s1 : k >= 3 ? order[r0 + 2]! : -1;
      if (cand >= 0 && (best < 0 || cand < best)) { best = cand; bestOther = s0; bestSame = same; }
    }
    r0 = r1;
  }
  const problem: SharedFacetProblem | null = best < 0 ? null : {
    kind: bestSame ? 'same-side' : 'third', slot: best, cell: Math.floor(best / perCell), other: Math.floor(bestOther / perCell),
  };
  return { nBoundary, maxShare, problem };
}

/**
 * Edges of triangles or quadrilaterals with `nc` corners per cell, edge k running from corner k to k + 1 (src/mesh's
 * CELL_EDGES, overlap.ts). Boundary edges are given as their cell runs them (two vertices each): exactly src/mesh's
 * findBoundaryFacets when no edge has more than two cells. Two occurrences run the same way when both go from the
 * smaller vertex number to the larger or both the other way.
 *
 * One counting sort by the smaller vertex suffices here: within the bucket of vertex v (slots ascending), the
 * occurrences of edge (v, w) are told apart by w with arrays over the vertices, stamped with v, so each bucket costs
 * its length whatever the vertex's degree.
 */
export function edgeTable(nc: number, nVertices: number, cells: Int32Array): FacetTable {
  const nSlots = cells.length;
  const start = new Int32Array(nVertices + 1);
  for (let s = 0; s < nSlots; s++) {
    const a = cells[s]!, b = cells[s % nc === nc - 1 ? s + 1 - nc : s + 1]!;
    start[(a < b ? a : b) + 1]!++;
  }
  for (let v = 0; v < nVertices; v++) start[v + 1]! += start[v]!;
  const order = new Int32Array(nSlots);
  const fill = start.slice(0, nVertices);
  for (let s = 0; s < nSlots; s++) {
    const a = cells[s]!, b = cells[s % nc === nc - 1 ? s + 1 - nc : s + 1]!;
    order[fill[a < b ? a : b]!++] = s;
  }
  // Per other end w of the bucket's edges: the bucket that last saw it, its first slot, how often it was seen.
  const stamp = fill.fill(-1), first = new Int32Array(nVertices), seen = new Int32Array(nVertices);
  const mark = new Uint8Array(nSlots);
  let maxShare = 0, nBoundary = 0, best = -1, bestOther = -1, bestSame = false;
  for (let v = 0; v < nVertices; v++) {
    const r0 = start[v]!, r1 = start[v + 1]!;
    for (let r = r0; r < r1; r++) {
      const s = order[r]!;
      const a = cells[s]!, b = cells[s % nc === nc - 1 ? s + 1 - nc : s + 1]!;
      const w = a < b ? b : a;
      if (stamp[w] !== v) { stamp[w] = v; first[w] = s; seen[w] = 1; continue; }
      const k = ++seen[w]!;
      if (k === 2) {
        const s0 = first[w]!, b0 = cells[s0 % nc === nc - 1 ? s0 + 1 - nc : s0 + 1]!;
        // Same way: both occurrences start at the same end (their ends are {v, w}).
        if (cells[s0] === a && b0 === b && (best < 0 || s < best)) { best = s; bestOther = s0; bestSame = true; }
      } else if (k === 3 && (best < 0 || s < best)) {
        best = s; bestOther = first[w]!; bestSame = false;
      }
    }
    for (let r = r0; r < r1; r++) {
      const s = order[r]!;
      const a = cells[s]!, b = cells[s % nc === nc - 1 ? s + 1 - nc : s + 1]!;
      const w = a < b ? b : a;
      const k = seen[w]!;
      if (k > maxShare) maxShare = k;
      if (k === 1) { mark[s] = 1; nBoundary++; }
    }
  }
  const problem: SharedFacetProblem | null = best < 0 ? null : {
    kind: bestSame ? 'same-side' : 'third', slot: best, cell: Math.floor(best / nc), other: Math.floor(bestOther / nc),
  };
  const boundary = new Int32Array(2 * nBoundary), boundaryCell = new Int32Array(nBoundary);
  let m = 0;
  for (let s = 0; s < nSlots; s++) {
    if (!mark[s]) continue;
    boundary[2 * m] = cells[s]!;
    boundary[2 * m + 1] = cells[s % nc === nc - 1 ? s + 1 - nc : s + 1]!;
    boundaryCell[m++] = Math.floor(s / nc);
  }
  return { boundary, boundaryCell, maxShare, problem };
}

/**
 * Faces of tetrahedra (face f opposite vertex f). Boundary faces are given as src/mesh/boundary-faces.ts gives them: in
 * REFERENCE_FACETS vertex order, swapped to (a, c, b) unless the normal (b − a) × (c − a) points away from the cell's
 * fourth vertex. Two occurrences run the same way when the TET_FACES orders of their vertices have the same parity.
 */
export function faceTable(nVertices: number, coords: Float64Array, cells: Int32Array): FacetTable {
  const nSlots = cells.length; // four faces per cell
  const k0 = new Int32Array(nSlots), k1 = new Int32Array(nSlots), k2 = new Int32Array(nSlots);
  const side = new Uint8Array(nSlots);
  for (let s = 0; s < nSlots; s++) {
    const base = s - (s & 3), f = TET_FACES[s & 3]!;
    let a = cells[base + f[0]]!, b = cells[base + f[1]]!, c = cells[base + f[2]]!;
    side[s] = (a > b ? 1 : 0) ^ (a > c ? 1 : 0) ^ (b > c ? 1 : 0);
    if (a > b) { const t = a; a = b; b = t; }
    if (b > c) { const t = b; b = c; c = t; }
    if (a > b) { const t = a; a = b; b = t; }
    k0[s] = a; k1[s] = b; k2[s] = c;
  }
  const order = sortSlots([k0, k1, k2], nVertices);
  const mark = new Uint8Array(nSlots);
  const { nBoundary, maxShare, problem } = scanRuns(order, k0, k1, k2, side, 4, mark);
  const boundary = new Int32Array(3 * nBoundary), boundaryCell = new Int32Array(nBoundary);
  let m = 0;
  for (let s = 0; s < nSlots; s++) {
    if (!mark[s]) continue;
    const base = s - (s & 3), f = REF_FACES[s & 3]!;
    const a = cells[base + f[0]]!, b = cells[base + f[1]]!, d = cells[base + f[2]]!;
    const o = cells[s]!; // face f is opposite vertex f
    boundary[3 * m] = a;
    if (facingAway(coords, a, b, d, o)) { boundary[3 * m + 1] = b; boundary[3 * m + 2] = d; }
    else { boundary[3 * m + 1] = d; boundary[3 * m + 2] = b; }
    boundaryCell[m++] = s >> 2;
  }
  return { boundary, boundaryCell, maxShare, problem };
}

/** Whether the normal (b − a) × (c − a) points away from vertex o (the same arithmetic as src/mesh/boundary-faces.ts). */
function facingAway(x: Float64Array, a: number, b: number, c: number, o: number): boolean {
  const ux = x[3 * b]! - x[3 * a]!, uy = x[3 * b + 1]! - x[3 * a + 1]!, uz = x[3 * b + 2]! - x[3 * a + 2]!;
  const vx = x[3 * c]! - x[3 * a]!, vy = x[3 * c + 1]! - x[3 * a + 1]!, vz = x[3 * c + 2]! - x[3 * a + 2]!;
  const wx = x[3 * o]! - x[3 * a]!, wy = x[3 * o + 1]! - x[3 * a + 1]!, wz = x[3 * o + 2]! - x[3 * a + 2]!;
  const nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
  return nx * wx + ny * wy + nz * wz < 0;
}
