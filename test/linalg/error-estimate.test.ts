import { describe, expect, it } from 'vitest';
import { cg, CG_ERROR_DELAY } from '../../src/linalg/cg.ts';
import { directSolve } from '../../src/linalg/index.ts';
import { spmv } from '../../src/linalg/csr.ts';
import { ssorPreconditioner } from '../../src/linalg/precond/ssor.ts';
import { fivePointLaplacian } from './helpers/poisson.ts';
import { randomVector } from './helpers/random-matrices.ts';
import type { Csr } from '../../src/linalg/types.ts';

function aNorm(A: Csr, e: Float64Array): number {
  const Ae = new Float64Array(e.length);
  spmv(A, e, Ae);
  let s = 0;
  for (let i = 0; i < e.length; i++) s += e[i] * Ae[i];
  return Math.sqrt(s);
}

// The Hestenes–Stiefel identity ||x*−x_{k−d}||²_A − ||x*−x_k||²_A = Σ_{j=k−d}^{k−1} α_j r_j·z_j holds for (P)CG in exact
// arithmetic and, to working accuracy, in floating point (Hestenes & Stiefel 1952, Thm 6:1; Strakoš & Tichý 2002).
describe('CG energy-norm error estimate', () => {
  it.each([['none', false], ['ssor', true]])('matches the Hestenes–Stiefel identity (preconditioner %s)', (_name, precond) => {
    const A = fivePointLaplacian(24);
    const b = randomVector(A.nRows, 7);
    const exact = new Float64Array(A.nRows);
    directSolve(A, b, exact);
    const errors: number[] = [];
    const estimates: number[] = [];
    const x = new Float64Array(A.nRows);
    cg(A, b, x, {
      relTol: 1e-13,
      preconditioner: precond ? ssorPreconditioner(A) : undefined,
      stopWhen: ({ x: xk, energyErrorEstimate }) => {
        const e = new Float64Array(xk.length);
        for (let i = 0; i < e.length; i++) e[i] = exact[i] - xk[i];
        errors.push(aNorm(A, e));
        estimates.push(energyErrorEstimate ?? Infinity);
        return false;
      },
    });
    expect(errors.length).toBeGreaterThan(2 * CG_ERROR_DELAY);
    let checked = 0;
    // errors[i] belongs to iterate i+1; the estimate passed with iterate k covers iterates k−d … k.
    for (let i = CG_ERROR_DELAY; i < errors.length; i++) {
      const before = errors[i - CG_ERROR_DELAY], now = errors[i];
      // Below this the reference x* (a direct solve) and the difference of squares are dominated by round-off.
      if (before < 1e-5 * errors[0]) break;
      const identity = Math.sqrt(before * before - now * now);
      expect(Math.abs(estimates[i] - identity) / identity).toBeLessThan(1e-4);
      checked++;
    }
    expect(checked).toBeGreaterThan(5);
  });
});
