// Folded and overlapping cells in a mesh read from a file. The reader turns every cell positive (it accepts either
// orientation per cell), so src/mesh's inverted-cell check cannot see a mesh that folds over itself; these checks can.
// With every cell positively oriented (common practice, no source; the degree argument of planar maps):
//  1. facets: two cells sharing a facet must lie on opposite sides of it, and no facet has three cells — finds
//     folds across an edge (2D) or face (3D), repeated cells, and cells stacked on a shared facet;
//  2. (2D) angle sums: the cells around an interior vertex turn once (2π), around a boundary vertex less than once —
//     finds a vertex whose star wraps around twice;
//  3. (2D) the boundary: boundary edges must not cross or overlap each other (this also finds hanging nodes: a
//     non-conforming mesh has boundary edges lying on top of each other inside the domain), and just outside every
//     boundary edge the boundary must wind zero times — finds a part of the mesh lying on top of another part
//     without sharing any edge with it (a second copy, an island dropped onto the domain);
//  (1D) intervals sorted by their left end must not overlap.
// Together, in 1D and 2D, 1–3 leave a mesh that covers every point of its image once: after 1 and 2 it is a local
// homeomorphism, after 3 its boundary is embedded and the covering number is 0 outside and 1 inside. In 3D only
// check 1 is made (overlapping tetrahedra that share no face are not found).

import { TET_FACES, type FacetTable } from './facet-table.ts';

/** Angle sums may miss 2π by this much (ASCII coordinates; far below the π/… of any real fold). */
const ANGLE_TOLERANCE = 1e-6;

export interface OverlapProblem {
  /** 0-based cell the message is about (its line is reported). */
  cell: number;
  message: string;
}

/**
 * The first fold or overlap in a mesh whose cells (corner indices into `coords`, `dim` per vertex) are all positively
 * oriented, or null. `table` holds the cells' shared facets (facet-table.ts: edgeTable for triangles and
 * quadrilaterals, faceTable for tetrahedra; unused for intervals). `point` maps a vertex to the file's point number
 * for messages.
 */
export function findOverlap(
  kind: 'interval' | 'triangle' | 'quadrilateral' | 'tetrahedron',
  coords: Float64Array, dim: number, nVertices: number, cells: Int32Array, point: (v: number) => number, table: FacetTable | null,
): OverlapProblem | null {
  if (kind === 'interval') return intervals(coords, cells);
  if (table === null) throw new Error(`internal: the overlap check of ${kind} cells needs their facet table`);
  if (kind === 'tetrahedron') return tetFaces(cells, table, point);
  return planar(kind === 'triangle' ? 3 : 4, coords, dim, nVertices, cells, table, point);
}

function intervals(x: Float64Array, cells: Int32Array): OverlapProblem | null {
  const n = cells.length / 2;
  // Cells by left end, ties by index (the order the stable Array sort gave), on a typed array.
  const order = new Int32Array(n);
  for (let c = 0; c < n; c++) order[c] = c;
  order.sort((a, b) => x[cells[2 * a]!]! - x[cells[2 * b]!]! || a - b);
  let span = 0;
  for (let k = 0; k < x.length; k++) span = Math.max(span, Math.abs(x[k]! - x[0]!));
  const tol = 1e-12 * span;
  for (let k = 1; k < n; k++) {
    const a = order[k - 1]!, b = order[k]!;
    const aEnd = x[cells[2 * a + 1]!]!, bStart = x[cells[2 * b]!]!;
    if (bStart < aEnd - tol) {
      return { cell: b, message: `cell ${b + 1} [${bStart}, ${x[cells[2 * b + 1]!]}] overlaps cell ${a + 1} [${x[cells[2 * a]!]}, ${aEnd}]: the mesh folds over itself` };
    }
  }
  return null;
}

function tetFaces(cells: Int32Array, table: FacetTable, point: (v: number) => number): OverlapProblem | null {
  const p = table.problem;
  if (p === null) return null;
  const s = p.slot, f = TET_FACES[s & 3]!, base = s - (s & 3);
  const v = [cells[base + f[0]]!, cells[base + f[1]]!, cells[base + f[2]]!].sort((a, b) => a - b);
  const face = `(${v.map(point).join(', ')})`;
  if (p.kind === 'third') return { cell: p.cell, message: `cell ${p.cell + 1} is the third cell on the face ${face}: the mesh overlaps itself there` };
  return {
    cell: p.cell,
    message: `cells ${p.other + 1} and ${p.cell + 1} lie on the same side of their shared face ${face}: the mesh folds over itself (or repeats a cell)`,
  };
}

