/** AMG-preconditioned CG on the 2D five-point Poisson matrix (= P1 stiffness on right-diagonal triangles of a
 *  uniform grid; common practice, no source), m×m interior nodes, load b = h²·1, to relative residual 1e-10.
 *  Setup and solve are timed separately; each size runs a few times and the run with the best total is shown,
 *  with the median total beside it (the machine is shared). The matrix is symmetric by construction, so the
 *  symmetry checks of amgSetup and cg are skipped as a caller who knows would.
 *  Run: npx tsx test/bench/solve.bench.ts [m ...]   (default 128 256 512 1024, i.e. 16k to 1M unknowns). */
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { cg } from '../../src/linalg/cg.ts';
import { fivePointLaplacian } from '../linalg/helpers/poisson.ts';

const sizes = process.argv.slice(2).map(Number).filter((v) => v > 0);
const grid = sizes.length > 0 ? sizes : [128, 256, 512, 1024];
const repeats = (m: number): number => (m >= 1024 ? 3 : m >= 512 ? 4 : 6);

interface Run { setup: number; solve: number; total: number; iters: number; rel: number; levels: number; oc: number; rows: string }

console.log('AMG-PCG, 2D five-point Poisson, relTol 1e-10 (best of N runs; median total in the last column)');
console.log('m      unknowns  levels  op.cplx  setup s  solve s  total s  iters  rel.res   µs/unknown  median s');
for (const m of grid) {
  const A = fivePointLaplacian(m);
  const n = A.nRows;
  const b = new Float64Array(n).fill(1 / ((m + 1) * (m + 1)));
  const x = new Float64Array(n);
  const runs: Run[] = [];
  for (let r = 0; r < repeats(m); r++) {
    x.fill(0);
    const t0 = performance.now();
    const amg = amgSetup(A, { symmetric: true });
    const t1 = performance.now();
    const stats = cg(A, b, x, { relTol: 1e-10, preconditioner: amg.preconditioner, skipSymmetryCheck: true });
    const t2 = performance.now();
    if (!stats.converged) console.log(`  not converged: ${stats.message}`);
    runs.push({
      setup: (t1 - t0) / 1000, solve: (t2 - t1) / 1000, total: (t2 - t0) / 1000, iters: stats.iterations,
      rel: stats.relativeResidual, levels: amg.stats.levels, oc: amg.stats.operatorComplexity,
      rows: amg.stats.perLevel.map((l) => l.rows).join(' → '),
    });
  }
  const sorted = [...runs].sort((a, c) => a.total - c.total);
  const best = sorted[0];
  const median = sorted[Math.floor(sorted.length / 2)].total;
  console.log(
    `${String(m).padEnd(6)} ${String(n).padEnd(9)} ${String(best.levels).padEnd(7)} ${best.oc.toFixed(3).padEnd(8)} ` +
      `${best.setup.toFixed(3).padEnd(8)} ${best.solve.toFixed(3).padEnd(8)} ${best.total.toFixed(3).padEnd(8)} ` +
      `${String(best.iters).padEnd(6)} ${best.rel.toExponential(2).padEnd(9)} ${((best.total * 1e6) / n).toFixed(3).padEnd(11)} ` +
      `${median.toFixed(3)}`,
  );
  if (m === grid[grid.length - 1]) console.log(`levels (rows): ${best.rows}`);
}
