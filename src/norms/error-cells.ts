import type { QuadratureRule } from '../fem/quadrature/types.ts';
import { cellJacobian } from '../fem/geometry/jacobian.ts';
import { mapReferencePoint } from '../fem/geometry/map.ts';
import type { ScalarFn } from '../fem/assemble/types.ts';
import type { DiscreteField } from './types.ts';
import { AFFINE_CELL, type Mesh } from '../mesh/types.ts';
import { lagrangeFieldData } from '../fem/field/lagrange-field.ts';

/** u and ∇u at a point: writes ∇u to g, returns u. */
export type ValueAndGradient = (x: number, y: number, z: number, g: Float64Array) => number;

/** Cells per part of an error integration: the sums run cell by cell within a part and the parts' sums are then
 *  added in part order (errors.ts), whichever thread computed them, so the totals do not depend on the number of
 *  threads. A mesh of at most this many cells is one part: its totals are the bits of a single pass over the cells
 *  (every bundled study: the largest has 32768 cells). 2M cells (1M P1 unknowns) make 64 parts. */
export const ERROR_PART_CELLS = 32768;

/** What integrating a range of cells reads: the mesh, the fields, u and ∇u, the coefficients of the energy norm, the
 *  rule, the cells sampled (every stride-th from start) and where the first field's per-cell sums go (or null). */
export interface ErrorCells {
  mesh: Mesh;
  fields: DiscreteField[];
  uAndG: ValueAndGradient;
  k: ScalarFn | undefined;
  c: ScalarFn | undefined;
  rule: QuadratureRule;
  stride: number;
  start: number;
  perCellL2: Float64Array | null;
  perCellH1: Float64Array | null;
}

/** The integration of cells c0 … c1 − 1 (those sampled): out[o + 3f], out[o + 3f + 1], out[o + 3f + 2] receive
 *  field f's sums of w|e|², w|∇e|² and w(k|∇e|² + c e²) over the range; each per-cell sum of the first field is
 *  stored in perCell. The loops are those of a pass over all cells (affine 2D and 3D cells with one or two fields
 *  unrolled; the same operations in the same order as the general loop). Nothing is allocated per cell or point. */
