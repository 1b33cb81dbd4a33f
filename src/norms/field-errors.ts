import { RungsInputError } from '../errors.ts';
import { AFFINE_CELL } from '../mesh/types.ts';
import { ruleFor } from '../fem/quadrature/index.ts';
import { cellJacobian } from '../fem/geometry/jacobian.ts';
import { mapReferencePoint } from '../fem/geometry/map.ts';
import type { ScalarFn } from '../fem/assemble/types.ts';
import { checkPerCell, errorRuleDegree, type PerCellErrors } from './errors.ts';
import type { DiscreteField, ExactField } from './types.ts';

export interface FieldErrorOptions {
  /** Also ‖∇·(u − u_h)‖_L2 (`div`); the field must have as many components as the mesh has dimensions. */
  divergence?: boolean;
  /** Also the energy norm of linear elasticity, (∫ 2μ ε(e):ε(e) + λ (∇·e)²)^(1/2) with ε = sym ∇ (`energy`);
   *  the field must have as many components as the mesh has dimensions. */
  elasticity?: { lambda: ScalarFn; mu: ScalarFn };
  /** The field is fixed only up to a constant (a pressure): L2, H1 and maxNodal are those of
   *  (u − ū) − (u_h − ū_h), the means taken per component over the domain with the same quadrature. */
  meanFree?: boolean;
  /** Quadrature degree (default errorRuleDegree(cell kind, k), k the largest field degree, as in errors.ts). */
  degree?: number;
  /** Integrate over every stride-th cell only and scale up: an estimate for tolerances, not for reporting. */
  cellStride?: number;
  /** Where the error lives: each cell's share of field 0's squared L2 and H1 seminorm, summed over the components
   *  (see PerCellErrors in errors.ts; for a mean-free field L2[c] is ∫_K |e − ē|² of the second pass). Refused
   *  together with cellStride > 1. */
  perCell?: PerCellErrors;
}

/** Norms of e = u − u_h summed over the components: L2² = Σ_i ∫ e_i², H1semi² = Σ_{i,d} ∫ (∂_d e_i)², H1² their
 *  sum; maxNodal the largest |e_i| at a node over nodes and components (NaN when the field has no nodes). */
export interface FieldNormValues {
  L2: number;
  H1semi: number;
  H1: number;
  maxNodal: number;
  /** ‖∇·e‖_L2, when asked for (opts.divergence). */
  div?: number;
  /** The elasticity energy norm, when asked for (opts.elasticity). */
  energy?: number;
}

/** Accumulator slots per field. */
const L2 = 0, H1 = 1, DIV = 2, EN = 3, SLOTS = 4;

/**
 * The norms of u − f for several discrete fields f of the same exact field u (the discrete solution and the
 * interpolant) in one sweep over the cells, so u, ∇u and the coefficients are evaluated once per quadrature point.
 *
 * Mean-free fields take two sweeps. The first integrates e = u − u_h (and everything else); the second integrates
 * (e − ē)² with ē from the first, using the corrected two-pass formula Σw(e−ē)² − (Σw(e−ē))²/|Ω| (Chan, Golub &
 * LeVeque 1983, "Algorithms for computing the sample variance", The American Statistician 37(3)). Why not one
 * pass: the textbook ∫e² − |Ω|ē² cancels catastrophically when u_h is off by a constant much larger than the
 * mean-free error (a pressure pinned at one point: offset O(1), error 1e-8, the answer lost entirely), and
 * updating formulas (West 1979) carry the rounding error of the running mean to first order; in the two-pass
 * form it enters only to second order (∫(e − ē) = 0). The cost is one more evaluation of the fields and of u,
 * paid only when a mean-free norm is asked for.
 *
 * With opts.perCell, field 0's cell sums (the ones added to the totals) are stored per cell as well: the squared L2
 * and H1 seminorm of each cell, summed over the components; for a mean-free field the L2 share is that of the
 * second sweep, ∫_K |e − ē|², whose cells sum to the total before its (vanishing) correction term.
 *
 * Per-point work runs on preallocated typed arrays (no allocation per cell or point; DEVELOPERS.md, "Hot loops
 * over Float64Array"). Each cell's contributions are summed first and then added to the totals, which keeps the
 * rounding of long sums down (blocked summation; Higham 2002, Accuracy and Stability of Numerical Algorithms,
 * ch. 4).
 */
