// Peak memory of one built-in level per unknown, the figure src/study/memory-budget.ts estimates levels with.
// Each case runs a two-level study (a tiny level, then the measured one) in a fresh process and reports the peak RSS
// above that of a process that only loads rungs; two sizes per degree give the slope (bytes per unknown) apart from
// any fixed cost. Run: npx tsx test/bench/memory.bench.ts [p1 p2 p3]
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const self = fileURLToPath(import.meta.url);

if (process.argv[2] === '--child') {
  const degree = Number(process.argv[3]);
  const n = Number(process.argv[4]);
  const { defineStudy, rectangle, lagrange } = await import('../../src/index.ts');
  const { validateStudy } = await import('../../src/study/schema.ts');
  const { runStudy } = await import('../../src/study/runner.ts');
  let dofs = 0;
  if (n > 0) {
    const decl = validateStudy(defineStudy({
      name: `memory-p${degree}`,
      domain: rectangle([0, 1], [0, 1]),
      exact: 'sin(pi*x) * sin(pi*y)',
      discretization: lagrange({ degree }),
      ladder: { n: [2, n] },
      norms: ['L2', 'H1semi'],
      memoryBudgetMB: 1e9,
      // P3 at 263k unknowns reaches round-off before relative residual 1e-12 with this smooth solution.
      solver: { relTol: 1e-10 },
    }), 'memory.study.ts');
    const r = await runStudy({ file: 'memory.study.ts', declaration: decl }, {});
    dofs = r.levels[r.levels.length - 1]!.dofs;
  }
  console.log(JSON.stringify({ dofs, peak: process.resourceUsage().maxRSS * 1024 }));
  process.exit(0);
}

const child = (degree: number, n: number): { dofs: number; peak: number } =>
  JSON.parse(execFileSync(process.execPath, ['--import', 'tsx', self, '--child', String(degree), String(n)], { encoding: 'utf8' }).trim().split('\n').pop()!);

// Two sizes per degree, the larger at about 1M unknowns: (k·n + 1)² unknowns on the unit square.
const cases: Record<string, [number, number, number]> = { p1: [1, 512, 1024], p2: [2, 256, 512], p3: [3, 171, 341] };
const which = process.argv.slice(2).filter((a) => a in cases);
const base = child(1, 0).peak;
console.log(`baseline (rungs loaded, no level): peak RSS ${(base / 2 ** 20).toFixed(0)} MiB`);
for (const name of which.length ? which : Object.keys(cases)) {
  const [degree, small, large] = cases[name]!;
  const a = child(degree, small);
  const b = child(degree, large);
  const slope = (b.peak - a.peak) / (b.dofs - a.dofs);
  console.log(`${name}: ${a.dofs} unknowns ${((a.peak - base) / 2 ** 20).toFixed(0)} MiB above baseline (${((a.peak - base) / a.dofs).toFixed(0)} B/unknown), ` +
    `${b.dofs} unknowns ${((b.peak - base) / 2 ** 20).toFixed(0)} MiB (${((b.peak - base) / b.dofs).toFixed(0)} B/unknown); slope ${slope.toFixed(0)} B/unknown, ` +
    `fixed part ${(((b.peak - base) - slope * b.dofs) / 2 ** 20).toFixed(0)} MiB`);
}
