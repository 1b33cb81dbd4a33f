import { RungsInputError } from '../errors.ts';
import { signedCellMeasure } from './measure.ts';
import type { Mesh } from './types.ts';
import { meshFloat64 } from './shared-arrays.ts';

/**
 * Regions of a mesh for telling where the error lives: a strip along each boundary tag and the interior.
 *
 * The strip along a tag is the set of cells that touch a facet with that tag, at a facet or only at a vertex: the
 * union of the supports of every basis function attached to the closure of those facets (vertex, edge, face and
 * facet-interior Lagrange dofs alike), so that a wrong boundary value stays inside the strip and never leaks into
 * the interior. It is one cell wide on every level (`layers` widens it to k cells), not a fixed physical width:
 * a flaw that spoils the solution within O(h) of the boundary by δ(h) pointwise gives a one-cell strip an RMS of
 * order δ(h), the order of the boundary error itself, whatever the width of the domain. A strip of fixed width w
 * would dilute it to δ(h)·sqrt(c h / w), half an order higher, with a constant that depends on the arbitrary w.
 * A smooth error spread over the domain gives strip and interior the same RMS order, since an RMS density does not
 * depend on the size of the region it is taken over.
 *
 * A cell touching two tags belongs to both strips (corners in 2D, edges and corners in 3D). For the analysis the
 * strip's own cells (in no other strip) and the meets (cells in the strips of two tags) are kept apart too: a
 * flaw on 'top' puts its error in the corner cell that 'left' shares, and over a whole strip of n cells that one
 * cell would lower the order of 'left' by half an order (δ²/n in its mean square).
 */

/** A set of cells (ascending indices) and its measure (length, area or volume). */
export interface CellSet {
  cells: Int32Array;
  measure: number;
}

/** The cells where the strips of two tags overlap; tags are indices into tagNames, a < b. */
export interface Meet extends CellSet {
  tags: [number, number];
}

export interface BoundaryStrips {
  /** How many cell layers wide each strip is. */
  layers: number;
  tagNames: string[];
  /** strips[t]: the cells touching a facet tagged tagNames[t] (within `layers` steps); empty for an unused tag. */
  strips: CellSet[];
  /** own[t]: the cells of strips[t] that are in no other strip. */
  own: CellSet[];
  /** The pairs of tags whose strips share cells, in order of (a, b). */
  meets: Meet[];
  /** The cells in no strip. */
  interior: CellSet;
}

export interface StripOptions {
  /** Width of each strip in cell layers (default 1): layer k + 1 adds the cells touching a vertex of layer k. */
  layers?: number;
}

/** The strip along each boundary tag of the mesh, their own parts and meets, and the interior. O(tags × cells). */
export function boundaryStrips(mesh: Mesh, options: StripOptions = {}): BoundaryStrips {
  const layers = options.layers ?? 1;
  if (!Number.isInteger(layers) || layers < 1) {
    throw new RungsInputError(`strip layers must be a whole number ≥ 1, got ${String(layers)}`, 'strips.layers');
  }
  const nTags = mesh.tagNames.length;
  const measures = cellMeasures(mesh);
  const inStrip = new Uint8Array(mesh.nCells); // how many strips hold each cell (saturates at 255)
  const cellMark = new Uint8Array(mesh.nCells);
  let stripCells: Int32Array[];
  let interiorCells: Int32Array;
  if (layers === 1 && nTags <= 16) {
    ({ stripCells, interiorCells } = oneLayerStrips(mesh, inStrip));
  } else {
    const vertexMark = new Uint8Array(mesh.nVertices);
    stripCells = [];
    for (let t = 0; t < nTags; t++) {
      markStrip(mesh, t, layers, vertexMark, cellMark);
      const cells = listMarked(cellMark);
      for (let k = 0; k < cells.length; k++) { const c = cells[k]!; if (inStrip[c]! < 255) inStrip[c]!++; }
      stripCells.push(cells);
    }
    interiorCells = listMarked(inStrip, 0);
  }
  const strips = stripCells.map((cells) => cellSet(cells, measures));
  const own = stripCells.map((cells) => cellSet(cells.filter((c) => inStrip[c] === 1), measures));
  const meets = findMeets(stripCells, cellMark, measures);
  const interior = cellSet(interiorCells, measures);
  return { layers, tagNames: [...mesh.tagNames], strips, own, meets, interior };
}