function planar(
  nc: number, x: Float64Array, dim: number, nVertices: number, cells: Int32Array, table: FacetTable, point: (v: number) => number,
): OverlapProblem | null {
  const n = cells.length / nc;
  const X = (v: number) => x[v * dim]!;
  const Y = (v: number) => x[v * dim + 1]!;
  // 1. Directed edges: the first edge, in cell order, that a second cell runs the same way or a third cell shares.
  const prob = table.problem;
  if (prob !== null) {
    const p = prob, s = p.slot, a = cells[s]!, b = cells[s % nc === nc - 1 ? s + 1 - nc : s + 1]!;
    const edge = `(${point(a)}, ${point(b)})`;
    if (p.kind === 'third') return { cell: p.cell, message: `cell ${p.cell + 1} is the third cell on the edge ${edge}: the mesh overlaps itself there` };
    return {
      cell: p.cell,
      message: `cells ${p.other + 1} and ${p.cell + 1} lie on the same side of their shared edge ${edge}: the mesh folds over itself (or repeats a cell)`,
    };
  }
  // Boundary edges, directed with their cell on the left.
  const bnd = table.boundary, bndCell = table.boundaryCell;
  const onBoundary = new Uint8Array(nVertices);
  for (let k = 0; k < bnd.length; k++) onBoundary[bnd[k]!] = 1;
  // 2. Angle sums.
  const angle = new Float64Array(nVertices);
  for (let c = 0, o = 0; c < n; c++, o += nc) {
    for (let k = 0; k < nc; k++) {
      const v = cells[o + k]! * dim, p = cells[o + (k + 1 === nc ? 0 : k + 1)]! * dim, q = cells[o + (k === 0 ? nc - 1 : k - 1)]! * dim;
      const xv = x[v]!, yv = x[v + 1]!;
      const ux = x[p]! - xv, uy = x[p + 1]! - yv, wx = x[q]! - xv, wy = x[q + 1]! - yv;
      angle[cells[o + k]!] += Math.atan2(ux * wy - uy * wx, ux * wx + uy * wy);
    }
  }
  for (let v = 0; v < nVertices; v++) {
    const turns = angle[v]! / (2 * Math.PI);
    const interior = !onBoundary[v];
    if (interior ? Math.abs(turns - 1) > ANGLE_TOLERANCE : turns > 1 + ANGLE_TOLERANCE) {
      // The message names the last cell around the point.
      let last = n - 1;
      while (last > 0 && !cells.subarray(last * nc, last * nc + nc).includes(v)) last--;
      return {
        cell: last,
        message: `the cells around point ${point(v)} turn ${turns.toFixed(3)} times around it (${interior ? 'exactly 1 for a point inside the mesh' : 'less than 1 on the boundary'}): ` +
          'cells overlap there',
      };
    }
  }
  return boundaryProblem(bnd, bndCell, X, Y, point);
}

