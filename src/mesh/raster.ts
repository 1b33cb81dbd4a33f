/**
 * Per-cell values (error densities, local orders) turned into a compact map for a report: a regular grid of pixels
 * over the mesh's bounding box in 2D (a slice through the middle of the box in 3D), the profile along the line in 1D.
 * A map holds plain numbers only; drawing is the report's business (src/report/error-map.ts).
 */
import { RungsInputError } from '../errors.ts';
import { boundingBox } from './bounding-box.ts';
import { cellMeasures } from './regions.ts';
import type { Mesh } from './types.ts';

/** A map of per-cell values.
 *  raster: nx × ny pixels over bbox = [x0, x1, y0, y1]; pixel (i, j) (i along x, j along y, j = 0 at y0: rows go
 *  upward) is values[i + j nx], the value of the cell that holds the pixel's centre
 *  (x0 + (i + ½)(x1 − x0)/nx, y0 + (j + ½)(y1 − y0)/ny), NaN where no cell does (outside the domain). A 3D mesh gives
 *  the slice at z = slice.at.
 *  profile (1D): values at increasing positions x: the cell midpoints, or, on meshes with more cells than the
 *  profile may hold, equally spaced sample points, each with the value of the cell that holds it. */
export type ErrorMap =
  | { kind: 'raster'; nx: number; ny: number; bbox: [number, number, number, number]; slice?: { axis: 'z'; at: number }; values: Float32Array }
  | { kind: 'profile'; x: Float64Array; values: Float64Array };

/** An ErrorMap as plain JSON: each array as the base64 text of its bytes as little-endian IEEE 754 single-precision
 *  numbers (NaN stays NaN, which JSON numbers could not hold). A 128 × 128 raster takes 87 KB of base64. */
export type EncodedErrorMap =
  | { kind: 'raster'; nx: number; ny: number; bbox: [number, number, number, number]; slice?: { axis: 'z'; at: number }; encoding: 'float32le-base64'; values: string }
  | { kind: 'profile'; n: number; encoding: 'float32le-base64'; x: string; values: string };

export interface RasterOptions {
  /** Pixels along the longer side of the box (default 128: a square domain gives 128 × 128); the shorter side gets
   *  as many as keep the aspect, at least 1. */
  maxPixels?: number;
  /** Most points of a 1D profile (default 1024): a mesh with more cells is sampled at this many equally spaced
   *  points. */
  maxProfilePoints?: number;
}

export const DEFAULT_MAX_PIXELS = 128;
export const DEFAULT_MAX_PROFILE_POINTS = 1024;
/** Upper bound on either count: a map is for a page, not for analysis. */
const MAX_SIDE = 4096;

/** Barycentric slack: a pixel centre on a shared edge or face (or on the boundary, up to rounding) belongs to the
 *  first cell that claims it. */
const INSIDE_SLACK = 1e-10;

/** The triangles a quadrilateral is cut into for point location: a convex quadrilateral (positive Jacobian
 *  everywhere) with straight edges is exactly their union. */
const QUAD_TRIANGLES = new Int8Array([0, 1, 2, 0, 2, 3]);
const TRIANGLE = new Int8Array([0, 1, 2]);
/** A hexahedron as Kuhn's six tetrahedra around its diagonal 0–6 (Kuhn 1960), vertex order of src/mesh/types.ts: one
 *  per path from corner 0 to corner 6 along the edges. Exact for parallelepipeds; for a hexahedron with warped faces
 *  the cut faces are planes through its corners, which moves the picture's cell borders by at most the warp. */
const HEX_TETRAHEDRA = new Int8Array([0, 1, 2, 6, 0, 1, 5, 6, 0, 3, 2, 6, 0, 3, 7, 6, 0, 4, 5, 6, 0, 4, 7, 6]);
const TETRAHEDRON = new Int8Array([0, 1, 2, 3]);

function requireSide(value: unknown, field: string, fallback: number): number {
  if (value === undefined) return fallback;
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 1 || value > MAX_SIDE) {
    throw new RungsInputError(`${field} must be an integer from 1 to ${MAX_SIDE}, got ${String(value)}`, field);
  }
  return value;
}

