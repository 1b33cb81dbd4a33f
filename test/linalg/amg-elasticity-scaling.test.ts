/** PCG iteration counts of smoothed aggregation for P1 plane-strain elasticity (λ = μ = 1, clamped on the left
 *  side) from 8k to 250k unknowns. The largest case makes this file take several seconds; the figures at 1M are
 *  in test/bench/elasticity-amg.bench.ts. */
import { describe, expect, it } from 'vitest';
import { rigidBodyModes } from '../../src/linalg/amg/rigid-body-modes.ts';
import { solveSystem } from '../../src/linalg/solve.ts';
import type { AmgOptions } from '../../src/linalg/amg/types.ts';
import { clampedLeft, elasticityGrid, removeUnknowns } from './elasticity-matrix.ts';
import { randomVector } from './helpers/random-matrices.ts';

describe('smoothed aggregation for elasticity: iteration counts', () => {
  it('stay flat with the rigid-body modes from 8k to 250k unknowns, and lie below those of the constants alone', () => {
    // Smoothed aggregation with the rigid-body modes as near-null space converges at a rate independent of h for
    // elasticity (Vaněk, Mandel & Brezina 1996, Computing 56, 179–196, from memory); with only the translations
    // the coarse spaces miss the rotations, the slowest modes of the smoother, and it needs more iterations.
    const counts: number[] = [];
    let constantsAtLargest = 0;
    const ms = [64, 128, 256, 352]; // 8320, 33024, 131584, 248512 unknowns
    for (const m of ms) {
      const grid = elasticityGrid(m);
      const { A, free } = removeUnknowns(grid.A, clampedLeft(grid));
      const coords = new Float64Array(free.length);
      for (let r = 0; r < free.length / 2; r++) {
        const g = free[2 * r] / 2;
        coords[2 * r] = grid.coords[2 * g]; coords[2 * r + 1] = grid.coords[2 * g + 1];
      }
      const b = randomVector(A.nRows, 21);
      const solve = (amg: AmgOptions): number => {
        const r = solveSystem(A, b, { symmetric: true, method: 'cg', preconditioner: 'amg', relTol: 1e-8, maxIter: 500, amg });
        return r.stats.converged ? r.stats.iterations : Infinity;
      };
      counts.push(solve({ blockSize: 2, nearNullSpace: rigidBodyModes(coords, 2, free.length / 2) }));
      if (m === ms[ms.length - 1]) constantsAtLargest = solve({ blockSize: 2 });
    }
    // Seen when this test was written: rigid-body modes 17, 15, 15, 17; two constants at 248k unknowns: 34.
    const report = `rigid-body modes: ${counts.join(', ')}; two constants at the largest size: ${constantsAtLargest}`;
    expect(counts.every(Number.isFinite), report).toBe(true);
    expect(Math.max(...counts) - Math.min(...counts), report).toBeLessThanOrEqual(4);
    expect(constantsAtLargest, report).toBeGreaterThan(counts[counts.length - 1]);
  });
});
