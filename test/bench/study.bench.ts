// Whole convergence studies, mesh to errors, through the same runner as `rungs run` (targets: the seven-level P1
// study 16²…1024² and the P2 study 8²…512² each under 12 s wall, peak memory under 2 GB; a 1000:1 conductivity
// contrast within twice the iterations of the constant case). The studies are declared in ladder-studies.ts.
// Run: npx tsx test/bench/study.bench.ts [p1|p2|contrast|constant]
import { validateStudy } from '../../src/study/schema.ts';
import { runStudy } from '../../src/study/runner.ts';
import { printFigure } from './figures.ts';
import { LADDERS, ladderStudy, type LadderName } from './ladder-studies.ts';

const which = (process.argv[2] ?? 'p1') as LadderName;
if (!(which in LADDERS)) {
  process.stderr.write(`study.bench.ts: no study '${which}'; valid: ${Object.keys(LADDERS).join(', ')}\n`);
  process.exit(2);
}
const decl = validateStudy(ladderStudy(which), 'bench.study.ts');
const t0 = performance.now();
let finestIterations = NaN;
const r = await runStudy({ file: 'bench.study.ts', declaration: decl }, {
  onLevel: (_p, l) => {
    finestIterations = l.solver?.iterations ?? NaN;
    console.log(`  level ${l.index + 1}: ${l.dofs} dofs, ${l.solver?.method}+${l.solver?.preconditioner} ${l.solver?.iterations} it (${l.solver?.stoppedBy}), ` +
      `mesh ${l.seconds.mesh.toFixed(2)} s, assemble ${l.seconds.assemble.toFixed(2)} s, solve ${l.seconds.solve.toFixed(2)} s (multigrid setup ${(l.solver?.setupSeconds ?? 0).toFixed(2)} s + CG ${(l.solver?.solveSeconds ?? 0).toFixed(2)} s), errors ${l.seconds.errors.toFixed(2)} s, peak RSS ${((l.peakRssBytes ?? 0) / 2 ** 20).toFixed(0)} MiB`);
  },
});
const wall = (performance.now() - t0) / 1e3;
console.log(`${r.study}: ${wall.toFixed(1)} s wall; ${r.analyses.map((a) => `${a.name} ${a.fit?.order.toFixed(2)} ${a.verdict}`).join(', ')}`);
const n = LADDERS[which].n;
const label = `${which === 'p1' || which === 'p2' ? `${n.length}-level ${which.toUpperCase()} study` : `P1 study, k ${which}`} ${n[0]}² … ${n[n.length - 1]}², mesh to errors`;
const peakGB = process.resourceUsage().maxRSS / 2 ** 20;
if (which === 'p1' || which === 'p2') {
  printFigure({ name: label, value: wall, unit: 's', target: '≤ 12 s', met: wall <= 12, note: `peak RSS ${peakGB.toFixed(2)} GB` });
} else {
  printFigure({ name: `${label}: CG iterations on the finest level`, value: finestIterations, unit: 'iterations', note: `${wall.toFixed(1)} s wall` });
}