/** sqrt(∫_K e² / |K|) per cell from the integrals ∫_K e² (the root mean square of e over K, a density that does not
 *  shrink with the cell's size). Negative integrals (round-off of a sum of squares) count as 0. */
export function cellDensities(mesh: Mesh, cellIntegrals: ArrayLike<number>): Float64Array {
  if (cellIntegrals.length !== mesh.nCells) {
    throw new RungsInputError(`cell integrals: expected one per cell (${mesh.nCells}), got ${cellIntegrals.length}`, 'cellIntegrals');
  }
  const out = new Float64Array(mesh.nCells);
  const measures = cellMeasures(mesh);
  for (let c = 0; c < mesh.nCells; c++) {
    const measure = measures[c]!;
    const integral = cellIntegrals[c]!;
    out[c] = measure > 0 ? Math.sqrt(Math.max(0, integral) / measure) : Number.NaN;
  }
  return out;
}

/** The cell of each pixel, by mesh and raster size (rasterizeCells). */
const located = new WeakMap<Mesh, Map<string, Int32Array>>();

/**
 * The map of `perCell` (one value per cell) on `mesh`: a raster in 2D, the mid-plane slice z = (z0 + z1)/2 in 3D, the
 * profile in 1D (see ErrorMap).
 *
 * Point location: the pixel grid is its own bucket grid. Each cell (each triangle of a quadrilateral, each
 * tetrahedron of a hexahedron) visits only the pixel centres inside its bounding box and tests them with barycentric
 * coordinates (scan conversion, common practice, no source). On a shape-regular mesh a pixel centre lies in the boxes
 * of a bounded number of cells, so the work is O(cells + pixels); in 3D only the cells that cross the plane visit any
 * pixel. Typed arrays throughout, nothing allocated per cell or per pixel.
 */
export function rasterizeCells(mesh: Mesh, perCell: ArrayLike<number>, opts: RasterOptions = {}): ErrorMap {
  if (perCell.length !== mesh.nCells) {
    throw new RungsInputError(`per-cell values: expected one per cell (${mesh.nCells}), got ${perCell.length}`, 'perCell');
  }
  requireSide(opts.maxPixels, 'maxPixels', DEFAULT_MAX_PIXELS);
  const maxPoints = requireSide(opts.maxProfilePoints, 'maxProfilePoints', DEFAULT_MAX_PROFILE_POINTS);
  if (mesh.dim === 1) return profile(mesh, perCell, maxPoints);
  const r = rasterOf(mesh, opts);
  const owner = pixelOwners(mesh, opts)!;
  const values = new Float32Array(r.nx * r.ny);
  for (let p = 0; p < values.length; p++) {
    const c = owner[p]!;
    values[p] = c >= 0 ? perCell[c]! : Number.NaN;
  }
  return { kind: 'raster', nx: r.nx, ny: r.ny, bbox: [r.x0, r.x1, r.y0, r.y1], ...(r.slice ? { slice: { ...r.slice } } : {}), values };
}

interface Raster { nx: number; ny: number; x0: number; x1: number; y0: number; y1: number; slice?: { axis: 'z'; at: number } }

/** Rasters by mesh and side (a mesh's box is found once: its maps and their pixels ask for it several times). */
const rasters = new WeakMap<Mesh, Map<number, Raster>>();

/** The raster of a 2D or 3D mesh's map: pixels per axis, the box, the slice plane in 3D. Read it, never write it. */
function rasterOf(mesh: Mesh, opts: RasterOptions): Raster {
  const maxPixels = requireSide(opts.maxPixels, 'maxPixels', DEFAULT_MAX_PIXELS);
  let bySide = rasters.get(mesh);
  if (!bySide) { bySide = new Map(); rasters.set(mesh, bySide); }
  let r = bySide.get(maxPixels);
  if (!r) { r = newRaster(mesh, maxPixels); bySide.set(maxPixels, r); }
  return r;
}

