import { describe, expect, it } from 'vitest';
import { createLinearSolver, solveSystem } from '../../src/linalg/solve.ts';
import { residualNorm } from '../../src/linalg/csr.ts';
import { fivePointLaplacian } from './helpers/poisson.ts';
import { randomVector } from './helpers/random-matrices.ts';

// A solver set up once and used for many right-hand sides gives, for each, the bits solveSystem gives with the same
// options (the same operations in the same order; common practice, no source), and builds its preconditioner once.
describe('a linear solver set up once, solved many times', () => {
  const A = fivePointLaplacian(90);
  const rhs = [randomVector(A.nRows, 11), randomVector(A.nRows, 12), randomVector(A.nRows, 13)];
  for (const [method, preconditioner] of [['cg', 'amg'], ['gmres', 'ilu0'], ['cg', 'ic0'], ['direct', 'none']] as const) {
    it(`${method} + ${preconditioner}: each solve equals a fresh solveSystem bit for bit`, () => {
      const opts = { symmetric: true, method, preconditioner, relTol: 1e-10 } as const;
      const solver = createLinearSolver(A, opts);
      const mismatches: string[] = [];
      const setups: number[] = [];
      for (const [k, b] of rhs.entries()) {
        const once = solver.solve(b);
        const fresh = solveSystem(A, b, opts);
        if (once.x.some((v, i) => !Object.is(v, fresh.x[i]))) mismatches.push(`rhs ${k}`);
        if (once.stats.iterations !== fresh.stats.iterations) mismatches.push(`iterations ${k}`);
        setups.push(once.stats.setupSeconds ?? 0);
        if (!(residualNorm(A, once.x, b) <= 1e-8 * Math.hypot(...b))) mismatches.push(`residual ${k}`);
      }
      solver.dispose();
      expect(mismatches).toEqual([]);
      // The setup is reported once, by the first solve.
      expect(setups.slice(1)).toEqual([0, 0]);
    });
  }
  it('refuses to solve after dispose', () => {
    const solver = createLinearSolver(A, { symmetric: true, preconditioner: 'amg' });
    solver.dispose();
    expect(() => solver.solve(rhs[0])).toThrow(/after dispose/);
  });
});
