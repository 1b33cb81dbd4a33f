/** Smoothed aggregation for P1 plane-strain elasticity (λ = μ = 1, clamped on the left side, random right-hand
 *  side): PCG iterations and setup / solve seconds with the rigid-body modes as near-null space, and for comparison
 *  with the two constants per component only and with scalar AMG.
 *  Run: npx tsx test/bench/elasticity-amg.bench.ts [m ...]   (m squares per side; 2 m (m + 1) unknowns);
 *  VARIANTS=rigid,constants,scalar and KERNELS=wasm|javascript choose what runs.
 *  Measured on 2 shared cores AMD EPYC (other jobs running, so seconds vary by up to 2×), relTol 1e-8:
 *    unknowns   rigid-body modes             two constants                scalar AMG
 *    8k         17 it                        29 it                        154 it
 *    33k        15 it                        28 it                        304 it
 *    132k       15 it                        31 it                        597 it
 *    249k       17 it, setup 0.8 s, solve 0.4 s   33 it, 0.4 s + 0.8 s
 *    1.0M       16 it, setup 2.8–5.1 s, solve 1.2–2.0 s (operator complexity 1.58)
 *                                            33 it, setup 1.5–3.4 s, solve 1.7–2.6 s (1.26)
 *    2.0M       17 it, setup 17 s (the 4 GiB arena overflowed: hierarchy copied, setup partly in JavaScript),
 *               solve 4.4 s; two constants 35 it, 7.2 s + 5.6 s
 *  Lower setup figures at 1M: the arena's memory already resident from an earlier size in the same process. */
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { rigidBodyModes } from '../../src/linalg/amg/rigid-body-modes.ts';
import type { AmgOptions } from '../../src/linalg/amg/types.ts';
import { cg } from '../../src/linalg/cg.ts';
import { mulberry32 } from '../../src/linalg/random.ts';
import { clampedLeft, elasticityGrid, removeUnknowns } from '../linalg/elasticity-matrix.ts';

const sizes = process.argv.slice(2).map(Number);
const ms = sizes.length > 0 ? sizes : [64, 128, 256, 352, 512, 707];
const variants = (process.env.VARIANTS ?? 'rigid,constants,scalar').split(',');
const kernels = (process.env.KERNELS ?? 'wasm') as 'wasm' | 'javascript';

for (const m of ms) {
  let t = performance.now();
  const grid = elasticityGrid(m);
  const { A, free } = removeUnknowns(grid.A, clampedLeft(grid));
  const assembleSeconds = (performance.now() - t) / 1000;
  const n = A.nRows;
  // Free nodes: every node but those at x = 0 (whole nodes were eliminated).
  const nFree = n / 2;
  const coords = new Float64Array(2 * nFree);
  for (let r = 0; r < nFree; r++) { const g = free[2 * r] / 2; coords[2 * r] = grid.coords[2 * g]; coords[2 * r + 1] = grid.coords[2 * g + 1]; }
  const rand = mulberry32(7);
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) b[i] = rand() * 2 - 1;
  console.log(`m = ${m}: ${n} unknowns, ${A.rowPtr[n]} entries (assembled in ${assembleSeconds.toFixed(2)} s)`);
  for (const variant of variants) {
    const opts: AmgOptions = { symmetric: true, kernels };
    if (variant === 'rigid') Object.assign(opts, { blockSize: 2, nearNullSpace: rigidBodyModes(coords, 2, nFree) });
    else if (variant === 'constants') opts.blockSize = 2;
    // Wall-clock and CPU seconds of this thread's process (the machine is shared: CPU time is less sensitive to load).
    const cpu = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };
    t = performance.now();
    let c = cpu();
    const { preconditioner, stats } = amgSetup(A, opts);
    const setup = (performance.now() - t) / 1000, setupCpu = cpu() - c;
    t = performance.now();
    c = cpu();
    const x = new Float64Array(n);
    const s = cg(A, b, x, { relTol: 1e-8, maxIter: 2000, preconditioner });
    const solve = (performance.now() - t) / 1000, solveCpu = cpu() - c;
    preconditioner.dispose?.();
    console.log(`  ${variant.padEnd(10)} iterations ${String(s.iterations).padStart(4)}${s.converged ? '' : ' (not converged)'}  ` +
      `setup ${setup.toFixed(2)} s (cpu ${setupCpu.toFixed(2)})  solve ${solve.toFixed(2)} s (cpu ${solveCpu.toFixed(2)})  levels ${stats.levels}  ` +
      `sizes ${stats.perLevel.map((L) => L.rows).join('/')}  op.c. ${stats.operatorComplexity.toFixed(2)}  ` +
      `arena ${(stats.arenaBytes / 2 ** 20).toFixed(0)} MiB${stats.notes.length ? '  notes: ' + stats.notes.join('; ') : ''}`);
  }
}