function newRaster(mesh: Mesh, maxPixels: number): Raster {
  const box = boundingBox(mesh);
  const x0 = box.min[0]!, x1 = box.max[0]!, y0 = box.min[1]!, y1 = box.max[1]!;
  const width = x1 - x0, height = y1 - y0;
  if (!(width > 0) || !(height > 0)) {
    throw new RungsInputError(`mesh: the bounding box [${x0}, ${x1}] × [${y0}, ${y1}] is empty; no map can be drawn`, 'mesh');
  }
  const nx = width >= height ? maxPixels : Math.max(1, Math.round((maxPixels * width) / height));
  const ny = height >= width ? maxPixels : Math.max(1, Math.round((maxPixels * height) / width));
  const slice: { axis: 'z'; at: number } | undefined = mesh.dim === 3 ? { axis: 'z', at: (box.min[2]! + box.max[2]!) / 2 } : undefined;
  return { nx, ny, x0, x1, y0, y1, ...(slice ? { slice } : {}) };
}

/**
 * The cell holding each pixel centre of the mesh's raster (−1: none), row by row; null for a 1D mesh (a profile).
 * The pixels' cells depend on the mesh and the raster only: located once for every map of the same mesh (the finest
 * level draws two, one per norm: 2M triangles each time on the P1 ladder), or taken from another thread that located
 * them (adoptPixelOwners). Shared between callers: read it, never write it.
 */
export function pixelOwners(mesh: Mesh, opts: RasterOptions = {}): Int32Array | null {
  if (mesh.dim === 1) return null;
  const r = rasterOf(mesh, opts);
  const key = `${r.nx}×${r.ny}`;
  let byRaster = located.get(mesh);
  if (!byRaster) { byRaster = new Map(); located.set(mesh, byRaster); }
  let owner = byRaster.get(key);
  if (!owner) {
    owner = new Int32Array(r.nx * r.ny).fill(-1);
    const grid: PixelGrid = { nx: r.nx, ny: r.ny, x0: r.x0, y0: r.y0, dx: (r.x1 - r.x0) / r.nx, dy: (r.y1 - r.y0) / r.ny, owner };
    if (mesh.dim === 2) locate2D(mesh, grid);
    else locateSlice(mesh, grid, r.slice!.at);
    byRaster.set(key, owner);
  }
  return owner;
}

/** The number of pixels of the mesh's raster (0 for a 1D mesh): the length pixelOwners gives. */
export function pixelCount(mesh: Mesh, opts: RasterOptions = {}): number {
  if (mesh.dim === 1) return 0;
  const r = rasterOf(mesh, opts);
  return r.nx * r.ny;
}

/** Gives pixelOwners the owners of the mesh's raster located elsewhere (the same function on another thread, over
 *  the same arrays: src/study/pixel-task.ts), so that they are not located again. */
export function adoptPixelOwners(mesh: Mesh, owner: Int32Array, opts: RasterOptions = {}): void {
  const r = rasterOf(mesh, opts);
  if (owner.length !== r.nx * r.ny) throw new Error(`adoptPixelOwners: ${owner.length} owners for ${r.nx * r.ny} pixels`);
  let byRaster = located.get(mesh);
  if (!byRaster) { byRaster = new Map(); located.set(mesh, byRaster); }
  byRaster.set(`${r.nx}×${r.ny}`, owner);
}

interface PixelGrid {
  nx: number;
  ny: number;
  x0: number;
  y0: number;
  dx: number;
  dy: number;
  /** Cell holding each pixel centre, −1 until one claims it. */
  owner: Int32Array;
}

/** First and last pixel index whose centre lies in [lo, hi] along an axis, clamped to [0, n − 1] (last < first when
 *  none does); the slack keeps a centre that sits on the box's edge. */
function firstCentre(lo: number, origin: number, step: number): number {
  return Math.max(0, Math.ceil((lo - origin) / step - 0.5 - 1e-9));
}
function lastCentre(hi: number, origin: number, step: number, n: number): number {
  return Math.min(n - 1, Math.floor((hi - origin) / step - 0.5 + 1e-9));
}