/** 3. Boundary edges neither cross nor overlap, and the boundary winds zero times just outside each of them. */
function boundaryProblem(
  bnd: Int32Array, bndCell: Int32Array, X: (v: number) => number, Y: (v: number) => number, point: (v: number) => number,
): OverlapProblem | null {
  const m = bndCell.length;
  if (m === 0) return null;
  let x0 = Infinity, x1 = -Infinity, y0 = Infinity, y1 = -Infinity;
  for (const v of bnd) { x0 = Math.min(x0, X(v)); x1 = Math.max(x1, X(v)); y0 = Math.min(y0, Y(v)); y1 = Math.max(y1, Y(v)); }
  const size = Math.max(x1 - x0, y1 - y0) || 1;
  const tol = 1e-12 * size;
  const g = Math.max(1, Math.ceil(Math.sqrt(m)));
  const gx = (x1 - x0) / g || 1, gy = (y1 - y0) / g || 1;
  const cellOf = (t: number, lo: number, w: number) => Math.min(g - 1, Math.max(0, Math.floor((t - lo) / w)));
  // Uniform grid of buckets over the boundary's box; each edge goes into the buckets its box meets.
  const buckets = new Map<number, number[]>();
  const bands: number[][] = Array.from({ length: g }, () => []);
  for (let e = 0; e < m; e++) {
    const a = bnd[2 * e]!, b = bnd[2 * e + 1]!;
    const i0 = cellOf(Math.min(X(a), X(b)) - tol, x0, gx), i1 = cellOf(Math.max(X(a), X(b)) + tol, x0, gx);
    const j0 = cellOf(Math.min(Y(a), Y(b)) - tol, y0, gy), j1 = cellOf(Math.max(Y(a), Y(b)) + tol, y0, gy);
    for (let j = j0; j <= j1; j++) {
      bands[j]!.push(e);
      for (let i = i0; i <= i1; i++) {
        const list = buckets.get(j * g + i);
        if (list) list.push(e); else buckets.set(j * g + i, [e]);
      }
    }
  }
  const orient = (ax: number, ay: number, bx: number, by: number, cx: number, cy: number): number => {
    const d = (bx - ax) * (cy - ay) - (by - ay) * (cx - ax);
    return Math.abs(d) <= tol * size ? 0 : Math.sign(d);
  };
  const describe = (e: number) => `(${point(bnd[2 * e]!)}, ${point(bnd[2 * e + 1]!)})`;
  for (const list of buckets.values()) {
    for (let s = 0; s < list.length; s++) {
      for (let t = s + 1; t < list.length; t++) {
        const e = list[s]!, f = list[t]!;
        const a = bnd[2 * e]!, b = bnd[2 * e + 1]!, c = bnd[2 * f]!, d = bnd[2 * f + 1]!;
        const shared = a === c || a === d || b === c || b === d;
        const o1 = orient(X(a), Y(a), X(b), Y(b), X(c), Y(c)), o2 = orient(X(a), Y(a), X(b), Y(b), X(d), Y(d));
        const o3 = orient(X(c), Y(c), X(d), Y(d), X(a), Y(a)), o4 = orient(X(c), Y(c), X(d), Y(d), X(b), Y(b));
        let hit: boolean;
        if (shared) {
          // Sharing an end, they may only overlap along a line: collinear and pointing the same way from it.
          const [p, q, r] = a === c ? [a, b, d] : a === d ? [a, b, c] : b === c ? [b, a, d] : [b, a, c];
          hit = o1 === 0 && o2 === 0 && (X(q) - X(p)) * (X(r) - X(p)) + (Y(q) - Y(p)) * (Y(r) - Y(p)) > 0;
        } else if (o1 === 0 && o2 === 0) {
          // Collinear: overlap when their projections on the line overlap.
          const dx = X(b) - X(a), dy = Y(b) - Y(a);
          const proj = (v: number) => (X(v) - X(a)) * dx + (Y(v) - Y(a)) * dy;
          const len = dx * dx + dy * dy;
          hit = Math.max(0, Math.min(proj(c), proj(d))) <= Math.min(len, Math.max(proj(c), proj(d)));
        } else {
          const onSeg = (o: number, p: number, q: number, r: number) =>
            o === 0 && Math.min(X(p), X(q)) - tol <= X(r) && X(r) <= Math.max(X(p), X(q)) + tol && Math.min(Y(p), Y(q)) - tol <= Y(r) && Y(r) <= Math.max(Y(p), Y(q)) + tol;
          hit = (o1 * o2 < 0 && o3 * o4 < 0) || onSeg(o1, a, b, c) || onSeg(o2, a, b, d) || onSeg(o3, c, d, a) || onSeg(o4, c, d, b);
        }
        if (hit) {
          return {
            cell: bndCell[f]!,
            message: `boundary edges ${describe(e)} of cell ${bndCell[e]! + 1} and ${describe(f)} of cell ${bndCell[f]! + 1} cross or overlap: ` +
              'cells overlap there, or the mesh is not conforming (a node on another cell\'s edge)',
          };
        }
      }
    }
  }
  // Winding number of the boundary at a point just right of (outside) each boundary edge's midpoint.
  for (let e = 0; e < m; e++) {
    const a = bnd[2 * e]!, b = bnd[2 * e + 1]!;
    const dx = X(b) - X(a), dy = Y(b) - Y(a);
    const eps = 1e-7;
    const px = 0.5 * (X(a) + X(b)) + eps * dy, py = 0.5 * (Y(a) + Y(b)) - eps * dx;
    let w = 0;
    for (const f of bands[cellOf(py, y0, gy)]!) {
      const c = bnd[2 * f]!, d = bnd[2 * f + 1]!;
      const cy = Y(c), dy2 = Y(d);
      if ((cy <= py) === (dy2 <= py)) continue;
      const xi = X(c) + ((py - cy) / (dy2 - cy)) * (X(d) - X(c));
      if (xi > px) w += dy2 > cy ? 1 : -1;
    }
    if (w !== 0) {
      return {
        cell: bndCell[e]!,
        message: `outside boundary edge ${describe(e)} of cell ${bndCell[e]! + 1} other cells still cover the plane ${w} time(s): ` +
          'part of the mesh lies on top of another part',
      };
    }
  }
  return null;
}