export function fieldErrors(fields: DiscreteField[], exact: ExactField, opts: FieldErrorOptions = {}): FieldNormValues[] {
  if (fields.length === 0) throw new RungsInputError('fieldErrors: give at least one discrete field', 'fieldErrors.fields');
  const mesh = fields[0].mesh;
  const dim = mesh.dim;
  const nc = exact.components;
  if (!(Number.isInteger(nc) && nc >= 1)) {
    throw new RungsInputError(`fieldErrors: the exact field's components must be a whole number ≥ 1, got ${String(nc)}`, 'fieldErrors.exact');
  }
  fields.forEach((f, i) => {
    if (f.mesh !== mesh) throw new RungsInputError(`fieldErrors: field ${i} lives on another mesh than field 0; all fields must share one mesh`, 'fieldErrors.fields');
    const fc = f.components ?? 1;
    if (fc !== nc) throw new RungsInputError(`fieldErrors: field ${i} has ${fc} component(s) but the exact field has ${nc}`, 'fieldErrors.fields');
  });
  const wantDiv = opts.divergence === true;
  const elastic = opts.elasticity;
  if ((wantDiv || elastic) && nc !== dim) {
    const what = wantDiv ? 'divergence' : 'elasticity';
    throw new RungsInputError(`fieldErrors: opts.${what} needs a field with as many components as the mesh has dimensions (${dim}), got ${nc}`, `fieldErrors.${what}`);
  }
  if (elastic && (typeof elastic.lambda !== 'function' || typeof elastic.mu !== 'function')) {
    throw new RungsInputError('fieldErrors: opts.elasticity needs functions lambda(x, y, z) and mu(x, y, z)', 'fieldErrors.elasticity');
  }
  const meanFree = opts.meanFree === true;
  const k = Math.max(...fields.map((f) => f.degree ?? 2));
  const rule = ruleFor(mesh.cellKind, opts.degree ?? errorRuleDegree(mesh.cellKind, k));
  const nq = rule.nPoints, nf = fields.length, ng = nc * dim;
  const stride = Math.max(1, Math.floor(opts.cellStride ?? 1));
  checkPerCell(opts.perCell, mesh.nCells, stride, 'fieldErrors');
  const s: Sweep = {
    mesh, fields, exact, nc, nq, pts: rule.points, wts: rule.weights,
    // Simplices: one Jacobian per cell; quadrilaterals, hexahedra: cellJacobian and mapReferencePoint per point.
    affine: AFFINE_CELL[mesh.cellKind], stride,
    // With a stride, start mid-stride so that boundary rows and columns of structured meshes are not favoured.
    first: stride > 1 ? stride >> 1 : 0,
    strain: wantDiv || elastic !== undefined, lam: elastic?.lambda, mu: elastic?.mu, meanFree,
    vals: fields.map(() => new Float64Array(nq * nc)), grads: fields.map(() => new Float64Array(nq * ng)),
    J: new Float64Array(9), invJ: new Float64Array(9), x: new Float64Array(3),
    xq: new Float64Array(nq * 3), wq: new Float64Array(nq),
    // At least 3 and 9 long, for exact fields written for a point in space.
    uq: new Float64Array(Math.max(nc, 3)), gq: new Float64Array(Math.max(ng, 9)),
    acc: new Float64Array(nf * SLOTS), cellAcc: new Float64Array(nf * SLOTS),
    esum: new Float64Array(nf * nc), cellEsum: new Float64Array(nf * nc), vol: 0,
    mean: new Float64Array(nf * nc),
    csq: new Float64Array(nf), cellCsq: new Float64Array(nf),
    ccorr: new Float64Array(nf * nc), cellCcorr: new Float64Array(nf * nc),
    pcL2: opts.perCell?.L2 ?? null, pcH1: opts.perCell?.H1semi ?? null,
  };
  sweep(s);
  const { acc, csq, ccorr, mean, vol, first } = s;
  if (meanFree) {
    for (let i = 0; i < mean.length; i++) mean[i] = vol > 0 ? s.esum[i] / vol : 0;
    sweepCentred(s);
  }
  let scale = 1;
  if (stride > 1) {
    const sampled = Math.ceil((mesh.nCells - first) / stride);
    scale = mesh.nCells / Math.max(1, sampled);
  }
  return fields.map((field, f) => {
    const o = f * SLOTS;
    let l2 = acc[o + L2];
    if (meanFree) {
      // Corrected two-pass: subtract (Σ w (e_i − ē_i))² / |Ω| per component (zero in exact arithmetic).
      l2 = csq[f];
      if (vol > 0) for (let i = 0; i < nc; i++) l2 -= ccorr[f * nc + i] * ccorr[f * nc + i] / vol;
      l2 = Math.max(l2, 0);
    }
    const h1 = acc[o + H1];
    const out: FieldNormValues = {
      L2: Math.sqrt(l2 * scale), H1semi: Math.sqrt(h1 * scale), H1: Math.sqrt((l2 + h1) * scale),
      maxNodal: maxNodalError(field, exact, dim, nc, meanFree ? mean.subarray(f * nc, (f + 1) * nc) : null),
    };
    if (wantDiv) out.div = Math.sqrt(acc[o + DIV] * scale);
    if (elastic) out.energy = Math.sqrt(Math.max(acc[o + EN] * scale, 0));
    return out;
  });
}