function locate2D(mesh: Mesh, grid: PixelGrid): void {
  const { coords, cells, nCells, verticesPerCell } = mesh;
  const parts = mesh.cellKind === 'quadrilateral' ? QUAD_TRIANGLES : TRIANGLE;
  const { nx, ny, x0, y0, dx, dy, owner } = grid;
  for (let c = 0; c < nCells; c++) {
    const base = c * verticesPerCell;
    for (let t = 0; t < parts.length; t += 3) {
      const a = 2 * cells[base + parts[t]!]!, b = 2 * cells[base + parts[t + 1]!]!, d = 2 * cells[base + parts[t + 2]!]!;
      const ax = coords[a]!, ay = coords[a + 1]!, bx = coords[b]!, by = coords[b + 1]!, cx = coords[d]!, cy = coords[d + 1]!;
      const twiceArea = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
      if (twiceArea === 0) continue;
      const i0 = firstCentre(Math.min(ax, bx, cx), x0, dx), i1 = lastCentre(Math.max(ax, bx, cx), x0, dx, nx);
      const j0 = firstCentre(Math.min(ay, by, cy), y0, dy), j1 = lastCentre(Math.max(ay, by, cy), y0, dy, ny);
      for (let j = j0; j <= j1; j++) {
        const py = y0 + (j + 0.5) * dy;
        for (let i = i0; i <= i1; i++) {
          const p = i + j * nx;
          if (owner[p]! >= 0) continue;
          const px = x0 + (i + 0.5) * dx;
          // Barycentric coordinates of (px, py): signed areas of the sub-triangles over the whole; the signs make the
          // test independent of the triangle's orientation.
          const la = ((bx - px) * (cy - py) - (by - py) * (cx - px)) / twiceArea;
          const lb = ((cx - px) * (ay - py) - (cy - py) * (ax - px)) / twiceArea;
          if (la >= -INSIDE_SLACK && lb >= -INSIDE_SLACK && 1 - la - lb >= -INSIDE_SLACK) owner[p] = c;
        }
      }
    }
  }
}

