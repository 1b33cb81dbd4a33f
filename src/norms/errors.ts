import { ruleFor } from '../fem/quadrature/index.ts';
import { cellJacobian } from '../fem/geometry/jacobian.ts';
import { mapReferencePoint } from '../fem/geometry/map.ts';
import type { ScalarFn } from '../fem/assemble/types.ts';
import type { DiscreteField, ExactSolution, NormValues } from './types.ts';

/** Extra degrees of the error quadrature above 2k, the degree of |u_h|² (so the smooth part of the integrand
 *  is over-integrated; common practice, no source). */
export const ERROR_RULE_EXTRA = 4;

export interface ErrorOptions {
  /** Conductivity and reaction for the energy norm sqrt(∫ k|∇e|² + c e²). */
  k?: ScalarFn;
  c?: ScalarFn;
  /** Quadrature degree of the error integrals (default 2·degree + ERROR_RULE_EXTRA). */
  degree?: number;
}

/** L2, H1 seminorm, H1, energy and largest nodal error of u − u_h, integrated cell by cell. */
export function errorNorms(field: DiscreteField, exact: ExactSolution, opts: ErrorOptions = {}): NormValues {
  const mesh = field.mesh;
  const dim = mesh.dim;
  const k = field.degree ?? 2;
  const rule = ruleFor(mesh.cellKind, opts.degree ?? 2 * k + ERROR_RULE_EXTRA);
  const nq = rule.nPoints;
  const vals = new Float64Array(nq), grads = new Float64Array(nq * dim);
  const J = new Float64Array(9), invJ = new Float64Array(9), x = new Float64Array(3), g = new Float64Array(3);
  const affine = mesh.cellKind !== 'quadrilateral';
  let l2 = 0, h1 = 0, en = 0;
  const kf = opts.k, cf = opts.c;
  for (let c = 0; c < mesh.nCells; c++) {
    field.evaluate(c, rule.points, nq, vals, grads);
    let det = 0;
    for (let q = 0; q < nq; q++) {
      if (q === 0 || !affine) det = cellJacobian(mesh, c, rule.points, q * dim, J, invJ);
      mapReferencePoint(mesh, c, rule.points, q * dim, x);
      const X = x[0], Y = dim > 1 ? x[1] : 0, Z = dim > 2 ? x[2] : 0;
      const w = rule.weights[q] * Math.abs(det);
      const e = exact.u(X, Y, Z) - vals[q];
      exact.grad(X, Y, Z, g);
      let ge = 0;
      for (let d = 0; d < dim; d++) { const t = g[d] - grads[q * dim + d]; ge += t * t; }
      l2 += w * e * e;
      h1 += w * ge;
      en += w * ((kf ? kf(X, Y, Z) : 1) * ge + (cf ? cf(X, Y, Z) : 0) * e * e);
    }
  }
  let maxNodal = NaN;
  if (field.nodes) {
    maxNodal = 0;
    const { coords, values } = field.nodes;
    for (let i = 0; i < values.length; i++) {
      const e = Math.abs(exact.u(coords[i * dim], dim > 1 ? coords[i * dim + 1] : 0, dim > 2 ? coords[i * dim + 2] : 0) - values[i]);
      if (e > maxNodal) maxNodal = e;
    }
  }
  return { L2: Math.sqrt(l2), H1semi: Math.sqrt(h1), H1: Math.sqrt(l2 + h1), energy: Math.sqrt(Math.max(en, 0)), maxNodal };
}

/** The same norms of u itself (the error of the zero field): the scale that round-off is judged against. */
export function exactNorms(mesh: DiscreteField['mesh'], exact: ExactSolution, opts: ErrorOptions & { degree: number }): NormValues {
  const zero: DiscreteField = {
    mesh, nDofs: 0, degree: 0,
    evaluate(_c, _p, n, v, gr) { v.fill(0, 0, n); gr.fill(0); },
  };
  return errorNorms(zero, exact, opts);
}
