import { RungsInputError } from '../errors.ts';
import { boundingBox } from './bounding-box.ts';
import { CELL_FACES } from './cell-faces.ts';
import { cellMeasures } from './regions.ts';
import type { Mesh } from './types.ts';

/** How far outside a cell a point may lie and still count as inside: a fraction of the cell's size (barycentric
 *  coordinates ≥ −tol for simplices; distance past a side ≤ tol × the cell's bounding-box diagonal otherwise).
 *  Centroids of children lie well inside their parents, so only points on a coarse facet (non-nested meshes) come
 *  near it; it only has to absorb round-off in the coordinates (common practice, no source). */
export const POINT_IN_CELL_TOLERANCE = 1e-10;

/** Relative difference allowed between a coarse cell's measure and the sum of its children's (round-off of sums
 *  of a few to a few dozen measures; common practice, no source). */
export const NESTED_MEASURE_TOLERANCE = 1e-10;

export interface ParentCells {
  /** For each fine cell, the coarse cell holding its centroid, or −1 when none does. */
  parent: Int32Array;
  /** For each coarse cell, how many fine cells it holds. */
  childCount: Int32Array;
  /** Every fine cell has a parent and every coarse cell's children fill it (measures sum to its own). */
  nested: boolean;
  /** Why the ladder is not nested (the first failure found), or null. */
  reason: string | null;
}

/**
 * For each cell of `fine`, the cell of `coarse` that holds its vertex centroid. Point location goes through a
 * uniform grid of buckets over the coarse mesh's bounding box, about one bucket per coarse cell, each coarse cell
 * entered in the buckets its bounding box overlaps; a centroid is tested against the cells of its bucket only, so
 * the whole costs O(coarse + fine) on shape-regular meshes. The tests are exact for straight-sided cells:
 * barycentric coordinates for simplices, the sides of a convex quadrilateral, the face planes of a hexahedron
 * (exact for planar faces; a trilinear hexahedron with warped faces is tested against the planes through each
 * face's centroid with its mean normal, and a wrong guess shows up in the measure check).
 *
 * Nestedness: every fine cell has a parent and each coarse cell's children's measures sum to its own within
 * NESTED_MEASURE_TOLERANCE; otherwise `nested` is false with a reason naming the first failing cell.
 *
 * `reference`: the general loops only (tests: the plane's written-out loops, triangleParents and enterCells2D, must
 * give the same parents).
 */
export function parentCells(coarse: Mesh, fine: Mesh, opts: { reference?: boolean } = {}): ParentCells {
  if (coarse.dim !== fine.dim) {
    throw new RungsInputError(`parent cells need meshes of one dimension, got ${coarse.dim}D and ${fine.dim}D`, 'meshes');
  }
  const reference = opts.reference ?? false;
  const grid = bucketGrid(coarse, reference);
  const parent = new Int32Array(fine.nCells).fill(-1);
  const childCount = new Int32Array(coarse.nCells);
  const { dim, coords, cells } = fine;
  const n = fine.verticesPerCell;
  let orphan = -1;
  if (!reference && coarse.cellKind === 'triangle' && fine.cellKind === 'triangle' && dim === 2) orphan = triangleParents(coarse, fine, grid, parent, childCount);
  else for (let c = 0; c < fine.nCells; c++) {
    let px = 0, py = 0, pz = 0;
    for (let k = 0; k < n; k++) {
      const v = cells[c * n + k]! * dim;
      px += coords[v]!;
      if (dim > 1) py += coords[v + 1]!;
      if (dim > 2) pz += coords[v + 2]!;
    }
    const found = locate(coarse, grid, px / n, py / n, pz / n);
    parent[c] = found;
    if (found >= 0) childCount[found]!++;
    else if (orphan < 0) orphan = c;
  }
  if (orphan >= 0) {
    return { parent, childCount, nested: false, reason: `fine cell ${orphan} has its centroid in no coarse cell` };
  }
  return { parent, childCount, ...checkMeasures(coarse, fine, parent) };
}