/** The one-layer strips of up to 16 tags in one pass over the cells (markStrip takes one per tag): each vertex gets
 *  the bits of the tags of its facets, each cell the union of its vertices' bits. The same ascending lists as
 *  markStrip's, and inStrip counts each cell's strips. */
function oneLayerStrips(mesh: Mesh, inStrip: Uint8Array): { stripCells: Int32Array[]; interiorCells: Int32Array } {
  const { cells, facets, facetTags } = mesh;
  const n = mesh.verticesPerCell, m = mesh.verticesPerFacet, nTags = mesh.tagNames.length;
  const vertexBits = new Uint16Array(mesh.nVertices);
  for (let f = 0; f < mesh.nFacets; f++) {
    const t = facetTags[f]!;
    if (t < 0 || t >= nTags) continue;
    for (let k = 0; k < m; k++) vertexBits[facets[f * m + k]!] |= 1 << t;
  }
  const cellBits = new Uint16Array(mesh.nCells);
  const counts = new Int32Array(nTags);
  let interior = 0;
  for (let c = 0; c < mesh.nCells; c++) {
    let bits = 0;
    for (let k = 0; k < n; k++) bits |= vertexBits[cells[c * n + k]!]!;
    cellBits[c] = bits;
    if (bits === 0) { interior++; continue; }
    let count = 0;
    for (let t = 0; t < nTags; t++) if (bits & (1 << t)) { counts[t]++; count++; }
    inStrip[c] = count;
  }
  const stripCells = Array.from(counts, (k) => new Int32Array(k));
  const fill = new Int32Array(nTags);
  const interiorCells = new Int32Array(interior);
  let o = 0;
  for (let c = 0; c < mesh.nCells; c++) {
    const bits = cellBits[c]!;
    if (bits === 0) { interiorCells[o++] = c; continue; }
    for (let t = 0; t < nTags; t++) if (bits & (1 << t)) stripCells[t]![fill[t]!++] = c;
  }
  return { stripCells, interiorCells };
}

const measured = new WeakMap<Mesh, Float64Array>();

/** Gives cellMeasures the measures of a mesh computed elsewhere (the same function on another thread, over the same
 *  arrays: src/study/local-order-task.ts), so that they are not computed again. */
export function adoptCellMeasures(mesh: Mesh, measures: Float64Array): void {
  if (measures.length !== mesh.nCells) throw new Error(`adoptCellMeasures: ${measures.length} measures for ${mesh.nCells} cells`);
  measured.set(mesh, measures);
}

/** The absolute measure of every cell, computed once per mesh (the finest level's are asked for by its regions, its
 *  error map and the local orders: 2M triangles each time). Shared between callers: read it, never write it. */
export function cellMeasures(mesh: Mesh): Float64Array {
  const known = measured.get(mesh);
  if (known && known.length === mesh.nCells) return known;
  // In shared memory on a large mesh: a worker thread of the cell team takes them as they are (adoptCellMeasures).
  const out = meshFloat64(mesh.nCells, mesh.nCells);
  if (mesh.cellKind === 'triangle' && mesh.dim === 2) {
    // signedCellMeasure's shoelace sum for three vertices, unrolled in the same order (so the same bits).
    const { coords, cells } = mesh;
    for (let c = 0; c < mesh.nCells; c++) {
      const a = 2 * cells[3 * c]!, b = 2 * cells[3 * c + 1]!, d = 2 * cells[3 * c + 2]!;
      const twice = coords[a]! * coords[b + 1]! - coords[b]! * coords[a + 1]!
        + (coords[b]! * coords[d + 1]! - coords[d]! * coords[b + 1]!)
        + (coords[d]! * coords[a + 1]! - coords[a]! * coords[d + 1]!);
      out[c] = Math.abs(twice / 2);
    }
  } else {
    for (let c = 0; c < mesh.nCells; c++) out[c] = Math.abs(signedCellMeasure(mesh, c));
  }
  measured.set(mesh, out);
  return out;
}

