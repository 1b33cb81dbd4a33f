import type { CellMatrixTerm } from '../types.ts';
import type { PointData } from './types.ts';

/** (ν ∇u, ∇v) for a field with nc components, component by component (the viscous term of Stokes flow in the
 *  form −∇·(ν∇u − pI); Elman, Silvester & Wathen 2014, §3.1). */
export function viscousTerm(field: number, components: number, nu: PointData, degree: number): CellMatrixTerm {
  const nv = new Float64Array(1);
  return {
    name: 'viscous', test: field, trial: field, degree,
    add(_c, cv, _trial, out, stride, rowOff, colOff) {
      const { nq, n, dim, grads, wdet, x } = cv;
      const nc = components;
      for (let q = 0; q < nq; q++) {
        nu(x[3 * q], x[3 * q + 1], x[3 * q + 2], nv);
        const w = wdet[q] * nv[0];
        const o = q * n * dim;
        for (let a = 0; a < n; a++) {
          for (let b = 0; b < n; b++) {
            let dot = 0;
            for (let d = 0; d < dim; d++) dot += grads[o + a * dim + d] * grads[o + b * dim + d];
            dot *= w;
            for (let i = 0; i < nc; i++) out[(rowOff + a * nc + i) * stride + colOff + b * nc + i] += dot;
          }
        }
      }
    },
  };
}