/**
 * The loop of parentCells for triangles in the plane, written out for three vertices and two axes: the same centroid
 * sums, buckets and barycentric tests in the same order as the general loop with locate and triangleHolds, so the
 * same parents (test/mesh/nesting.test.ts), in about half the time (2M triangles in 524k: 0.25 s → 0.1 s). Returns
 * the first fine cell without a parent, or −1.
 */
function triangleParents(coarse: Mesh, fine: Mesh, grid: BucketGrid, parent: Int32Array, childCount: Int32Array): number {
  const { coords, cells } = fine;
  const x = coarse.coords, cc = coarse.cells;
  const { start, items } = grid;
  const lo0 = grid.lo[0]!, lo1 = grid.lo[1]!, s0 = grid.size[0]!, s1 = grid.size[1]!, n0 = grid.count[0]!, n1 = grid.count[1]!;
  const tol = POINT_IN_CELL_TOLERANCE;
  let orphan = -1;
  for (let c = 0; c < fine.nCells; c++) {
    const v0 = 2 * cells[3 * c]!, v1 = 2 * cells[3 * c + 1]!, v2 = 2 * cells[3 * c + 2]!;
    const px = (coords[v0]! + coords[v1]! + coords[v2]!) / 3, py = (coords[v0 + 1]! + coords[v1 + 1]! + coords[v2 + 1]!) / 3;
    const b = bucketIndex(px, lo0, s0, n0) + n0 * bucketIndex(py, lo1, s1, n1);
    let found = -1;
    for (let e = start[b]!, end = start[b + 1]!; e < end; e++) {
      const k = items[e]!;
      const a = 2 * cc[3 * k]!, bb = 2 * cc[3 * k + 1]!, d = 2 * cc[3 * k + 2]!;
      const ax = x[a]!, ay = x[a + 1]!;
      const ux = x[bb]! - ax, uy = x[bb + 1]! - ay, vx = x[d]! - ax, vy = x[d + 1]! - ay;
      const wx = px - ax, wy = py - ay;
      const det = ux * vy - uy * vx;
      const l1 = (wx * vy - wy * vx) / det, l2 = (ux * wy - uy * wx) / det;
      if (l1 >= -tol && l2 >= -tol && 1 - l1 - l2 >= -tol) { found = k; break; }
    }
    parent[c] = found;
    if (found >= 0) childCount[found]!++;
    else if (orphan < 0) orphan = c;
  }
  return orphan;
}

/** Whether the children of each coarse cell fill it: Σ |child| = |K| within NESTED_MEASURE_TOLERANCE. */
function checkMeasures(coarse: Mesh, fine: Mesh, parent: Int32Array): { nested: boolean; reason: string | null } {
  const own = cellMeasures(coarse);
  const fineMeasure = cellMeasures(fine);
  const sums = new Float64Array(coarse.nCells);
  for (let c = 0; c < fine.nCells; c++) sums[parent[c]!]! += fineMeasure[c]!;
  for (let K = 0; K < coarse.nCells; K++) {
    const gap = Math.abs(sums[K]! - own[K]!);
    if (gap > NESTED_MEASURE_TOLERANCE * own[K]!) {
      const reason = `coarse cell ${K} measures ${own[K]} but the fine cells whose centroids it holds measure ${sums[K]} ` +
        `(relative difference ${(gap / own[K]!).toExponential(1)})`;
      return { nested: false, reason };
    }
  }
  return { nested: true, reason: null };
}

/** A uniform grid of buckets over a mesh's bounding box; bucket b holds cells items[start[b] .. start[b + 1]). */
interface BucketGrid {
  lo: Float64Array;
  size: Float64Array;
  count: Int32Array;
  start: Int32Array;
  items: Int32Array;
}

