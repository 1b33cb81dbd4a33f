import type { CellMatrixTerm } from '../types.ts';
import type { PointData } from './types.ts';

/** (σ(u), ε(v)) with σ = 2μ ε(u) + λ (∇·u) I, ε = sym ∇ (linear elasticity; e.g. Braess 2007, Finite Elements,
 *  ch. VI §1). For u = φ_b e_j and v = φ_a e_i: 2μ ε(u):ε(v) = μ (δ_ij ∇φ_a·∇φ_b + ∂_j φ_a ∂_i φ_b) and
 *  λ (∇·u)(∇·v) = λ ∂_i φ_a ∂_j φ_b. */
export function elasticityTerm(field: number, lambda: PointData, mu: PointData, degree: number): CellMatrixTerm {
  const lm = new Float64Array(1), mm = new Float64Array(1);
  return {
    name: 'elasticity', test: field, trial: field, degree,
    add(_c, cv, _trial, out, stride, rowOff, colOff) {
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
    },
  };
}
