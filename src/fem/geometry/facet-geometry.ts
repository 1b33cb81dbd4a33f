import type { Mesh } from '../../mesh/types.ts';
import { AFFINE_CELL } from '../../mesh/types.ts';
import type { LagrangeElement } from '../element/types.ts';
import { REFERENCE_FACETS, REFERENCE_VERTICES } from '../element/nodes.ts';
import { facetRuleFor } from '../quadrature/rule-for.ts';
import type { QuadratureRule } from '../quadrature/types.ts';
import { cellJacobian } from './jacobian.ts';
import { mapReferencePoint } from './map.ts';

/**
 * Basis values of one element on every local facet of its reference cell at the points of one facet rule, and, per
 * facet of a mesh cell, the physical points, the weights times the surface element and the outward unit normal at
 * every point. Works for every cell kind; on hexahedra (trilinear map) the faces of a cell need not be planar, so
 * the normal and the surface element vary from point to point, and on quadrilaterals the edges are straight but
 * their points are mapped through the bilinear map.
 *
 * Reference facet f with vertices (v0, v1, …) is parametrised over the reference facet of the rule by
 * ξ(t) = v0 + t_1 (v1 − v0) + t_2 (v_last − v0) (v_last = v2 for a triangle, v3 for a cyclic quadrilateral: the
 * parametrisation is affine and exact on the reference cell). The physical tangents are A_a = J(ξ) ∂ξ/∂t_a, the
 * surface element |A_1 × A_2| (3D) or |A_1| (2D), and the normal A_1 × A_2 (3D) or (A_1,y, −A_1,x) (2D) turned by
 * the sign that makes the reference one point out of the reference cell: J with det J > 0 keeps that side, since
 * (J a) × (J b) = det(J) J^{−T} (a × b) (Nanson's formula; Ciarlet 1988, Mathematical Elasticity I, Thm 1.7-1).
 *
 * Buffers are allocated once per (element, degree) and refilled per facet: no allocation per point (DEVELOPERS.md,
 * "Hot loops over Float64Array").
 */
export interface FacetGeometry {
  element: LagrangeElement;
  /** The rule on the reference facet (null for the points that bound an interval: one point of weight 1). */
  rule: QuadratureRule | null;
  nq: number;
  n: number;
  dim: number;
  /** Per local facet: nq * n basis values (fixed). */
  values: Float64Array[];
  /** Per local facet: nq * n * dim reference gradients (fixed). */
  refGrads: Float64Array[];
  /** Per local facet: nq * dim reference points in the cell (fixed). */
  refPoints: Float64Array[];
  /** nq * 3 physical points (per facet; unused coordinates 0). */
  x: Float64Array;
  /** nq weights × surface element (per facet). */
  wds: Float64Array;
  /** nq * 3 outward unit normals (per facet; unused coordinates 0). */
  normals: Float64Array;
  /** nq * n * dim physical gradients of the basis (per facet, when asked for). */
  grads: Float64Array;
}

/** Per local facet: the reference tangents ∂ξ/∂t_a (dim − 1 of them, dim entries each) and the orientation sign. */
interface FacetFrame {
  tangents: Float64Array;
  sign: number;
}

const frames = new Map<string, FacetFrame[]>();

/** Reference tangents of each facet of a cell kind and the sign that turns their normal outward. */
function facetFrames(element: LagrangeElement): FacetFrame[] {
  const hit = frames.get(element.cell);
  if (hit) return hit;
  const dim = element.dim;
  const verts = REFERENCE_VERTICES[element.cell];
  const centroid = new Array<number>(dim).fill(0);
  for (const v of verts) for (let d = 0; d < dim; d++) centroid[d] += v[d] / verts.length;
  const out = REFERENCE_FACETS[element.cell].map((fv) => {
    const tangents = new Float64Array((dim - 1) * dim);
    const last = fv.length === 4 ? fv[3] : fv[fv.length - 1];
    for (let d = 0; d < dim; d++) {
      if (dim >= 2) tangents[d] = verts[fv[1]][d] - verts[fv[0]][d];
      if (dim === 3) tangents[dim + d] = verts[last][d] - verts[fv[0]][d];
    }
    // Facet centroid − cell centroid points out of the (convex) reference cell.
    const away = new Array<number>(dim).fill(0);
    for (const l of fv) for (let d = 0; d < dim; d++) away[d] += verts[l][d] / fv.length;
    for (let d = 0; d < dim; d++) away[d] -= centroid[d];
    let sign = 1;
    if (dim === 1) sign = away[0] > 0 ? 1 : -1;
    else if (dim === 2) sign = tangents[1] * away[0] - tangents[0] * away[1] > 0 ? 1 : -1;
    else {
      const [a0, a1, a2, b0, b1, b2] = tangents;
      const n0 = a1 * b2 - a2 * b1, n1 = a2 * b0 - a0 * b2, n2 = a0 * b1 - a1 * b0;
      sign = n0 * away[0] + n1 * away[1] + n2 * away[2] > 0 ? 1 : -1;
    }
    return { tangents, sign };
  });
  frames.set(element.cell, out);
  return out;
}

