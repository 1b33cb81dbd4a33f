import type { CellValues } from '../../geometry/cellvalues.ts';
import type { CellMatrixTerm } from '../types.ts';
import type { PointData } from './types.ts';

/** (σ(u), ε(v)) with σ = 2μ ε(u) + λ (∇·u) I, ε = sym ∇ (linear elasticity; e.g. Braess 2007, Finite Elements,
 *  ch. VI §1). For u = φ_b e_j and v = φ_a e_i: 2μ ε(u):ε(v) = μ (δ_ij ∇φ_a·∇φ_b + ∂_j φ_a ∂_i φ_b) and
 *  λ (∇·u)(∇·v) = λ ∂_i φ_a ∂_j φ_b. In 2D the loops over i, j and d are written out (`addPlane`): the same
 *  operations in the same order as the general loop (`addElasticity`), so the same bits
 *  (test/fem/form/elasticity-term.test.ts), at about half its time. */
export function elasticityTerm(field: number, lambda: PointData, mu: PointData, degree: number): CellMatrixTerm {
  const lm = new Float64Array(1), mm = new Float64Array(1);
  return {
    name: 'elasticity', test: field, trial: field, degree,
    add(_c, cv, _trial, out, stride, rowOff, colOff) {
      if (cv.dim === 2) addPlane(cv, lambda, mu, lm, mm, out, stride, rowOff, colOff);
      else addElasticity(cv, lambda, mu, lm, mm, out, stride, rowOff, colOff);
    },
  };
}

/** The general loop, any dimension: the reference the 2D loop is tested against. */
export function addElasticity(
  cv: CellValues, lambda: PointData, mu: PointData, lm: Float64Array, mm: Float64Array,
  out: Float64Array, stride: number, rowOff: number, colOff: number,
): void {
  const { nq, n, dim, grads, wdet, x } = cv;
  for (let q = 0; q < nq; q++) {
    lambda(x[3 * q], x[3 * q + 1], x[3 * q + 2], lm);
    mu(x[3 * q], x[3 * q + 1], x[3 * q + 2], mm);
    const wl = wdet[q] * lm[0], wm = wdet[q] * mm[0];
    const o = q * n * dim;
    for (let a = 0; a < n; a++) {
      const ga = o + a * dim;
      for (let b = 0; b < n; b++) {
        const gb = o + b * dim;
        let dot = 0;
        for (let d = 0; d < dim; d++) dot += grads[ga + d] * grads[gb + d];
        dot *= wm;
        for (let i = 0; i < dim; i++) {
          const row = (rowOff + a * dim + i) * stride + colOff + b * dim;
          const gai = grads[ga + i], gbi = grads[gb + i];
          for (let j = 0; j < dim; j++) {
            out[row + j] += (i === j ? dot : 0) + wm * grads[ga + j] * gbi + wl * gai * grads[gb + j];
          }
        }
      }
    }
  }
}

/** addElasticity for dim = 2 with its inner loops written out. Every sum keeps its order and its literal zeros
 *  (0 + p is not p when p is −0), so the results are the general loop's bits. */
function addPlane(
  cv: CellValues, lambda: PointData, mu: PointData, lm: Float64Array, mm: Float64Array,
  out: Float64Array, stride: number, rowOff: number, colOff: number,
): void {
  const { nq, n, grads, wdet, x } = cv;
  for (let q = 0; q < nq; q++) {
    lambda(x[3 * q], x[3 * q + 1], x[3 * q + 2], lm);
    mu(x[3 * q], x[3 * q + 1], x[3 * q + 2], mm);
    const wl = wdet[q] * lm[0], wm = wdet[q] * mm[0];
    const o = q * n * 2;
    for (let a = 0; a < n; a++) {
      const ga = o + a * 2;
      const ga0 = grads[ga], ga1 = grads[ga + 1];
      const row0 = (rowOff + a * 2) * stride + colOff, row1 = row0 + stride;
      for (let b = 0; b < n; b++) {
        const gb = o + b * 2;
        const gb0 = grads[gb], gb1 = grads[gb + 1];
        const dot = (0 + ga0 * gb0 + ga1 * gb1) * wm;
        const c0 = row0 + b * 2, c1 = row1 + b * 2;
        out[c0] += dot + wm * ga0 * gb0 + wl * ga0 * gb0;
        out[c0 + 1] += 0 + wm * ga1 * gb0 + wl * ga0 * gb1;
        out[c1] += 0 + wm * ga0 * gb1 + wl * ga1 * gb0;
        out[c1 + 1] += dot + wm * ga1 * gb1 + wl * ga1 * gb1;
      }
    }
  }
}