/** Everything one integration works with, allocated once per call (scratch buffers included). */
interface Sweep {
  mesh: DiscreteField['mesh'];
  fields: DiscreteField[];
  exact: ExactField;
  nc: number;
  nq: number;
  pts: Float64Array;
  wts: Float64Array;
  affine: boolean;
  stride: number;
  first: number;
  /** Divergence or strain asked for (nc = dim). */
  strain: boolean;
  lam: ScalarFn | undefined;
  mu: ScalarFn | undefined;
  meanFree: boolean;
  /** Per field: values and gradients at the rule's points of the current cell. */
  vals: Float64Array[];
  grads: Float64Array[];
  J: Float64Array;
  invJ: Float64Array;
  x: Float64Array;
  /** Physical points (nq·3) and weights × |det J| (nq) of the current cell. */
  xq: Float64Array;
  wq: Float64Array;
  uq: Float64Array;
  gq: Float64Array;
  /** Totals per field (SLOTS each) and the current cell's share. */
  acc: Float64Array;
  cellAcc: Float64Array;
  /** Σ w e_i per field and component, and |Ω| (first sweep); the means ē_i. */
  esum: Float64Array;
  cellEsum: Float64Array;
  vol: number;
  mean: Float64Array;
  /** Second sweep: Σ w Σ_i (e_i − ē_i)² per field, Σ w (e_i − ē_i) per field and component. */
  csq: Float64Array;
  cellCsq: Float64Array;
  ccorr: Float64Array;
  cellCcorr: Float64Array;
  /** Per-cell squared L2 and H1 seminorm of field 0 (opts.perCell), or null: the cell sums above, stored as they are
   *  added to the totals (nothing is recomputed, so the totals keep their bits). */
  pcL2: Float64Array | null;
  pcH1: Float64Array | null;
}

/** Physical points and weights × |det J| of cell c at the rule's points into s.xq and s.wq: affine cells with one
 *  Jacobian (x = x0 + J ξ inline), others through cellJacobian and mapReferencePoint per point. */
