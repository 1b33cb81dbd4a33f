// Whole convergence studies, mesh to errors, through the same runner as `rungs run` (targets: the seven-level P1
// study 16²…1024² and the P2 study 8²…512² each under 12 s wall, peak memory under 2 GB; a 1000:1 conductivity
// contrast within twice the iterations of the constant case). Run: npx tsx test/bench/study.bench.ts [p1|p2|contrast|constant]
import { defineStudy, rectangle, lagrange } from '../../src/index.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { runStudy } from '../../src/study/runner.ts';

const which = process.argv[2] ?? 'p1';
const studies = {
  p1: { degree: 1, n: [16, 32, 64, 128, 256, 512, 1024], k: undefined },
  p2: { degree: 2, n: [8, 16, 32, 64, 128, 256, 512], k: undefined },
  // Conductivity rising from 1 to 1000 across a layer of width ~0.05 at x = 0.5 (a glaze over a porous body):
  // smooth, so the manufactured source exists, but a 1000:1 contrast for the solver.
  contrast: { degree: 1, n: [64, 128, 256, 512, 1024], k: '1 + 999 * (0.5 + 0.5 * tanh(20 * (x - 0.5)))' },
  constant: { degree: 1, n: [64, 128, 256, 512, 1024], k: '1' },
}[which]!;

const decl = validateStudy(defineStudy({
  name: `bench-${which}`,
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * sin(pi*y)',
  ...(studies.k ? { coefficients: { k: studies.k }, solver: { errorFraction: 0, relTol: 1e-10 } } : {}),
  discretization: lagrange({ degree: studies.degree }),
  ladder: { n: studies.n },
  norms: ['L2', 'H1semi'],
}), 'bench.study.ts');
const t0 = performance.now();
const r = await runStudy({ file: 'bench.study.ts', declaration: decl }, {
  onLevel: (_p, l) => console.log(`  level ${l.index + 1}: ${l.dofs} dofs, ${l.solver?.method}+${l.solver?.preconditioner} ${l.solver?.iterations} it (${l.solver?.stoppedBy}), ` +
    `mesh ${l.seconds.mesh.toFixed(2)} s, assemble ${l.seconds.assemble.toFixed(2)} s, solve ${l.seconds.solve.toFixed(2)} s (multigrid setup ${(l.solver?.setupSeconds ?? 0).toFixed(2)} s + CG ${(l.solver?.solveSeconds ?? 0).toFixed(2)} s), errors ${l.seconds.errors.toFixed(2)} s, peak RSS ${((l.peakRssBytes ?? 0) / 2 ** 20).toFixed(0)} MiB`),
});
console.log(`${r.study}: ${((performance.now() - t0) / 1e3).toFixed(1)} s wall; ${r.analyses.map((a) => `${a.name} ${a.fit?.order.toFixed(2)} ${a.verdict}`).join(', ')}`);
