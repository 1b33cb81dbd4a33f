import { ruleFor } from '../fem/quadrature/index.ts';
import { cellJacobian } from '../fem/geometry/jacobian.ts';
import { mapReferencePoint } from '../fem/geometry/map.ts';
import type { ScalarFn } from '../fem/assemble/types.ts';
import type { DiscreteField, ExactSolution, NormValues } from './types.ts';
import { AFFINE_CELL } from '../mesh/types.ts';
import { RungsInputError } from '../errors.ts';

/** Extra degrees of the error quadrature above 2k, the degree of |u_h|² (so the smooth part of the integrand
 *  is over-integrated; common practice, no source). */
export const ERROR_RULE_EXTRA = 4;

export interface ErrorOptions {
  /** Conductivity and reaction for the energy norm sqrt(∫ k|∇e|² + c e²). */
  k?: ScalarFn;
  c?: ScalarFn;
  /** Quadrature degree of the error integrals (default 2·degree + ERROR_RULE_EXTRA). */
  degree?: number;
  /** Integrate over every stride-th cell only and scale up: an estimate for tolerances, not for reporting. */
  cellStride?: number;
  /** Where the error lives: filled with each cell's share of the first field's (the discrete solution's) squared
   *  norms; see PerCellErrors. Refused together with cellStride > 1. */
  perCell?: PerCellErrors;
}

/**
 * Error densities per cell, given by the caller (length mesh.nCells each) and filled by the error integration for
 * the first field only: L2[c] = ∫_K |e|² and H1semi[c] = ∫_K |∇e|² over cell K = c, e = u − u_h, with the same
 * quadrature as the totals. These are the SQUARED contributions (no square root): summed over the cells they give
 * L2² and H1semi² of the totals (to round-off; the totals are summed in their own order and keep their bits).
 * For fields with components (fieldErrors) the sums run over the components as in the totals; for a mean-free field
 * L2[c] is ∫_K |e − ē|² of the second pass (ē the mean error over the domain), H1semi[c] is unaffected by the mean.
 */
export interface PerCellErrors {
  L2: Float64Array;
  H1semi: Float64Array;
}

/** Checks a perCell request against the mesh and the stride: both arrays nCells long, and no cell sampling (an
 *  estimate over every stride-th cell leaves most cells without a value, so the two are refused together). */
export function checkPerCell(perCell: PerCellErrors | undefined, nCells: number, stride: number, where: string): void {
  if (perCell === undefined) return;
  if (stride > 1) {
    throw new RungsInputError(`${where}: opts.perCell cannot be combined with cellStride = ${stride} (an estimate over every ${stride}th cell ` +
      'leaves the other cells without a value); leave cellStride at 1 for error densities', `${where}.perCell`);
  }
  for (const key of ['L2', 'H1semi'] as const) {
    const a = perCell[key] as unknown;
    if (!(a instanceof Float64Array) || a.length !== nCells) {
      const got = a instanceof Float64Array ? `a Float64Array of length ${a.length}` : 'no Float64Array';
      throw new RungsInputError(`${where}: opts.perCell.${key} must be a Float64Array of length nCells = ${nCells}, got ${got}`, `${where}.perCell.${key}`);
    }
  }
}

/** L2, H1 seminorm, H1, energy and largest nodal error of u − u_h, integrated cell by cell. */
export function errorNorms(field: DiscreteField, exact: ExactSolution, opts: ErrorOptions = {}): NormValues {
  return errorNormsOf([field], exact, opts)[0];
}

/** The norms of u − f for several fields on the same mesh in one pass, so u, ∇u and the coefficients are
 *  evaluated once per quadrature point (the discrete solution and the interpolant share the work). With
 *  opts.perCell, fields[0]'s squared L2 and H1 seminorm per cell are written there too (two more additions per
 *  point into locals, one store per cell; no allocation per cell or point: DEVELOPERS.md, "Hot loops"). */