/** About one bucket per cell: the side s = (volume of the box / cells)^(1/dim), at least one bucket per axis. */
function bucketGrid(mesh: Mesh, reference: boolean): BucketGrid {
  const { min, max } = boundingBox(mesh);
  const lo = Float64Array.of(0, 0, 0), size = Float64Array.of(1, 1, 1), count = Int32Array.of(1, 1, 1);
  let volume = 1;
  for (let k = 0; k < mesh.dim; k++) volume *= Math.max(max[k]! - min[k]!, 0);
  const side = volume > 0 ? Math.pow(volume / Math.max(mesh.nCells, 1), 1 / mesh.dim) : 0;
  for (let k = 0; k < mesh.dim; k++) {
    const extent = max[k]! - min[k]!;
    count[k] = side > 0 ? Math.max(1, Math.min(Math.ceil(extent / side), 1 << 20)) : 1;
    lo[k] = min[k]!;
    size[k] = extent > 0 ? extent / count[k]! : 1;
  }
  const nBuckets = count[0]! * count[1]! * count[2]!;
  const grid: BucketGrid = { lo, size, count, start: new Int32Array(nBuckets + 1), items: new Int32Array(0) };
  const range = new Int32Array(6);
  enterCells(mesh, grid, range, null, reference); // counts per bucket in start[b + 1]
  for (let b = 0; b < nBuckets; b++) grid.start[b + 1]! += grid.start[b]!;
  grid.items = new Int32Array(grid.start[nBuckets]!);
  enterCells(mesh, grid, range, grid.start.slice(0, nBuckets), reference);
  return grid;
}

/** Enters each cell in the buckets its bounding box overlaps: with fill null, counts them into start[b + 1];
 *  otherwise writes the cell at items[fill[b]++]. range is a scratch of 6 entries (bucket ranges per axis). */
function enterCells(mesh: Mesh, grid: BucketGrid, range: Int32Array, fill: Int32Array | null, reference: boolean): void {
  if (mesh.dim === 2 && !reference) { enterCells2D(mesh, grid, fill); return; }
  const { dim, coords, cells } = mesh;
  const { lo, size, count, start, items } = grid;
  const n = mesh.verticesPerCell;
  for (let c = 0; c < mesh.nCells; c++) {
    range.fill(0);
    for (let k = 0; k < dim; k++) {
      let a = Infinity, b = -Infinity;
      for (let j = 0; j < n; j++) {
        const x = coords[cells[c * n + j]! * dim + k]!;
        if (x < a) a = x;
        if (x > b) b = x;
      }
      // Half-open: a box ending on a bucket boundary does not enter the next bucket (a point exactly there lies in
      // the neighbouring cell too), so a structured mesh whose cells match the buckets puts one square per bucket.
      const first = bucketIndex(a, lo[k]!, size[k]!, count[k]!);
      const last = Math.min(count[k]! - 1, Math.ceil((b - lo[k]!) / size[k]!) - 1);
      range[2 * k] = first;
      range[2 * k + 1] = last > first ? last : first;
    }
    for (let z = range[4]!; z <= range[5]!; z++) {
      for (let y = range[2]!; y <= range[3]!; y++) {
        for (let x = range[0]!; x <= range[1]!; x++) {
          const bucket = x + count[0]! * (y + count[1]! * z);
          if (fill === null) start[bucket + 1]!++;
          else items[fill[bucket]!++] = c;
        }
      }
    }
  }
}

/** enterCells for a mesh in the plane: both axes' bounds in one pass over each cell's vertices, the same buckets in
 *  the same order (the order of a bucket's cells decides which of two cells sharing a point holds it). */
function enterCells2D(mesh: Mesh, grid: BucketGrid, fill: Int32Array | null): void {
  const { coords, cells } = mesh;
  const { start, items } = grid;
  const lo0 = grid.lo[0]!, lo1 = grid.lo[1]!, s0 = grid.size[0]!, s1 = grid.size[1]!, n0 = grid.count[0]!, n1 = grid.count[1]!;
  const n = mesh.verticesPerCell;
  for (let c = 0; c < mesh.nCells; c++) {
    let ax = Infinity, bx = -Infinity, ay = Infinity, by = -Infinity;
    for (let j = 0; j < n; j++) {
      const v = 2 * cells[c * n + j]!;
      const x = coords[v]!, y = coords[v + 1]!;
      if (x < ax) ax = x;
      if (x > bx) bx = x;
      if (y < ay) ay = y;
      if (y > by) by = y;
    }
    const x0 = bucketIndex(ax, lo0, s0, n0), y0 = bucketIndex(ay, lo1, s1, n1);
    const xl = Math.min(n0 - 1, Math.ceil((bx - lo0) / s0) - 1), yl = Math.min(n1 - 1, Math.ceil((by - lo1) / s1) - 1);
    const x1 = xl > x0 ? xl : x0, y1 = yl > y0 ? yl : y0;
    for (let y = y0; y <= y1; y++) {
      for (let x = x0; x <= x1; x++) {
        const bucket = x + n0 * y;
        if (fill === null) start[bucket + 1]!++;
        else items[fill[bucket]!++] = c;
      }
    }
  }
}

