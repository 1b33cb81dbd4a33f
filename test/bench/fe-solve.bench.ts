/** AMG-preconditioned CG on the stiffness matrices rungs's own assembly produces: −∇·(k∇u) = f on the unit square
 *  cut into m×m squares of right-diagonal triangles, Lagrange P1/P2/P3, Dirichlet dofs eliminated (so P2/P3 rows
 *  of neighbouring nodes are far apart: vertex dofs first, then edge dofs, then cell dofs), load from the
 *  manufactured solution sin(πx)·sin(πy), relative residual 1e-10, through solveSystem as a study would call it.
 *  The conductivity is 1, or a 1000:1 checkerboard of 8×8 blocks (k = 1000 where ⌊8x⌋ + ⌊8y⌋ is even), which the
 *  meshes resolve exactly (m is a multiple of 8).
 *  Each case runs a few times; the run with the best setup + solve is printed (the machine is shared), and the total
 *  of the first run, whose multigrid arena is fresh memory (later runs reuse the arena the previous solve gave back:
 *  on these machines first touches of memory cost up to 3 ms per MB once a process holds a few hundred MB). Besides the
 *  iterations to 1e-10 the table shows those to 1e-9: with the checkerboard at 1M unknowns 1e-10 is below the
 *  round-off floor of the residual (ε·‖|A||x|‖/‖b‖ ≈ 5e-10 there), so CG may stop by stagnation.
 *  Targets (issue): P1 at 1M unknowns under 1.5 s in total and at most 25 iterations; iteration counts flat within
 *  ±3 from 16k to 1M unknowns for every degree; the checkerboard at most twice the iterations of k = 1.
 *  Run: npx tsx test/bench/fe-solve.bench.ts [P1 P2 P3 P1-checkerboard P2-checkerboard] [--max-unknowns N] */
import { manufacture } from '../../src/equation/index.ts';
import { assembleSystem } from '../../src/fem/assemble/system.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { solveSystem } from '../../src/linalg/index.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { printFigure } from './figures.ts';

interface Family { name: string; degree: number; sizes: number[]; contrast: number }

const FAMILIES: Family[] = [
  { name: 'P1', degree: 1, sizes: [128, 256, 512, 1024], contrast: 1 },
  { name: 'P2', degree: 2, sizes: [64, 128, 256, 512], contrast: 1 },
  { name: 'P3', degree: 3, sizes: [32, 64, 128, 256], contrast: 1 },
  { name: 'P1-checkerboard', degree: 1, sizes: [128, 256, 512, 1024], contrast: 1000 },
  { name: 'P2-checkerboard', degree: 2, sizes: [64, 128, 256, 512], contrast: 1000 },
];
const BLOCKS = 8;
const RUNS = Number(process.env.RUNS ?? 3);

const args = process.argv.slice(2);
const capAt = args.indexOf('--max-unknowns');
const maxUnknowns = capAt >= 0 ? Number(args[capAt + 1]) : Infinity;
const wanted = args.filter((a, i) => !a.startsWith('--') && (capAt < 0 || i !== capAt + 1));
const families = wanted.length > 0 ? FAMILIES.filter((f) => wanted.includes(f.name)) : FAMILIES;

const exact = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' });
const checkerboard = (contrast: number) => (x: number, y: number): number =>
  (Math.floor(BLOCKS * x) + Math.floor(BLOCKS * y)) % 2 === 0 ? contrast : 1;

interface Run {
  setup: number; solve: number; iterations: number; to1e9: number; residual: number; stoppedBy: string; oc: number; levels: number;
}