export function errorNormsOf(fields: DiscreteField[], exact: ExactSolution, opts: ErrorOptions = {}): NormValues[] {
  const mesh = fields[0].mesh;
  const dim = mesh.dim;
  const k = Math.max(...fields.map((f) => f.degree ?? 2));
  const rule = ruleFor(mesh.cellKind, opts.degree ?? 2 * k + ERROR_RULE_EXTRA);
  const nq = rule.nPoints;
  const nf = fields.length;
  const vals = fields.map(() => new Float64Array(nq));
  const grads = fields.map(() => new Float64Array(nq * dim));
  const J = new Float64Array(9), invJ = new Float64Array(9), x = new Float64Array(3), g = new Float64Array(3);
  const affine = AFFINE_CELL[mesh.cellKind];
  const l2 = new Float64Array(nf), h1 = new Float64Array(nf), en = new Float64Array(nf);
  const kf = opts.k, cf = opts.c;
  const pts = rule.points, wts = rule.weights;
  const { coords, cells, verticesPerCell: vpc } = mesh;
  const ux = exact.u, gx = exact.grad;
  const uAndG = exact.valueAndGrad ?? ((X: number, Y: number, Z: number, out: Float64Array): number => { gx(X, Y, Z, out); return ux(X, Y, Z); });
  const v0s = vals[0], g0s = grads[0];
  const v1s = nf > 1 ? vals[1] : v0s, g1s = nf > 1 ? grads[1] : g0s;
  let l2a = 0, h1a = 0, ena = 0, l2b = 0, h1b = 0, enb = 0;
  const stride = Math.max(1, Math.floor(opts.cellStride ?? 1));
  checkPerCell(opts.perCell, mesh.nCells, stride, 'errorNorms');
  // Per-cell sums of the first field live in their own locals (cl2, ch1), added to beside the totals from the same
  // products, so the totals' operations and their order are those of an integration without them (same bits).
  const pcL2 = opts.perCell?.L2 ?? null, pcH1 = opts.perCell?.H1semi ?? null;
  // With a stride, start mid-stride so that boundary rows and columns of structured meshes are not favoured.
  for (let c = stride > 1 ? stride >> 1 : 0; c < mesh.nCells; c += stride) {
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
  l2[0] += l2a; h1[0] += h1a; en[0] += ena;
  if (nf > 1) { l2[1] += l2b; h1[1] += h1b; en[1] += enb; }
  if (stride > 1) {
    const sampled = Math.ceil((mesh.nCells - (stride >> 1)) / stride);
    const scale = mesh.nCells / Math.max(1, sampled);
    for (let f = 0; f < nf; f++) { l2[f] *= scale; h1[f] *= scale; en[f] *= scale; }
  }
  return fields.map((field, f) => ({
    L2: Math.sqrt(l2[f]), H1semi: Math.sqrt(h1[f]), H1: Math.sqrt(l2[f] + h1[f]), energy: Math.sqrt(Math.max(en[f], 0)),
    maxNodal: maxNodalError(field, exact, dim),
  }));
}

function maxNodalError(field: DiscreteField, exact: ExactSolution, dim: number): number {
  if (!field.nodes) return NaN;
  let m = 0;
  const { coords, values } = field.nodes;
  for (let i = 0; i < values.length; i++) {
    const e = Math.abs(exact.u(coords[i * dim], dim > 1 ? coords[i * dim + 1] : 0, dim > 2 ? coords[i * dim + 2] : 0) - values[i]);
    if (e > m) m = e;
  }
  return m;
}

/** The same norms of u itself (the error of the zero field): the scale that round-off is judged against. */
export function exactNorms(mesh: DiscreteField['mesh'], exact: ExactSolution, opts: ErrorOptions & { degree: number }): NormValues {
  const zero: DiscreteField = {
    mesh, nDofs: 0, degree: 0,
    evaluate(_c, _p, n, v, gr) { v.fill(0, 0, n); gr.fill(0); },
  };
  return errorNorms(zero, exact, opts);
}