function bucketIndex(x: number, lo: number, size: number, count: number): number {
  const i = Math.floor((x - lo) / size);
  return i < 0 ? 0 : i >= count ? count - 1 : i;
}

/** The first cell of the point's bucket that holds (px, py, pz), or −1. */
function locate(mesh: Mesh, grid: BucketGrid, px: number, py: number, pz: number): number {
  const { lo, size, count, start, items } = grid;
  const ix = bucketIndex(px, lo[0]!, size[0]!, count[0]!);
  const iy = bucketIndex(py, lo[1]!, size[1]!, count[1]!);
  const iz = bucketIndex(pz, lo[2]!, size[2]!, count[2]!);
  const b = ix + count[0]! * (iy + count[1]! * iz);
  for (let e = start[b]!; e < start[b + 1]!; e++) {
    const c = items[e]!;
    if (cellHolds(mesh, c, px, py, pz)) return c;
  }
  return -1;
}

/** Whether cell c holds the point, within POINT_IN_CELL_TOLERANCE. */
export function cellHolds(mesh: Mesh, c: number, px: number, py: number, pz: number): boolean {
  const x = mesh.coords, n = mesh.verticesPerCell, base = c * n, cells = mesh.cells;
  const tol = POINT_IN_CELL_TOLERANCE;
  switch (mesh.cellKind) {
    case 'interval': {
      const a = x[cells[base]!]!, b = x[cells[base + 1]!]!;
      const slack = tol * Math.abs(b - a);
      return px >= Math.min(a, b) - slack && px <= Math.max(a, b) + slack;
    }
    case 'triangle':
      return triangleHolds(x, cells[base]!, cells[base + 1]!, cells[base + 2]!, px, py, tol);
    case 'quadrilateral':
      return quadrilateralHolds(x, cells, base, px, py, tol);
    case 'tetrahedron':
      return tetrahedronHolds(x, cells[base]!, cells[base + 1]!, cells[base + 2]!, cells[base + 3]!, px, py, pz, tol);
    case 'hexahedron':
      return hexahedronHolds(x, cells, base, px, py, pz, tol);
  }
}

/** Barycentric coordinates of p in triangle (a, b, c), all ≥ −tol (either orientation). */
function triangleHolds(x: Float64Array, a: number, b: number, c: number, px: number, py: number, tol: number): boolean {
  const ax = x[2 * a]!, ay = x[2 * a + 1]!;
  const ux = x[2 * b]! - ax, uy = x[2 * b + 1]! - ay, vx = x[2 * c]! - ax, vy = x[2 * c + 1]! - ay;
  const wx = px - ax, wy = py - ay;
  const det = ux * vy - uy * vx;
  const l1 = (wx * vy - wy * vx) / det, l2 = (ux * wy - uy * wx) / det;
  return l1 >= -tol && l2 >= -tol && 1 - l1 - l2 >= -tol;
}

/** p on the inner side of each edge of a counter-clockwise convex quadrilateral, within tol × its diagonal. */
function quadrilateralHolds(x: Float64Array, cells: Int32Array, base: number, px: number, py: number, tol: number): boolean {
  const slack = tol * boxDiagonal(x, cells, base, 4, 2);
  for (let k = 0; k < 4; k++) {
    const a = cells[base + k]!, b = cells[base + ((k + 1) & 3)]!;
    const ex = x[2 * b]! - x[2 * a]!, ey = x[2 * b + 1]! - x[2 * a + 1]!;
    const cross = ex * (py - x[2 * a + 1]!) - ey * (px - x[2 * a]!);
    if (cross < -slack * Math.sqrt(ex * ex + ey * ey)) return false; // cross = |edge| × signed distance, left positive
  }
  return true;
}

