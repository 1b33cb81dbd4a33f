/** AMG-preconditioned CG on the 2D five-point Poisson matrix (= P1 stiffness on right-diagonal triangles of a
 *  uniform grid; common practice, no source), m×m interior nodes, to relative residual 1e-10.
 *  Run: npx tsx test/bench/solve.bench.ts [m ...]   (default 128 256 512 1024). */
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { cg } from '../../src/linalg/cg.ts';
import { fivePointLaplacian } from '../linalg/helpers/poisson.ts';

const sizes = process.argv.slice(2).map(Number).filter((v) => v > 0);
const grid = sizes.length > 0 ? sizes : [128, 256, 512, 1024];
const repeats = (m: number): number => (m >= 1024 ? 3 : m >= 512 ? 4 : 6);

console.log('m      unknowns   levels  op.cplx  setup s   solve s   total s   iters  rel.res    µs/unknown');
for (const m of grid) {
  const A = fivePointLaplacian(m);
  const n = A.nRows;
  const b = new Float64Array(n);
  // Load of a smooth source, f = 1 on a mesh of width h = 1/(m+1): b_i = h² f.
  b.fill(1 / ((m + 1) * (m + 1)));
  const x = new Float64Array(n);
  let best = { setup: Infinity, solve: Infinity, total: Infinity, iters: 0, rel: 0, levels: 0, oc: 0 };
  for (let r = 0; r < repeats(m); r++) {
    x.fill(0);
    const t0 = performance.now();
    const amg = amgSetup(A, { symmetric: true });
    const t1 = performance.now();
    const stats = cg(A, b, x, { relTol: 1e-10, preconditioner: amg.preconditioner, skipSymmetryCheck: true });
    const t2 = performance.now();
    const total = (t2 - t0) / 1000;
    if (total < best.total) {
      best = {
        setup: (t1 - t0) / 1000, solve: (t2 - t1) / 1000, total, iters: stats.iterations, rel: stats.relativeResidual,
        levels: amg.stats.levels, oc: amg.stats.operatorComplexity,
      };
    }
    if (!stats.converged) console.log(`  not converged: ${stats.message}`);
  }
  console.log(
    `${String(m).padEnd(6)} ${String(n).padEnd(10)} ${String(best.levels).padEnd(7)} ${best.oc.toFixed(3).padEnd(8)} ` +
      `${best.setup.toFixed(3).padEnd(9)} ${best.solve.toFixed(3).padEnd(9)} ${best.total.toFixed(3).padEnd(9)} ` +
      `${String(best.iters).padEnd(6)} ${best.rel.toExponential(2).padEnd(10)} ${((best.total * 1e6) / n).toFixed(3)}`,
  );
}