function locateSlice(mesh: Mesh, grid: PixelGrid, z: number): void {
  const { coords, cells, nCells, verticesPerCell } = mesh;
  const parts = mesh.cellKind === 'hexahedron' ? HEX_TETRAHEDRA : TETRAHEDRON;
  const { nx, ny, x0, y0, dx, dy, owner } = grid;
  for (let c = 0; c < nCells; c++) {
    const base = c * verticesPerCell;
    // Skip at once the cells that do not cross the plane.
    let zLo = Infinity, zHi = -Infinity;
    for (let k = 0; k < verticesPerCell; k++) {
      const vz = coords[3 * cells[base + k]! + 2]!;
      if (vz < zLo) zLo = vz;
      if (vz > zHi) zHi = vz;
    }
    const zSlack = 1e-9 * (zHi - zLo);
    if (z < zLo - zSlack || z > zHi + zSlack) continue;
    for (let t = 0; t < parts.length; t += 4) {
      const a = 3 * cells[base + parts[t]!]!, b = 3 * cells[base + parts[t + 1]!]!;
      const d = 3 * cells[base + parts[t + 2]!]!, e = 3 * cells[base + parts[t + 3]!]!;
      const ax = coords[a]!, ay = coords[a + 1]!, az = coords[a + 2]!;
      // Columns of the map from barycentric (λb, λc, λd) to x − a.
      const m00 = coords[b]! - ax, m10 = coords[b + 1]! - ay, m20 = coords[b + 2]! - az;
      const m01 = coords[d]! - ax, m11 = coords[d + 1]! - ay, m21 = coords[d + 2]! - az;
      const m02 = coords[e]! - ax, m12 = coords[e + 1]! - ay, m22 = coords[e + 2]! - az;
      const det = m00 * (m11 * m22 - m12 * m21) - m01 * (m10 * m22 - m12 * m20) + m02 * (m10 * m21 - m11 * m20);
      if (det === 0) continue;
      const tzLo = az + Math.min(0, m20, m21, m22), tzHi = az + Math.max(0, m20, m21, m22);
      if (z < tzLo - zSlack || z > tzHi + zSlack) continue;
      // Rows of the inverse (adjugate over det, Cramer's rule).
      const r00 = (m11 * m22 - m12 * m21) / det, r01 = (m02 * m21 - m01 * m22) / det, r02 = (m01 * m12 - m02 * m11) / det;
      const r10 = (m12 * m20 - m10 * m22) / det, r11 = (m00 * m22 - m02 * m20) / det, r12 = (m02 * m10 - m00 * m12) / det;
      const r20 = (m10 * m21 - m11 * m20) / det, r21 = (m01 * m20 - m00 * m21) / det, r22 = (m00 * m11 - m01 * m10) / det;
      const i0 = firstCentre(ax + Math.min(0, m00, m01, m02), x0, dx), i1 = lastCentre(ax + Math.max(0, m00, m01, m02), x0, dx, nx);
      const j0 = firstCentre(ay + Math.min(0, m10, m11, m12), y0, dy), j1 = lastCentre(ay + Math.max(0, m10, m11, m12), y0, dy, ny);
      const qz = z - az;
      for (let j = j0; j <= j1; j++) {
        const qy = y0 + (j + 0.5) * dy - ay;
        for (let i = i0; i <= i1; i++) {
          const p = i + j * nx;
          if (owner[p]! >= 0) continue;
          const qx = x0 + (i + 0.5) * dx - ax;
          const lb = r00 * qx + r01 * qy + r02 * qz;
          const lc = r10 * qx + r11 * qy + r12 * qz;
          const ld = r20 * qx + r21 * qy + r22 * qz;
          if (lb >= -INSIDE_SLACK && lc >= -INSIDE_SLACK && ld >= -INSIDE_SLACK && 1 - lb - lc - ld >= -INSIDE_SLACK) owner[p] = c;
        }
      }
    }
  }
}

function profile(mesh: Mesh, perCell: ArrayLike<number>, maxPoints: number): ErrorMap {
  const { coords, cells, nCells } = mesh;
  // Cells in order of their left end (a user mesh need not list them left to right).
  const order = new Int32Array(nCells);
  const left = new Float64Array(nCells);
  const right = new Float64Array(nCells);
  for (let c = 0; c < nCells; c++) {
    order[c] = c;
    const a = coords[cells[2 * c]!]!, b = coords[cells[2 * c + 1]!]!;
    left[c] = Math.min(a, b);
    right[c] = Math.max(a, b);
  }
  order.sort((p, q) => left[p]! - left[q]!);
  if (nCells <= maxPoints) {
    const x = new Float64Array(nCells);
    const values = new Float64Array(nCells);
    for (let k = 0; k < nCells; k++) {
      const c = order[k]!;
      x[k] = (left[c]! + right[c]!) / 2;
      values[k] = perCell[c]!;
    }
    return { kind: 'profile', x, values };
  }
  // Equally spaced samples, each taking the value of the cell that holds it (a walk along the sorted cells).
  const lo = left[order[0]!]!;
  let hi = -Infinity;
  for (let c = 0; c < nCells; c++) if (right[c]! > hi) hi = right[c]!;
  const step = (hi - lo) / maxPoints;
  const x = new Float64Array(maxPoints);
  const values = new Float64Array(maxPoints);
  let k = 0;
  for (let s = 0; s < maxPoints; s++) {
    const xs = lo + (s + 0.5) * step;
    while (k < nCells - 1 && right[order[k]!]! < xs) k++;
    const c = order[k]!;
    x[s] = xs;
    values[s] = left[c]! <= xs && xs <= right[c]! ? perCell[c]! : Number.NaN;
  }
  return { kind: 'profile', x, values };
}

function float32Base64(values: ArrayLike<number>): string {
  const bytes = new Uint8Array(4 * values.length);
  const view = new DataView(bytes.buffer);
  for (let k = 0; k < values.length; k++) view.setFloat32(4 * k, values[k]!, true);
  return Buffer.from(bytes).toString('base64');
}