/** Barycentric coordinates of p in tetrahedron (a, b, c, d), all ≥ −tol (either orientation), by Cramer's rule. */
function tetrahedronHolds(
  x: Float64Array, a: number, b: number, c: number, d: number, px: number, py: number, pz: number, tol: number,
): boolean {
  const ox = x[3 * a]!, oy = x[3 * a + 1]!, oz = x[3 * a + 2]!;
  const ux = x[3 * b]! - ox, uy = x[3 * b + 1]! - oy, uz = x[3 * b + 2]! - oz;
  const vx = x[3 * c]! - ox, vy = x[3 * c + 1]! - oy, vz = x[3 * c + 2]! - oz;
  const wx = x[3 * d]! - ox, wy = x[3 * d + 1]! - oy, wz = x[3 * d + 2]! - oz;
  const qx = px - ox, qy = py - oy, qz = pz - oz;
  const det = triple(ux, uy, uz, vx, vy, vz, wx, wy, wz);
  const l1 = triple(qx, qy, qz, vx, vy, vz, wx, wy, wz) / det;
  const l2 = triple(ux, uy, uz, qx, qy, qz, wx, wy, wz) / det;
  const l3 = triple(ux, uy, uz, vx, vy, vz, qx, qy, qz) / det;
  return l1 >= -tol && l2 >= -tol && l3 >= -tol && 1 - l1 - l2 - l3 >= -tol;
}

/** u · (v × w). */
function triple(ux: number, uy: number, uz: number, vx: number, vy: number, vz: number, wx: number, wy: number, wz: number): number {
  return ux * (vy * wz - vz * wy) + uy * (vz * wx - vx * wz) + uz * (vx * wy - vy * wx);
}

/** p behind each face plane of a hexahedron (outward normal (c − a) × (d − b) of the face (a, b, c, d) listed by
 *  CELL_FACES, through the face's vertex centroid), within tol × the cell's bounding-box diagonal. */
function hexahedronHolds(x: Float64Array, cells: Int32Array, base: number, px: number, py: number, pz: number, tol: number): boolean {
  const slack = tol * boxDiagonal(x, cells, base, 8, 3);
  const faces = CELL_FACES.hexahedron;
  for (let f = 0; f < 6; f++) {
    const face = faces[f]!;
    const a = 3 * cells[base + face[0]]!, b = 3 * cells[base + face[1]]!, c = 3 * cells[base + face[2]]!, d = 3 * cells[base + face[3]]!;
    const sx = x[c]! - x[a]!, sy = x[c + 1]! - x[a + 1]!, sz = x[c + 2]! - x[a + 2]!;
    const tx = x[d]! - x[b]!, ty = x[d + 1]! - x[b + 1]!, tz = x[d + 2]! - x[b + 2]!;
    const nx = sy * tz - sz * ty, ny = sz * tx - sx * tz, nz = sx * ty - sy * tx;
    const qx = px - 0.25 * (x[a]! + x[b]! + x[c]! + x[d]!);
    const qy = py - 0.25 * (x[a + 1]! + x[b + 1]! + x[c + 1]! + x[d + 1]!);
    const qz = pz - 0.25 * (x[a + 2]! + x[b + 2]! + x[c + 2]! + x[d + 2]!);
    if (qx * nx + qy * ny + qz * nz > slack * Math.sqrt(nx * nx + ny * ny + nz * nz)) return false;
  }
  return true;
}

/** Diagonal of the bounding box of a cell's n vertices in dim dimensions. */
function boxDiagonal(x: Float64Array, cells: Int32Array, base: number, n: number, dim: number): number {
  let sum = 0;
  for (let k = 0; k < dim; k++) {
    let a = Infinity, b = -Infinity;
    for (let j = 0; j < n; j++) {
      const v = x[cells[base + j]! * dim + k]!;
      if (v < a) a = v;
      if (v > b) b = v;
    }
    sum += (b - a) * (b - a);
  }
  return Math.sqrt(sum);
}
