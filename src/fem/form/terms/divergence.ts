import type { CellMatrixTerm } from '../types.ts';

/** −(p, ∇·v) and −(q, ∇·u): the two off-diagonal blocks of Stokes flow for velocity u (dim components) and pressure
 *  p, written symmetrically so the whole matrix is symmetric indefinite (Elman, Silvester & Wathen 2014, §3.3). */
export function pressureDivergenceTerms(velocity: number, pressure: number, degree: number): CellMatrixTerm[] {
  const gradient: CellMatrixTerm = {
    name: 'pressure-gradient', test: velocity, trial: pressure, degree,
    add(_c, vv, pv, out, stride, rowOff, colOff) {
      const { nq, n, dim, grads, wdet } = vv;
      const np = pv.n, pvals = pv.values;
      for (let q = 0; q < nq; q++) {
        const w = wdet[q];
        for (let a = 0; a < n; a++) {
          for (let i = 0; i < dim; i++) {
            const g = w * grads[(q * n + a) * dim + i];
            const row = (rowOff + a * dim + i) * stride + colOff;
            for (let b = 0; b < np; b++) out[row + b] -= g * pvals[q * np + b];
          }
        }
      }
    },
  };
  const divergence: CellMatrixTerm = {
    name: 'divergence', test: pressure, trial: velocity, degree,
    add(_c, pv, vv, out, stride, rowOff, colOff) {
      const { nq, n, dim, grads, wdet } = vv;
      const np = pv.n, pvals = pv.values;
      for (let q = 0; q < nq; q++) {
        const w = wdet[q];
        for (let a = 0; a < np; a++) {
          const wa = w * pvals[q * np + a];
          const row = (rowOff + a) * stride + colOff;
          for (let b = 0; b < n; b++) for (let j = 0; j < dim; j++) out[row + b * dim + j] -= wa * grads[(q * n + b) * dim + j];
        }
      }
    },
  };
  return [gradient, divergence];
}