/** Sets cellMark[c] = 1 for the cells within `layers` vertex-steps of the facets tagged t, 0 elsewhere. */
function markStrip(mesh: Mesh, t: number, layers: number, vertexMark: Uint8Array, cellMark: Uint8Array): void {
  const { cells, facets, facetTags } = mesh;
  const n = mesh.verticesPerCell, m = mesh.verticesPerFacet;
  vertexMark.fill(0);
  cellMark.fill(0);
  for (let f = 0; f < mesh.nFacets; f++) {
    if (facetTags[f] !== t) continue;
    for (let k = 0; k < m; k++) vertexMark[facets[f * m + k]!] = 1;
  }
  for (let layer = 0; layer < layers; layer++) {
    for (let c = 0; c < mesh.nCells; c++) {
      if (cellMark[c]) continue;
      for (let k = 0; k < n; k++) if (vertexMark[cells[c * n + k]!] === 1) { cellMark[c] = 1; break; }
    }
    if (layer + 1 === layers) break;
    // The next layer starts from every vertex of the cells marked so far (mark 2 keeps this sweep's additions
    // from spreading further within the same sweep).
    for (let c = 0; c < mesh.nCells; c++) {
      if (!cellMark[c]) continue;
      for (let k = 0; k < n; k++) { const v = cells[c * n + k]!; if (vertexMark[v] === 0) vertexMark[v] = 2; }
    }
    for (let v = 0; v < vertexMark.length; v++) if (vertexMark[v] === 2) vertexMark[v] = 1;
  }
}

/** Ascending indices i with mark[i] === value (default: non-zero when value is omitted). */
function listMarked(mark: Uint8Array, value?: number): Int32Array {
  const hit = value === undefined ? (x: number) => x !== 0 : (x: number) => x === value;
  let count = 0;
  for (let i = 0; i < mark.length; i++) if (hit(mark[i]!)) count++;
  const out = new Int32Array(count);
  let o = 0;
  for (let i = 0; i < mark.length; i++) if (hit(mark[i]!)) out[o++] = i;
  return out;
}

function cellSet(cells: Int32Array, measures: Float64Array): CellSet {
  let measure = 0;
  for (let k = 0; k < cells.length; k++) measure += measures[cells[k]!]!;
  return { cells, measure };
}

/** Every pair of strips that share cells. O(tags² × strip size): strips are a small fraction of the mesh. */
function findMeets(stripCells: Int32Array[], mark: Uint8Array, measures: Float64Array): Meet[] {
  const meets: Meet[] = [];
  for (let a = 0; a < stripCells.length; a++) {
    mark.fill(0);
    const sa = stripCells[a]!;
    for (let k = 0; k < sa.length; k++) mark[sa[k]!] = 1;
    for (let b = a + 1; b < stripCells.length; b++) {
      const shared = stripCells[b]!.filter((c) => mark[c] === 1);
      if (shared.length > 0) meets.push({ ...cellSet(shared, measures), tags: [a, b] });
    }
  }
  return meets;
}

/** Where a region's error peaks: the vertex around which its error gathers most, and the share of the region's
 *  squared error in the region's cells that touch that vertex (see regionPeak). */
export interface RegionPeak {
  share: number;
  /** The vertex's coordinates (dim values). */
  at: number[];
}

/** Error sums over one region: L2 = sqrt(Σ ∫_K e²), H1semi = sqrt(Σ ∫_K |∇e|²), and the RMS densities
 *  sqrt(Σ / measure) (null for an empty region; H1 values null when no gradient densities were given); for the
 *  strips and meets, where each norm's error peaks (peakL2, peakH1semi; null for an empty region or a zero error). */
export interface RegionError {
  cells: number;
  measure: number;
  L2: number;
  H1semi: number | null;
  rmsL2: number | null;
  rmsH1semi: number | null;
  peakL2?: RegionPeak | null;
  peakH1semi?: RegionPeak | null;
}

/** Per-region errors of one level: small plain data (JSON-safe: no typed arrays, no NaN). */
export interface RegionErrors {
  tagNames: string[];
  /** Whole strips, corner cells included, in tag order. */
  strips: RegionError[];
  /** Each strip's own cells (in no other strip), in tag order. */
  own: RegionError[];
  meets: (RegionError & { tags: [string, string] })[];
  interior: RegionError;
}