/** Per family, the best run at each size (smallest size first), for the figures after the table. */
const bestOf = new Map<string, Array<Run & { unknowns: number; first: number }>>();
console.log(`AMG-PCG on assembled Lagrange stiffness matrices, relTol 1e-10, best of ${RUNS} runs (setup + solve)`);
console.log('case              m     unknowns  nnz/row  levels  op.cplx  setup s  solve s  total s  first s  iters  to 1e-9  rel.res   stop');
for (const fam of families) {
  for (const m of fam.sizes) {
    const unknowns = (fam.degree * m - 1) ** 2;
    if (unknowns > maxUnknowns) continue;
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
    const space = lagrangeSpace(mesh, fam.degree);
    const coefficients = fam.contrast === 1 ? { f: exact.f } : { f: exact.f, k: checkerboard(fam.contrast), hints: { k: 0 } };
    const sys = assembleSystem(space, coefficients, { dirichlet: { tags: mesh.tagNames, value: exact.u } });
    let best: Run | null = null;
    let first = NaN;
    for (let r = 0; r < RUNS; r++) {
      let to1e9 = -1;
      const stopWhen = ({ iteration, relativeResidual }: { iteration: number; relativeResidual: number }): boolean => {
        if (to1e9 < 0 && relativeResidual <= 1e-9) to1e9 = iteration;
        return false;
      };
      const { stats, amg } = solveSystem(sys.A, sys.b, { symmetric: true, method: 'cg', preconditioner: 'amg', relTol: 1e-10, stopWhen });
      const run: Run = {
        setup: stats.setupSeconds ?? NaN, solve: stats.solveSeconds ?? NaN, iterations: stats.iterations, to1e9,
        residual: stats.relativeResidual, stoppedBy: stats.stoppedBy, oc: amg?.operatorComplexity ?? NaN, levels: amg?.levels ?? 0,
      };
      if (r === 0) first = run.setup + run.solve;
      if (!best || run.setup + run.solve < best.setup + best.solve) best = run;
    }
    const b = best!;
    bestOf.set(fam.name, [...(bestOf.get(fam.name) ?? []), { ...b, unknowns: sys.A.nRows, first }]);
    console.log(
      `${fam.name.padEnd(17)} ${String(m).padEnd(5)} ${String(sys.A.nRows).padEnd(9)} ` +
        `${(sys.A.rowPtr[sys.A.nRows] / sys.A.nRows).toFixed(1).padEnd(8)} ${String(b.levels).padEnd(7)} ${b.oc.toFixed(3).padEnd(8)} ` +
        `${b.setup.toFixed(3).padEnd(8)} ${b.solve.toFixed(3).padEnd(8)} ${(b.setup + b.solve).toFixed(3).padEnd(8)} ${first.toFixed(3).padEnd(8)} ` +
        `${String(b.iterations).padEnd(6)} ${String(b.to1e9).padEnd(8)} ${b.residual.toExponential(2).padEnd(9)} ${b.stoppedBy}`,
    );
  }
}

// The README's figures: per family the largest size's setup + solve and iterations, how the iterations grow from
// the smallest size to the largest (target for k = 1: flat within ±3), and the checkerboard's iterations against
// k = 1. The checkerboard's figures count iterations to 1e-9: at 1M unknowns its 1e-10 lies below the residual's
// round-off floor (header), where CG stops by stagnation and the count says nothing about the multigrid.
for (const [name, runs] of bestOf) {
  const big = runs[runs.length - 1]!, small = runs[0]!;
  const target = name === 'P1' ? { target: '≤ 1.5 s and ≤ 25 iterations', met: big.setup + big.solve <= 1.5 && big.iterations <= 25 } : {};
  printFigure({ name: `${name} ${big.unknowns} unknowns, AMG-PCG to 1e-10: setup + solve`, value: big.setup + big.solve, unit: 's', ...target,
    note: `${big.iterations} iterations, best of ${RUNS}; first solve of the process ${big.first.toFixed(2)} s` });
  const isCheckerboard = name.endsWith('-checkerboard');
  if (runs.length > 1) {
    const count = (r: Run): number => (isCheckerboard ? r.to1e9 : r.iterations);
    const growth = count(big) - count(small);
    printFigure({
      name: `${name} AMG iterations ${small.unknowns} → ${big.unknowns} unknowns${isCheckerboard ? ' (to 1e-9)' : ''}: growth`, value: growth, unit: 'iterations',
      ...(isCheckerboard ? {} : { target: 'within ±3', met: Math.abs(growth) <= 3 }), note: `${runs.map(count).join(' → ')}`,
    });
  }
  const plain = bestOf.get(name.replace('-checkerboard', ''));
  if (isCheckerboard && plain) {
    const same = plain.find((r) => r.unknowns === big.unknowns);
    if (same) printFigure({ name: `${name.replace('-checkerboard', '')} 1000:1 checkerboard vs k = 1 at ${big.unknowns} unknowns: iterations to 1e-9`, value: big.to1e9 / same.to1e9, unit: '×', target: '≤ 2×', met: big.to1e9 <= 2 * same.to1e9, note: `${big.to1e9} vs ${same.to1e9}; to 1e-10 ${big.iterations} vs ${same.iterations}` });
  }
}