export function errorCells(s: ErrorCells): (c0: number, c1: number, out: Float64Array, o: number) => void {
  const { mesh, fields, rule, stride, start } = s;
  const dim = mesh.dim;
  const nq = rule.nPoints;
  const nf = fields.length;
  const vals = fields.map(() => new Float64Array(nq));
  const grads = fields.map(() => new Float64Array(nq * dim));
  const J = new Float64Array(9), invJ = new Float64Array(9), x = new Float64Array(3), g = new Float64Array(3);
  const affine = AFFINE_CELL[mesh.cellKind];
  const l2 = new Float64Array(nf), h1 = new Float64Array(nf), en = new Float64Array(nf);
  const kf = s.k, cf = s.c;
  const pts = rule.points, wts = rule.weights;
  const { coords, cells, verticesPerCell: vpc } = mesh;
  const uAndG = s.uAndG;
  const v0s = vals[0], g0s = grads[0];
  const v1s = nf > 1 ? vals[1] : v0s, g1s = nf > 1 ? grads[1] : g0s;
  // Per-cell sums of the first field live in their own locals (cl2, ch1), added to beside the totals from the same
  // products, so the totals' operations and their order are those of an integration without them (same bits).
  const pcL2 = s.perCellL2, pcH1 = s.perCellH1;
  const p1 = dim === 2 && affine && nf <= 2 ? p1Fields(mesh, fields, pts, nq) : null;
  return (c0, c1, out, o) => {
    l2.fill(0); h1.fill(0); en.fill(0);
    let l2a = 0, h1a = 0, ena = 0, l2b = 0, h1b = 0, enb = 0;
    const first = c0 <= start ? start : start + Math.ceil((c0 - start) / stride) * stride;
    if (p1) {
      // P1 fields on triangles: each field's values and its one gradient per cell computed here, as its evaluate
      // computes them (lagrange-field.ts: the same products and sums in the same order, with the inverse Jacobian
      // of the same cellJacobian call), instead of by a call per field with a Jacobian of its own; the same bits.
      // The point loop is the unrolled one below, written out again here rather than fed through the value arrays:
      // u_h and I_h u on 2M triangles, one thread, 645–681 ms so, 756–817 ms through the arrays, 914–933 ms through
      // evaluate (Intel Xeon VM, 2 cores, repeated calls in one process).
      const fb = nf > 1 ? 1 : 0;
      const tv = p1.tv[0], t0 = p1.tg[0][0], t1 = p1.tg[0][1], t2 = p1.tg[0][2], t3 = p1.tg[0][3], t4 = p1.tg[0][4], t5 = p1.tg[0][5];
      const sv = p1.tv[fb], s0 = p1.tg[fb][0], s1 = p1.tg[fb][1], s2 = p1.tg[fb][2], s3 = p1.tg[fb][3], s4 = p1.tg[fb][4], s5 = p1.tg[fb][5];
      const ua = p1.coeffs[0], ub = p1.coeffs[fb];
      // Read at each call, not captured: the cell team may move a space's arrays into shared memory meanwhile.
      const da = p1.spaces[0].cellDofs, db = p1.spaces[fb].cellDofs;
      for (let c = first; c < c1; c += stride) {
        const det = Math.abs(cellJacobian(mesh, c, pts, 0, J, invJ));
        const i00 = invJ[0], i01 = invJ[1], i10 = invJ[2], i11 = invJ[3];
        const a0 = ua[da[3 * c]], a1 = ua[da[3 * c + 1]], a2 = ua[da[3 * c + 2]];
        const ga0 = a0 * t0 + a1 * t2 + a2 * t4, ga1 = a0 * t1 + a1 * t3 + a2 * t5;
        const ea0 = i00 * ga0 + i10 * ga1, ea1 = i01 * ga0 + i11 * ga1;
        const b0 = ub[db[3 * c]], b1 = ub[db[3 * c + 1]], b2 = ub[db[3 * c + 2]];
        const gb0 = b0 * s0 + b1 * s2 + b2 * s4, gb1 = b0 * s1 + b1 * s3 + b2 * s5;
        const eb0 = i00 * gb0 + i10 * gb1, eb1 = i01 * gb0 + i11 * gb1;
        const v0 = cells[c * vpc] * 2;
        const x0 = coords[v0], y0 = coords[v0 + 1], j00 = J[0], j01 = J[1], j10 = J[2], j11 = J[3];
        let cl2 = 0, ch1 = 0;
        for (let q = 0; q < nq; q++) {
          const s = pts[2 * q], t = pts[2 * q + 1];
          const X = x0 + j00 * s + j01 * t, Y = y0 + j10 * s + j11 * t;
          const w = wts[q] * det;
          const u = uAndG(X, Y, 0, g);
          const kq = kf ? kf(X, Y, 0) : 1;
          const cq = cf ? cf(X, Y, 0) : 0;
          const gu0 = g[0], gu1 = g[1];
          const vo = 3 * q;
          let e = u - (a0 * tv[vo] + a1 * tv[vo + 1] + a2 * tv[vo + 2]), d0 = gu0 - ea0, d1 = gu1 - ea1;
          let ge = d0 * d0 + d1 * d1;
          const we2 = w * e * e, wge = w * ge;
          l2a += we2; h1a += wge; ena += w * (kq * ge + cq * e * e);
          cl2 += we2; ch1 += wge;
          if (nf > 1) {
            e = u - (b0 * sv[vo] + b1 * sv[vo + 1] + b2 * sv[vo + 2]); d0 = gu0 - eb0; d1 = gu1 - eb1;
            ge = d0 * d0 + d1 * d1;
            l2b += w * e * e; h1b += w * ge; enb += w * (kq * ge + cq * e * e);
          }
        }
        if (pcL2 !== null) { pcL2[c] = cl2; pcH1![c] = ch1; }
      }
    }
    for (let c = p1 ? c1 : first; c < c1; c += stride) {
      for (let f = 0; f < nf; f++) fields[f].evaluate(c, pts, nq, vals[f], grads[f]);
      let det = 0;
      const v0 = cells[c * vpc] * dim;
      if (dim === 2 && affine && nf <= 2) {
        // The common case, unrolled: affine 2D cells, one or two fields.
        det = Math.abs(cellJacobian(mesh, c, pts, 0, J, invJ));
        const x0 = coords[v0], y0 = coords[v0 + 1], j00 = J[0], j01 = J[1], j10 = J[2], j11 = J[3];
        let cl2 = 0, ch1 = 0;
        for (let q = 0; q < nq; q++) {
          const s = pts[2 * q], t = pts[2 * q + 1];
          const X = x0 + j00 * s + j01 * t, Y = y0 + j10 * s + j11 * t;
          const w = wts[q] * det;
          const u = uAndG(X, Y, 0, g);
          const kq = kf ? kf(X, Y, 0) : 1;
          const cq = cf ? cf(X, Y, 0) : 0;
          const gu0 = g[0], gu1 = g[1];
          let e = u - v0s[q], d0 = gu0 - g0s[2 * q], d1 = gu1 - g0s[2 * q + 1];
          let ge = d0 * d0 + d1 * d1;
          const we2 = w * e * e, wge = w * ge;
          l2a += we2; h1a += wge; ena += w * (kq * ge + cq * e * e);
          cl2 += we2; ch1 += wge;
          if (nf > 1) {
            e = u - v1s[q]; d0 = gu0 - g1s[2 * q]; d1 = gu1 - g1s[2 * q + 1];
            ge = d0 * d0 + d1 * d1;
            l2b += w * e * e; h1b += w * ge; enb += w * (kq * ge + cq * e * e);
          }
        }
        if (pcL2 !== null) { pcL2[c] = cl2; pcH1![c] = ch1; }
        continue;
      }
      if (dim === 3 && affine && nf <= 2) {
        // Affine tetrahedra, one or two fields: the general loop below with its 3×3 loops written out; the same
        // operations in the same order (points x0 + J ξ summed term by term, |∇e|² from zero), so the same bits.
        det = cellJacobian(mesh, c, pts, 0, J, invJ);
        const x0 = coords[v0], y0 = coords[v0 + 1], z0 = coords[v0 + 2];
        const j0 = J[0], j1 = J[1], j2 = J[2], j3 = J[3], j4 = J[4], j5 = J[5], j6 = J[6], j7 = J[7], j8 = J[8];
        const ad = Math.abs(det);
        let cl2 = 0, ch1 = 0;
        for (let q = 0; q < nq; q++) {
          const s = pts[3 * q], t = pts[3 * q + 1], r = pts[3 * q + 2];
          let X = x0; X += j0 * s; X += j1 * t; X += j2 * r;
          let Y = y0; Y += j3 * s; Y += j4 * t; Y += j5 * r;
          let Z = z0; Z += j6 * s; Z += j7 * t; Z += j8 * r;
          const w = wts[q] * ad;
          const u = uAndG(X, Y, Z, g);
          const kq = kf ? kf(X, Y, Z) : 1;
          const cq = cf ? cf(X, Y, Z) : 0;
          const gu0 = g[0], gu1 = g[1], gu2 = g[2];
          let e = u - v0s[q];
          let d0 = gu0 - g0s[3 * q], d1 = gu1 - g0s[3 * q + 1], d2 = gu2 - g0s[3 * q + 2];
          let ge = 0; ge += d0 * d0; ge += d1 * d1; ge += d2 * d2;
          const we2 = w * e * e, wge = w * ge;
          l2a += we2; h1a += wge; ena += w * (kq * ge + cq * e * e);
          cl2 += we2; ch1 += wge;
          if (nf > 1) {
            e = u - v1s[q];
            d0 = gu0 - g1s[3 * q]; d1 = gu1 - g1s[3 * q + 1]; d2 = gu2 - g1s[3 * q + 2];
            ge = 0; ge += d0 * d0; ge += d1 * d1; ge += d2 * d2;
            l2b += w * e * e; h1b += w * ge; enb += w * (kq * ge + cq * e * e);
          }
        }
        if (pcL2 !== null) { pcL2[c] = cl2; pcH1![c] = ch1; }
        continue;
      }
      let cl2 = 0, ch1 = 0;
      for (let q = 0; q < nq; q++) {
        if (q === 0 || !affine) det = cellJacobian(mesh, c, pts, q * dim, J, invJ);
        if (affine) {
          // x = x0 + J ξ, with J from cellJacobian (no call per point).
          for (let d = 0; d < dim; d++) {
            let s = coords[v0 + d];
            for (let r = 0; r < dim; r++) s += J[d * dim + r] * pts[q * dim + r];
            x[d] = s;
          }
        } else mapReferencePoint(mesh, c, pts, q * dim, x);
        const X = x[0], Y = dim > 1 ? x[1] : 0, Z = dim > 2 ? x[2] : 0;
        const w = wts[q] * Math.abs(det);
        const u = uAndG(X, Y, Z, g);
        const kq = kf ? kf(X, Y, Z) : 1;
        const cq = cf ? cf(X, Y, Z) : 0;
        for (let f = 0; f < nf; f++) {
          const e = u - vals[f][q];
          const gf = grads[f];
          let ge = 0;
          for (let d = 0; d < dim; d++) { const t = g[d] - gf[q * dim + d]; ge += t * t; }
          const we2 = w * e * e, wge = w * ge;
          l2[f] += we2;
          h1[f] += wge;
          en[f] += w * (kq * ge + cq * e * e);
          if (f === 0) { cl2 += we2; ch1 += wge; }
        }
      }
      if (pcL2 !== null) { pcL2[c] = cl2; pcH1![c] = ch1; }
    }
    // The unrolled paths' sums after the general loop's (one of the two is zero on any mesh), as a single pass adds them.
    l2[0] += l2a; h1[0] += h1a; en[0] += ena;
    if (nf > 1) { l2[1] += l2b; h1[1] += h1b; en[1] += enb; }
    for (let f = 0; f < nf; f++) { out[o + 3 * f] = l2[f]; out[o + 3 * f + 1] = h1[f]; out[o + 3 * f + 2] = en[f]; }
  };
}

/** The P1 fields' data when every field is a Lagrange P1 field on this mesh of triangles (lagrange-field.ts), with
 *  each field's element values and gradients at the rule's points as its evaluate tabulates them; else null (exported for
 *  its test, which checks that the loop for P1 is the one taken). */
export function p1Fields(mesh: Mesh, fields: DiscreteField[], pts: Float64Array, nq: number) {
  if (mesh.cellKind !== 'triangle' || fields.length === 0) return null;
  const data = fields.map((f) => lagrangeFieldData(f));
  const tv: Float64Array[] = [], tg: Float64Array[] = [];
  for (const d of data) {
    if (!d || d.space.mesh !== mesh || d.space.element.degree !== 1 || d.space.element.nDofs !== 3) return null;
    const v = new Float64Array(nq * 3), g = new Float64Array(nq * 6);
    d.space.element.tabulate(pts, nq, v, g);
    tv.push(v); tg.push(g);
  }
  return { tv, tg, coeffs: data.map((d) => d!.coeffs), spaces: data.map((d) => d!.space) };
}
