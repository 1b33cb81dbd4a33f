/** CG's true residual r = b − A x through the multigrid arena's copy of A (the `residual` kernel of sparse.wat)
 *  against the TypeScript loop it replaces (cg-steps.ts residualInto), bit for bit, on a P2 matrix whose finest
 *  level drops round-off entries (so that the arena holds a copy of A); then CG with either path reports the same
 *  residual. The reference is the plain loop (common practice, no source). */
import { describe, expect, it } from 'vitest';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { cg } from '../../src/linalg/cg.ts';
import { residualInto } from '../../src/linalg/cg-steps.ts';
import { checkerboard, lagrangeGridStiffness } from './helpers/lagrange-grid.ts';
import { randomVector } from './helpers/random-matrices.ts';

describe('true residual through the arena', () => {
  const A = lagrangeGridStiffness('triangle', 2, 16, checkerboard(1000)).A;
  const n = A.nRows;
  it('gives the bits of the TypeScript loop, for arena and heap vectors', () => {
    const { preconditioner: M } = amgSetup(A, { kernels: 'wasm' });
    try {
      const product = M.product!;
      expect(typeof product.residual).toBe('function');
      const b = randomVector(n, 4), x0 = randomVector(n, 5);
      const want = new Float64Array(n);
      const wantRR = residualInto(A, b, x0, want);
      const x = M.vector!(n), r = M.vector!(n);
      x.set(x0);
      const rr = product.residual!(b, x, r);
      const rHeap = new Float64Array(n);
      const rrHeap = product.residual!(b, x0, rHeap);
      let bad = 0;
      for (let i = 0; i < n; i++) if (!Object.is(r[i], want[i]) || !Object.is(rHeap[i], want[i])) bad++;
      expect([bad, rr, rrHeap]).toEqual([0, wantRR, wantRR]);
      M.release!(x); M.release!(r);
    } finally {
      M.dispose?.();
    }
  });
  it('leaves CG with the same final residual as the JavaScript cycle', () => {
    const b = randomVector(n, 6);
    const run = (kernels: 'wasm' | 'javascript') => {
      const { preconditioner } = amgSetup(A, { kernels });
      const x = new Float64Array(n);
      const s = cg(A, b, x, { relTol: 1e-10, preconditioner });
      preconditioner.dispose?.();
      return s;
    };
    const w = run('wasm'), j = run('javascript');
    expect(w.converged).toBe(true);
    expect([w.iterations, w.relativeResidual]).toEqual([j.iterations, j.relativeResidual]);
  });
});