/** Sums per-cell error densities (∫_K e² and ∫_K |∇e|², length nCells) over the regions of a mesh. */
export function regionErrors(
  mesh: Mesh,
  regions: BoundaryStrips,
  perCellL2sq: Float64Array,
  perCellH1sq: Float64Array | null,
): RegionErrors {
  requirePerCell(mesh, perCellL2sq, 'perCellL2sq');
  if (perCellH1sq !== null) requirePerCell(mesh, perCellH1sq, 'perCellH1sq');
  const sum = (set: CellSet): RegionError => sumOver(set, perCellL2sq, perCellH1sq);
  // Peaks only where a reason may need them (a strip or a meet, never the interior, which may hold most cells).
  const onBoundary = boundaryVertices(mesh);
  const withPeak = (set: CellSet): RegionError => ({
    ...sum(set),
    peakL2: regionPeak(mesh, set, perCellL2sq, onBoundary),
    peakH1semi: perCellH1sq === null ? null : regionPeak(mesh, set, perCellH1sq, onBoundary),
  });
  return {
    tagNames: [...regions.tagNames],
    strips: regions.strips.map(sum),
    own: regions.own.map(withPeak),
    meets: regions.meets.map((m) => ({ ...withPeak(m), tags: [regions.tagNames[m.tags[0]]!, regions.tagNames[m.tags[1]]!] })),
    interior: sum(regions.interior),
  };
}

/**
 * Where a region's error gathers: among the vertices of its cell with the largest error, the one whose touching
 * cells (of the region) hold the most of it (a tie goes to a vertex on the boundary), with that share of the region's total. An error spread along a strip
 * of m cells puts about (cells around one vertex) / m of it there, a share that halves with every halving of h; an
 * error that comes from one point (the singular gradient at a re-entrant corner, data or coefficients that jump at a
 * point) keeps a share of order one on every level, since the local errors fall off geometrically with the distance
 * from the point in units of h (common practice, no source). Null for an empty region or a zero error. O(cells of
 * the region × vertices per cell).
 */
export function regionPeak(mesh: Mesh, set: CellSet, perCell: Float64Array, onBoundary = boundaryVertices(mesh)): RegionPeak | null {
  const n = mesh.verticesPerCell, { cells } = mesh;
  let total = 0, worst = -1, top = 0;
  for (let k = 0; k < set.cells.length; k++) {
    const c = set.cells[k]!, v = perCell[c]!;
    total += v;
    if (v > top) { top = v; worst = c; }
  }
  if (worst < 0 || !(total > 0)) return null;
  const candidates = Array.from({ length: n }, (_, k) => cells[worst * n + k]!);
  const around = new Float64Array(n);
  for (let k = 0; k < set.cells.length; k++) {
    const c = set.cells[k]!;
    for (let j = 0; j < n; j++) {
      const at = candidates.indexOf(cells[c * n + j]!);
      if (at >= 0) around[at]! += perCell[c]!;
    }
  }
  // Ties (two vertices of the worst cell touching the same cells) go to a boundary vertex: a strip is about the boundary.
  let best = 0;
  for (let j = 1; j < n; j++) {
    const tie = around[j]! >= around[best]! * (1 - 1e-12) && around[j]! <= around[best]! * (1 + 1e-12);
    if (around[j]! > around[best]! * (1 + 1e-12) || (tie && onBoundary[candidates[j]!] === 1 && onBoundary[candidates[best]!] !== 1)) best = j;
  }
  const v = candidates[best]!, dim = mesh.dim;
  return { share: around[best]! / total, at: Array.from({ length: dim }, (_, d) => mesh.coords[v * dim + d]!) };
}

/** 1 for the vertices of the mesh's boundary facets. */
function boundaryVertices(mesh: Mesh): Uint8Array {
  const mark = new Uint8Array(mesh.nVertices);
  const m = mesh.verticesPerFacet;
  for (let k = 0; k < mesh.nFacets * m; k++) mark[mesh.facets[k]!] = 1;
  return mark;
}

function requirePerCell(mesh: Mesh, values: Float64Array, name: string): void {
  if (values.length !== mesh.nCells) {
    throw new RungsInputError(`${name} must hold one value per cell (${mesh.nCells}), got ${values.length}`, name);
  }
}

function sumOver(set: CellSet, l2sq: Float64Array, h1sq: Float64Array | null): RegionError {
  let a = 0, b = 0;
  for (let k = 0; k < set.cells.length; k++) {
    const c = set.cells[k]!;
    a += l2sq[c]!;
    if (h1sq !== null) b += h1sq[c]!;
  }
  const rms = (s: number): number | null => (set.measure > 0 ? Math.sqrt(s / set.measure) : null);
  return {
    cells: set.cells.length,
    measure: set.measure,
    L2: Math.sqrt(a),
    H1semi: h1sq === null ? null : Math.sqrt(b),
    rmsL2: rms(a),
    rmsH1semi: h1sq === null ? null : rms(b),
  };
}