/** The facet geometry of an element with a facet rule exact to `degree` (per variable on quadrilateral faces). */
export function makeFacetGeometry(element: LagrangeElement, degree: number): FacetGeometry {
  const dim = element.dim, n = element.nDofs;
  const rule = facetRuleFor(element.cell, Math.max(0, degree));
  const nq = rule === null ? 1 : rule.nPoints;
  const verts = REFERENCE_VERTICES[element.cell];
  const ff = facetFrames(element);
  const values: Float64Array[] = [], refGrads: Float64Array[] = [], refPoints: Float64Array[] = [];
  REFERENCE_FACETS[element.cell].forEach((fv, lf) => {
    const pts = new Float64Array(nq * dim);
    const tg = ff[lf].tangents;
    for (let q = 0; q < nq; q++) {
      for (let d = 0; d < dim; d++) {
        let v = verts[fv[0]][d];
        if (rule !== null) for (let a = 0; a < dim - 1; a++) v += rule.points[q * (dim - 1) + a] * tg[a * dim + d];
        pts[q * dim + d] = v;
      }
    }
    const vals = new Float64Array(nq * n), grads = new Float64Array(nq * n * dim);
    element.tabulate(pts, nq, vals, grads);
    values.push(vals); refGrads.push(grads); refPoints.push(pts);
  });
  return {
    element, rule, nq, n, dim, values, refGrads, refPoints,
    x: new Float64Array(nq * 3), wds: new Float64Array(nq), normals: new Float64Array(nq * 3),
    grads: new Float64Array(nq * n * dim),
  };
}

const J = new Float64Array(9);
const invJ = new Float64Array(9);
const xp = new Float64Array(3);

/** Refills fg for local facet lf of cell c of the mesh: points, weights × surface element, outward unit normals, and
 *  (withGrads) the physical basis gradients. */
export function reinitFacetGeometry(fg: FacetGeometry, mesh: Mesh, c: number, lf: number, withGrads = false): void {
  const { nq, n, dim, rule, x, wds, normals, grads } = fg;
  const pts = fg.refPoints[lf];
  const { tangents: tg, sign } = facetFrames(fg.element)[lf];
  const affine = AFFINE_CELL[mesh.cellKind];
  for (let q = 0; q < nq; q++) {
    if (q === 0 || !affine) cellJacobian(mesh, c, pts, q * dim, J, invJ);
    mapReferencePoint(mesh, c, pts, q * dim, xp);
    x[3 * q] = xp[0]; x[3 * q + 1] = dim > 1 ? xp[1] : 0; x[3 * q + 2] = dim > 2 ? xp[2] : 0;
    const w = rule === null ? 1 : rule.weights[q];
    let n0 = 0, n1 = 0, n2 = 0, size = 1;
    if (dim === 1) {
      n0 = sign;
    } else if (dim === 2) {
      const t0 = J[0] * tg[0] + J[1] * tg[1], t1 = J[2] * tg[0] + J[3] * tg[1];
      size = Math.hypot(t0, t1);
      n0 = (sign * t1) / size; n1 = (-sign * t0) / size;
    } else {
      const a0 = J[0] * tg[0] + J[1] * tg[1] + J[2] * tg[2];
      const a1 = J[3] * tg[0] + J[4] * tg[1] + J[5] * tg[2];
      const a2 = J[6] * tg[0] + J[7] * tg[1] + J[8] * tg[2];
      const b0 = J[0] * tg[3] + J[1] * tg[4] + J[2] * tg[5];
      const b1 = J[3] * tg[3] + J[4] * tg[4] + J[5] * tg[5];
      const b2 = J[6] * tg[3] + J[7] * tg[4] + J[8] * tg[5];
      const c0 = a1 * b2 - a2 * b1, c1 = a2 * b0 - a0 * b2, c2 = a0 * b1 - a1 * b0;
      size = Math.hypot(c0, c1, c2);
      n0 = (sign * c0) / size; n1 = (sign * c1) / size; n2 = (sign * c2) / size;
    }
    wds[q] = w * size;
    normals[3 * q] = n0; normals[3 * q + 1] = n1; normals[3 * q + 2] = n2;
    if (!withGrads) continue;
    const rg = fg.refGrads[lf];
    const o = q * n * dim;
    for (let i = 0; i < n; i++) {
      const gi = o + i * dim;
      for (let d = 0; d < dim; d++) {
        let s = 0;
        for (let r = 0; r < dim; r++) s += invJ[r * dim + d] * rg[gi + r];
        grads[gi + d] = s;
      }
    }
  }
}
