// Points of a domain at which a study's formulas are checked before any level runs: the vertices, cell centres and
// edge midpoints of meshes of the domain itself (so an L-shape's missing quadrant is never sampled, and a corner or a
// vertex at x = 0.5 is), each point marked as on the boundary or inside, and the cell edges along which a sign
// change is followed to find a pole between two sample points (1/(x − 1/3) is never infinite at a float).
import { RungsInputError } from '../errors.ts';
import type { Mesh } from '../mesh/types.ts';
import { formatPoint } from './sample-points.ts';
import type { Dim, ScalarFn } from './types.ts';

export interface DomainSamples {
  dim: Dim;
  /** Packed xyz of points strictly inside the domain. */
  interior: Float64Array;
  /** Packed xyz of points on the boundary (vertices of boundary facets and facet centres). */
  boundary: Float64Array;
  /** Boundary points per tag name (for data given on part of the boundary, such as a Robin α). */
  byTag: Map<string, Float64Array>;
  /** Cell edges, 6 numbers each (both end points); `edgeOnBoundary[e]` is 1 when both end points are boundary
   *  vertices (the edge may lie on the boundary). */
  edges: Float64Array;
  edgeOnBoundary: Uint8Array;
}

/** Growable packed xyz, so that no array of boxed numbers is built per point. */
class Points {
  data: Float64Array;
  length = 0;
  constructor(capacity: number) { this.data = new Float64Array(Math.max(3, capacity)); }
  push(x: number, y: number, z: number): void {
    if (this.length + 3 > this.data.length) { const d = new Float64Array(2 * this.data.length); d.set(this.data); this.data = d; }
    this.data[this.length++] = x; this.data[this.length++] = y; this.data[this.length++] = z;
  }
  done(): Float64Array { return this.data.slice(0, this.length); }
}

/** Samples of the union of the given meshes of one domain. An edge shared by two cells is listed twice (harmless,
 *  cheaper than finding duplicates). */
export function domainSamples(meshes: readonly Mesh[]): DomainSamples {
  const dim = meshes[0]!.dim;
  const size = meshes.reduce((n, m) => n + m.nVertices + m.nCells * (1 + m.verticesPerCell * m.verticesPerCell) + 2 * m.nFacets, 0);
  const interior = new Points(3 * size), boundary = new Points(3 * size / 4), edges = new Points(6 * size);
  const onBoundary: number[] = [];
  const tagged = new Map<string, Points>();
  const c = [0, 0, 0], a = [0, 0, 0], b = [0, 0, 0];
  for (const mesh of meshes) {
    const { coords, cells, facets, nCells, nFacets, verticesPerCell: vpc, verticesPerFacet: vpf } = mesh;
    const get = (v: number, out: number[]) => { for (let d = 0; d < 3; d++) out[d] = d < dim ? coords[v * dim + d]! : 0; };
    const isBoundary = new Uint8Array(mesh.nVertices);
    for (let i = 0; i < nFacets * vpf; i++) isBoundary[facets[i]!] = 1;
    for (let v = 0; v < mesh.nVertices; v++) { get(v, a); (isBoundary[v] ? boundary : interior).push(a[0]!, a[1]!, a[2]!); }
    for (let f = 0; f < nFacets; f++) {
      const tag = mesh.tagNames[mesh.facetTags[f]!] ?? '';
      let list = tagged.get(tag);
      if (!list) { list = new Points(64); tagged.set(tag, list); }
      c[0] = c[1] = c[2] = 0;
      for (let k = 0; k < vpf; k++) {
        get(facets[f * vpf + k]!, a);
        list.push(a[0]!, a[1]!, a[2]!);
        for (let d = 0; d < 3; d++) c[d]! += a[d]! / vpf;
      }
      boundary.push(c[0]!, c[1]!, c[2]!);
      list.push(c[0]!, c[1]!, c[2]!);
    }
    const quad = mesh.cellKind === 'quadrilateral';
    for (let cell = 0; cell < nCells; cell++) {
      c[0] = c[1] = c[2] = 0;
      for (let i = 0; i < vpc; i++) {
        const va = cells[cell * vpc + i]!;
        get(va, a);
        for (let d = 0; d < 3; d++) c[d]! += a[d]! / vpc;
        // Quadrilateral sides join consecutive vertices; every pair of a simplex is an edge.
        for (let j = quad ? (i + 1) % vpc : i + 1; quad ? j === (i + 1) % vpc : j < vpc; j = quad ? -1 : j + 1) {
          const vb = cells[cell * vpc + j]!;
          get(vb, b);
          edges.push(a[0]!, a[1]!, a[2]!);
          edges.push(b[0]!, b[1]!, b[2]!);
          const both = isBoundary[va]! & isBoundary[vb]!;
          onBoundary.push(both);
          // The midpoint of an edge with an interior end point is inside; one between two boundary vertices may not be.
          (both ? boundary : interior).push((a[0]! + b[0]!) / 2, (a[1]! + b[1]!) / 2, (a[2]! + b[2]!) / 2);
        }
      }
      interior.push(c[0]!, c[1]!, c[2]!);
    }
  }
  return {
    dim,
    interior: interior.done(),
    boundary: boundary.done(),
    byTag: new Map([...tagged].map(([t, v]) => [t, v.done()])),
    edges: edges.done(),
    edgeOnBoundary: Uint8Array.from(onBoundary),
  };
}

/** Where a function is not finite: the point and the value, or null. */
export interface NonFinite { x: number; y: number; z: number; value: number; onBoundary: boolean }