function cellPoints(s: Sweep, c: number): void {
  const { mesh, nq, pts, wts, affine, J, invJ, x, xq, wq } = s;
  const dim = mesh.dim;
  if (affine) {
    const det = Math.abs(cellJacobian(mesh, c, pts, 0, J, invJ));
    const v0 = mesh.cells[c * mesh.verticesPerCell] * dim, coords = mesh.coords;
    if (dim === 2) {
      const x0 = coords[v0], y0 = coords[v0 + 1], j00 = J[0], j01 = J[1], j10 = J[2], j11 = J[3];
      for (let q = 0; q < nq; q++) {
        const a = pts[2 * q], b = pts[2 * q + 1];
        xq[3 * q] = x0 + j00 * a + j01 * b; xq[3 * q + 1] = y0 + j10 * a + j11 * b; xq[3 * q + 2] = 0;
        wq[q] = wts[q] * det;
      }
      return;
    }
    for (let q = 0; q < nq; q++) {
      for (let d = 0; d < 3; d++) {
        if (d >= dim) { xq[3 * q + d] = 0; continue; }
        let t = coords[v0 + d];
        for (let r = 0; r < dim; r++) t += J[d * dim + r] * pts[q * dim + r];
        xq[3 * q + d] = t;
      }
      wq[q] = wts[q] * det;
    }
    return;
  }
  for (let q = 0; q < nq; q++) {
    const det = Math.abs(cellJacobian(mesh, c, pts, q * dim, J, invJ));
    mapReferencePoint(mesh, c, pts, q * dim, x);
    for (let d = 0; d < 3; d++) xq[3 * q + d] = d < dim ? x[d] : 0;
    wq[q] = wts[q] * det;
  }
}

/** The first sweep: L2, H1 seminorm, divergence and strain energy of every field, and Σ w e_i for the means. */
function sweep(s: Sweep): void {
  // Locals, not property loads, in the hot loop.
  const { mesh, fields, exact, nc, nq, pts, vals, grads, xq, wq, uq, gq, acc, cellAcc, esum, cellEsum, lam, mu, strain, meanFree, pcL2, pcH1 } = s;
  const dim = mesh.dim, nf = fields.length, ng = nc * dim;
  let vol = 0;
  for (let c = s.first; c < mesh.nCells; c += s.stride) {
    for (let f = 0; f < nf; f++) fields[f].evaluate(c, pts, nq, vals[f], grads[f]);
    cellPoints(s, c);
    cellAcc.fill(0);
    if (meanFree) cellEsum.fill(0);
    let cellVol = 0;
    for (let q = 0; q < nq; q++) {
      const X = xq[3 * q], Y = xq[3 * q + 1], Z = xq[3 * q + 2], w = wq[q];
      cellVol += w;
      exact.value(X, Y, Z, uq);
      exact.grad(X, Y, Z, gq);
      const wl = lam ? w * lam(X, Y, Z) : 0, wm = mu ? w * mu(X, Y, Z) : 0;
      for (let f = 0; f < nf; f++) {
        const vf = vals[f], gf = grads[f];
        const o = f * SLOTS, vo = q * nc, go = q * ng;
        let e2 = 0;
        for (let i = 0; i < nc; i++) {
          const e = uq[i] - vf[vo + i];
          e2 += e * e;
          if (meanFree) cellEsum[f * nc + i] += w * e;
        }
        let g2 = 0;
        for (let j = 0; j < ng; j++) { const t = gq[j] - gf[go + j]; g2 += t * t; }
        cellAcc[o + L2] += w * e2;
        cellAcc[o + H1] += w * g2;
        if (strain) {
          // D = ∇e (D_ij = ∂e_i/∂x_j); ∇·e = tr D; ε:ε = Σ_i D_ii² + Σ_{i<j} (D_ij + D_ji)²/2.
          let tr = 0, ee = 0;
          for (let i = 0; i < dim; i++) {
            const dii = gq[i * dim + i] - gf[go + i * dim + i];
            tr += dii;
            ee += dii * dii;
            for (let j = i + 1; j < dim; j++) {
              const t = gq[i * dim + j] - gf[go + i * dim + j] + gq[j * dim + i] - gf[go + j * dim + i];
              ee += 0.5 * t * t;
            }
          }
          cellAcc[o + DIV] += w * tr * tr;
          cellAcc[o + EN] += 2 * wm * ee + wl * tr * tr;
        }
      }
    }
    for (let i = 0; i < acc.length; i++) acc[i] += cellAcc[i];
    // Field 0's cell sums; a mean-free field's L2 is replaced by the centred one of the second sweep.
    if (pcL2 !== null) { pcL2[c] = cellAcc[L2]; pcH1![c] = cellAcc[H1]; }
    if (meanFree) for (let i = 0; i < esum.length; i++) esum[i] += cellEsum[i];
    vol += cellVol;
  }
  s.vol = vol;
}

