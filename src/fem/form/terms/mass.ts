import type { CellMatrixTerm } from '../types.ts';
import type { PointData } from './types.ts';

/** (c u, v) component by component, c = 1 when absent: a reaction term, or the pressure mass matrix that stands in
 *  for the Schur complement of Stokes flow. */
export function massTerm(field: number, components: number, degree: number, coefficient?: PointData): CellMatrixTerm {
  const cv1 = new Float64Array(1);
  return {
    name: 'mass', test: field, trial: field, degree,
    add(_c, cv, _trial, out, stride, rowOff, colOff) {
      const { nq, n, values, wdet, x } = cv;
      const nc = components;
      for (let q = 0; q < nq; q++) {
        let w = wdet[q];
        if (coefficient) { coefficient(x[3 * q], x[3 * q + 1], x[3 * q + 2], cv1); w *= cv1[0]; }
        for (let a = 0; a < n; a++) {
          const wa = w * values[q * n + a];
          for (let b = 0; b < n; b++) {
            const v = wa * values[q * n + b];
            for (let i = 0; i < nc; i++) out[(rowOff + a * nc + i) * stride + colOff + b * nc + i] += v;
          }
        }
      }
    },
  };
}