function firstNonFinite(fn: ScalarFn, points: Float64Array, onBoundary: boolean): NonFinite | null {
  for (let p = 0; p < points.length; p += 3) {
    const value = fn(points[p]!, points[p + 1]!, points[p + 2]!);
    if (!Number.isFinite(value)) return { x: points[p]!, y: points[p + 1]!, z: points[p + 2]!, value, onBoundary };
  }
  return null;
}

/** Steps of bisection along an edge: enough to reach neighbouring floats on a unit edge (2^-60). */
const BISECTIONS = 60;
/** A bracket whose end values have grown by this factor over the edge's smaller end value holds a pole. */
const POLE_GROWTH = 1e6;

/**
 * A pole of fn on a cell edge: an edge whose end values differ in sign is bisected; where the values shrink it holds a
 * root (stopped early), where they grow without bound (by POLE_GROWTH) or stop being finite it holds a pole, which is
 * returned (a jump, as of a sign function, neither shrinks nor grows and is not one).
 */
function firstPole(fn: ScalarFn, s: DomainSamples, interiorOnly: boolean): NonFinite | null {
  const e = s.edges;
  for (let k = 0; k < s.edgeOnBoundary.length; k++) {
    if (interiorOnly && s.edgeOnBoundary[k]) continue;
    let ax = e[6 * k]!, ay = e[6 * k + 1]!, az = e[6 * k + 2]!;
    let bx = e[6 * k + 3]!, by = e[6 * k + 4]!, bz = e[6 * k + 5]!;
    let fa = fn(ax, ay, az), fb = fn(bx, by, bz);
    if (!(fa * fb < 0) || !Number.isFinite(fa) || !Number.isFinite(fb)) continue;
    const start = Math.min(Math.abs(fa), Math.abs(fb));
    for (let step = 0; step < BISECTIONS; step++) {
      const mx = (ax + bx) / 2, my = (ay + by) / 2, mz = (az + bz) / 2;
      const fm = fn(mx, my, mz);
      if (!Number.isFinite(fm)) return { x: mx, y: my, z: mz, value: fm, onBoundary: s.edgeOnBoundary[k] === 1 };
      if (fm === 0 || (mx === ax && my === ay && mz === az) || (mx === bx && my === by && mz === bz)) break;
      if (fm * fa < 0) { bx = mx; by = my; bz = mz; fb = fm; } else { ax = mx; ay = my; az = mz; fa = fm; }
      if (Math.max(Math.abs(fa), Math.abs(fb)) < start / 8) break;   // shrinking: a root
    }
    if (Math.min(Math.abs(fa), Math.abs(fb)) > POLE_GROWTH * start) {
      const pick = Math.abs(fa) > Math.abs(fb);
      return { x: pick ? ax : bx, y: pick ? ay : by, z: pick ? az : bz, value: pick ? fa : fb, onBoundary: s.edgeOnBoundary[k] === 1 };
    }
  }
  return null;
}

/** Where fn is NaN, infinite or has a pole, among the samples (interior only, or the closed domain), or null. */
export function findSingular(fn: ScalarFn, s: DomainSamples, region: 'closed' | 'interior'): NonFinite | null {
  return firstNonFinite(fn, s.interior, false)
    ?? (region === 'closed' ? firstNonFinite(fn, s.boundary, true) : null)
    ?? firstPole(fn, s, region === 'interior');
}

function valueText(v: number): string {
  return Number.isNaN(v) ? 'NaN' : v === Infinity ? '+Infinity' : v === -Infinity ? '-Infinity' : `${v.toPrecision(3)} (growing without bound: a pole)`;
}

/**
 * Refuses a function that is NaN, infinite or singular at a sample of the domain: `closed` checks the boundary too
 * (what rungs evaluates at boundary nodes: the exact solution, the coefficients), `interior` only inside (what is
 * evaluated at quadrature points only: a source singular at a corner is allowed). The message names the point.
 */
export function assertFiniteOnDomain(fn: ScalarFn, name: string, s: DomainSamples, region: 'closed' | 'interior', why: string): void {
  const bad = findSingular(fn, s, region);
  if (bad === null) return;
  throw new RungsInputError(
    `${name} is ${valueText(bad.value)} at ${formatPoint(bad.x, bad.y, bad.z, s.dim)} ${bad.onBoundary ? 'on the boundary of' : 'inside'} the domain; ` +
    `it must be finite ${region === 'closed' ? 'on the whole domain, boundary included' : 'inside the domain'} (${why})`,
    name,
  );
}

/** Smallest and largest value of fn over a set of points, with where they are. */
export interface Range { min: number; max: number; argmin: [number, number, number]; argmax: [number, number, number]; mean: number }

export function rangeOver(fn: ScalarFn, ...sets: Float64Array[]): Range {
  const r: Range = { min: Infinity, max: -Infinity, argmin: [0, 0, 0], argmax: [0, 0, 0], mean: 0 };
  let count = 0;
  for (const pts of sets) {
    for (let p = 0; p < pts.length; p += 3) {
      const v = fn(pts[p]!, pts[p + 1]!, pts[p + 2]!);
      if (!Number.isFinite(v)) continue;
      if (v < r.min) { r.min = v; r.argmin = [pts[p]!, pts[p + 1]!, pts[p + 2]!]; }
      if (v > r.max) { r.max = v; r.argmax = [pts[p]!, pts[p + 1]!, pts[p + 2]!]; }
      r.mean += v;
      count++;
    }
  }
  r.mean = count ? r.mean / count : Number.NaN;
  return r;
}