/** The second sweep of a mean-free norm: Σ w (e_i − ē_i)² and Σ w (e_i − ē_i) with the means of the first. */
function sweepCentred(s: Sweep): void {
  const { mesh, fields, exact, nc, nq, pts, vals, grads, xq, wq, uq, mean, csq, cellCsq, ccorr, cellCcorr, pcL2 } = s;
  const nf = fields.length;
  for (let c = s.first; c < mesh.nCells; c += s.stride) {
    for (let f = 0; f < nf; f++) fields[f].evaluate(c, pts, nq, vals[f], grads[f]);
    cellPoints(s, c);
    cellCsq.fill(0); cellCcorr.fill(0);
    for (let q = 0; q < nq; q++) {
      const w = wq[q];
      exact.value(xq[3 * q], xq[3 * q + 1], xq[3 * q + 2], uq);
      for (let f = 0; f < nf; f++) {
        const vf = vals[f];
        let s2 = 0;
        for (let i = 0; i < nc; i++) {
          const e = uq[i] - vf[q * nc + i] - mean[f * nc + i];
          s2 += e * e;
          cellCcorr[f * nc + i] += w * e;
        }
        cellCsq[f] += w * s2;
      }
    }
    for (let f = 0; f < nf; f++) csq[f] += cellCsq[f];
    if (pcL2 !== null) pcL2[c] = cellCsq[0];
    for (let i = 0; i < ccorr.length; i++) ccorr[i] += cellCcorr[i];
  }
}

/** The largest |u_i − u_h,i| (less the mean error ē_i for a mean-free field) over the field's nodes and
 *  components; NaN when the field has no nodes. */
function maxNodalError(field: DiscreteField, exact: ExactField, dim: number, nc: number, mean: Float64Array | null): number {
  if (!field.nodes) return NaN;
  const { coords, values } = field.nodes;
  const nNodes = Math.floor(coords.length / dim);
  if (values.length !== nNodes * nc) {
    throw new RungsInputError(`fieldErrors: a field's nodes hold ${values.length} values for ${nNodes} nodes × ${nc} components`, 'fieldErrors.nodes');
  }
  const u = new Float64Array(Math.max(nc, 3));
  let m = 0;
  for (let p = 0; p < nNodes; p++) {
    exact.value(coords[p * dim], dim > 1 ? coords[p * dim + 1] : 0, dim > 2 ? coords[p * dim + 2] : 0, u);
    for (let i = 0; i < nc; i++) {
      const e = Math.abs(u[i] - values[p * nc + i] - (mean ? mean[i] : 0));
      if (e > m) m = e;
    }
  }
  return m;
}

/** The same norms of u itself (the error of the zero field): the scale that round-off is judged against. */
export function exactFieldNorms(mesh: DiscreteField['mesh'], exact: ExactField, opts: FieldErrorOptions & { degree: number }): FieldNormValues {
  const nc = exact.components;
  const zero: DiscreteField = {
    mesh, nDofs: 0, degree: 0, components: nc,
    evaluate(_c, _p, n, v, g) { v.fill(0, 0, n * nc); g.fill(0); },
  };
  return fieldErrors([zero], exact, opts)[0];
}