function float32FromBase64(text: unknown, count: number, field: string): Float32Array {
  if (typeof text !== 'string') throw new RungsInputError(`${field} must be a base64 string`, field);
  const bytes = Buffer.from(text, 'base64');
  if (bytes.length !== 4 * count) {
    throw new RungsInputError(`${field}: expected ${count} float32 numbers (${4 * count} bytes), got ${bytes.length} bytes`, field);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const out = new Float32Array(count);
  for (let k = 0; k < count; k++) out[k] = view.getFloat32(4 * k, true);
  return out;
}

/** The map as plain JSON (see EncodedErrorMap). */
export function encodeErrorMap(map: ErrorMap): EncodedErrorMap {
  if (map.kind === 'profile') {
    return { kind: 'profile', n: map.x.length, encoding: 'float32le-base64', x: float32Base64(map.x), values: float32Base64(map.values) };
  }
  return {
    kind: 'raster',
    nx: map.nx,
    ny: map.ny,
    bbox: [map.bbox[0], map.bbox[1], map.bbox[2], map.bbox[3]],
    ...(map.slice ? { slice: { axis: map.slice.axis, at: map.slice.at } } : {}),
    encoding: 'float32le-base64',
    values: float32Base64(map.values),
  };
}

/** The map back from its JSON form; a malformed one throws RungsInputError naming the field. */
export function decodeErrorMap(encoded: EncodedErrorMap, where = 'error map'): ErrorMap {
  const e = encoded as Partial<Record<string, unknown>>;
  if (e.encoding !== 'float32le-base64') {
    throw new RungsInputError(`${where}.encoding must be 'float32le-base64', got ${JSON.stringify(e.encoding)}`, `${where}.encoding`);
  }
  const count = (value: unknown, field: string, most: number): number => {
    if (typeof value !== 'number' || !Number.isInteger(value) || value < 1 || value > most) {
      throw new RungsInputError(`${where}.${field} must be an integer from 1 to ${most}, got ${String(value)}`, `${where}.${field}`);
    }
    return value;
  };
  if (e.kind === 'profile') {
    const n = count(e.n, 'n', 1 << 24);
    return {
      kind: 'profile',
      x: Float64Array.from(float32FromBase64(e.x, n, `${where}.x`)),
      values: Float64Array.from(float32FromBase64(e.values, n, `${where}.values`)),
    };
  }
  if (e.kind !== 'raster') {
    throw new RungsInputError(`${where}.kind must be 'raster' or 'profile', got ${JSON.stringify(e.kind)}`, `${where}.kind`);
  }
  const nx = count(e.nx, 'nx', MAX_SIDE);
  const ny = count(e.ny, 'ny', MAX_SIDE);
  const bbox = e.bbox;
  if (!Array.isArray(bbox) || bbox.length !== 4 || !bbox.every((v) => typeof v === 'number' && Number.isFinite(v)) || !(bbox[0] < bbox[1]) || !(bbox[2] < bbox[3])) {
    throw new RungsInputError(`${where}.bbox must be [x0, x1, y0, y1] with finite x0 < x1 and y0 < y1, got ${JSON.stringify(bbox)}`, `${where}.bbox`);
  }
  const slice = e.slice as { axis?: unknown; at?: unknown } | undefined;
  if (slice !== undefined && (slice.axis !== 'z' || typeof slice.at !== 'number' || !Number.isFinite(slice.at))) {
    throw new RungsInputError(`${where}.slice must be { axis: 'z', at: <finite number> }, got ${JSON.stringify(slice)}`, `${where}.slice`);
  }
  return {
    kind: 'raster',
    nx,
    ny,
    bbox: [bbox[0], bbox[1], bbox[2], bbox[3]],
    ...(slice ? { slice: { axis: 'z' as const, at: slice.at as number } } : {}),
    values: float32FromBase64(e.values, nx * ny, `${where}.values`),
  };
}
