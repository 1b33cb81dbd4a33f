/** MINRES iteration counts of the block-diagonal preconditioner for Taylor–Hood P2–P1 Stokes on refined grids.
 *  Theory: for an inf-sup stable pair, with Â spectrally equivalent to A (a multigrid cycle) and the pressure block
 *  spectrally equivalent to the mass matrix, the preconditioned matrix has eigenvalues in [−a, −b] ∪ [c, d] with a–d
 *  independent of h, so the MINRES count to a fixed tolerance is bounded independently of h (Elman, Silvester &
 *  Wathen 2014, Finite Elements and Fast Iterative Solvers, 2nd ed., Thm 4.7 and §4.2, numbering from memory).
 *  The assertion is deliberately loose: a count that grows by more than a third from 16×16 to 64×64 squares (grid
 *  sizes 4× apart, h⁻² 16×) is not bounded in any useful sense. No timing is asserted. */
import { describe, expect, it } from 'vitest';
import { setupSaddlePointSolver } from '../../src/linalg/saddle/index.ts';
import { taylorHoodGrid } from './helpers/taylor-hood-grid.ts';
import { randomVector } from './helpers/random-matrices.ts';

const SIZES = [8, 16, 32, 64];

describe('MINRES + block-diagonal(amg, mass): iteration counts stay bounded under refinement', () => {
  for (const pressureMass of ['chebyshev', 'diagonal'] as const) {
    it(`pressure block ${pressureMass}`, () => {
      const counts: number[] = [];
      const failures: string[] = [];
      for (const N of SIZES) {
        const P = taylorHoodGrid(N);
        const solver = setupSaddlePointSolver(P.A, P.B, P.M, { meanConstraint: P.w, relTol: 1e-8, pressureMass });
        const res = solver.solve(randomVector(P.nu, N), randomVector(P.np, N + 1));
        solver.dispose();
        if (!res.stats.converged) failures.push(`N = ${N}: ${res.stats.message}`);
        counts.push(res.stats.iterations);
      }
      expect(failures).toEqual([]);
      const [, c16, , c64] = counts;
      expect(c64, `counts ${counts.join(', ')} for N = ${SIZES.join(', ')}`).toBeLessThanOrEqual(Math.ceil(c16 * 4 / 3));
    });
  }
});
