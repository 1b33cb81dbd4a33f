// examples/external/rod_heat.py --write-series: the kiln-rod heat code writes every time level as solution-<k>.vtk, and
// rungs measures the norms over time from them. The manufactured temperature u = (1 + x) sin t + 1 with k = 2 on [0, 2]
// is linear in x, so it lies in the P1 space at every t and the semi-discrete solution is its nodal values (by hand; see
// test/external/rod-heat.test.ts): every error is the time stepper's, and Crank–Nicolson's is of order 2 in Δt at every
// time level (Hairer & Wanner 1996, Solving ODEs II, §IV.3; from memory), so Linf_L2 and L2_H1 show order 2 as well.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { defineStudy, type StudyDeclaration } from '../../src/study/declaration.ts';
import { interval } from '../../src/study/domain.ts';
import { heat } from '../../src/equation/presets.ts';
import { external } from '../../src/external/types.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { addLevel, completeStudy, prepareStudy } from '../../src/study/runner.ts';
import { runLevel } from '../../src/study/level.ts';
import type { StudyResult } from '../../src/study/result.ts';

const solver = join(import.meta.dirname, '..', '..', 'examples', 'external', 'rod_heat.py');
const hasPython = spawnSync('python3', ['--version']).status === 0;
const STEPS = [8, 16, 32];

if (!hasPython) {
  describe('examples/external/rod_heat.py --write-series', () => {
    it.skip('python3 is not installed on this machine: the runs of the Python kiln-rod heat solver are skipped', () => {});
  });
}

describe.skipIf(!hasPython)('examples/external/rod_heat.py --write-series through a study', () => {
  const root = mkdtempSync(join(tmpdir(), 'rungs-rod-series-'));
  afterAll(() => rmSync(root, { recursive: true, force: true }));

  const study = (name: string, series: boolean, norms: string[]): StudyDeclaration => validateStudy(defineStudy({
    name,
    domain: interval(0, 2),
    pde: heat({ k: 2 }),
    exact: '(1 + x)*sin(t) + 1',
    boundary: { dirichlet: ['left', 'right'] },
    discretization: external({
      command: `python3 ${solver} --method cn --n {n} --steps {steps} --T {T} --data {data} --out {out}${series ? ' --write-series' : ''}`,
      output: 'vtk', field: 'temperature', degree: 1, timeoutSeconds: 120,
    }),
    time: { final: 1, order: 2 },
    ladder: { n: [4], steps: STEPS },
    norms,
  }), `${name}.study.ts`);

  const run = async (decl: StudyDeclaration): Promise<StudyResult> => {
    const file = `${decl.name}.study.ts`;
    const p = prepareStudy({ declaration: decl, file }, { out: root });
    for (let i = 0; i < p.total; i++) addLevel(p, await runLevel(decl, file, p.problem, i, p.norms, p.solver, p.env));
    return completeStudy(p);
  };

  let withSeries: StudyResult, single: StudyResult;
  // One run of each study for all the checks below (no timeout worth the name: a slow machine only makes it slower).
  beforeAll(async () => {
    withSeries = await run(study('rod-series', true, ['L2', 'H1semi', 'Linf_L2', 'L2_H1']));
    single = await run(study('rod-single', false, ['L2', 'H1semi']));
  }, 600_000);

  it('writes solution-<k>.vtk for k = 0 … steps and no solution.vtk; its last file is the solution.vtk of a run without the option, byte for byte', () => {
    STEPS.forEach((steps, i) => {
      const dir = join(root, 'rod-series', `level-${i + 1}`);
      const series = readdirSync(dir).filter((f) => /^solution-\d+\.vtk$/.test(f)).sort((a, b) => Number(a.slice(9, -4)) - Number(b.slice(9, -4)));
      expect(series).toEqual(Array.from({ length: steps + 1 }, (_, k) => `solution-${k}.vtk`));
      expect(existsSync(join(dir, 'solution.vtk'))).toBe(false);
      expect(readFileSync(join(dir, `solution-${steps}.vtk`), 'utf8')).toBe(readFileSync(join(root, 'rod-single', `level-${i + 1}`, 'solution.vtk'), 'utf8'));
    });
  });

  it('the norms at T are those of the single-file run, bit for bit', () => {
    withSeries.levels.forEach((l, i) => {
      expect([l.errors.L2, l.errors.H1semi]).toEqual([single.levels[i]!.errors.L2, single.levels[i]!.errors.H1semi]);
    });
  });

  // Measured on this machine: rates 2.010, 2.001 (Linf_L2) and 2.027, 2.012 (L2_H1) from 8 to 32 steps.
  it('Linf_L2 and L2_H1 fall at order 2 in Δt (Crank–Nicolson; see above), and the maximum over time is at least the error at T', () => {
    const byName = Object.fromEntries(withSeries.analyses.map((a) => [a.name, a]));
    for (const nm of ['L2', 'Linf_L2', 'L2_H1']) {
      expect(byName[nm]!.expected).toBe(2);
      expect(byName[nm]!.verdict, `${nm}: rates ${byName[nm]!.rates.join(', ')}`).toBe('on-order');
    }
    // max_k ‖e(t_k)‖ ≥ ‖e(t_N)‖ by definition (t_N = T; common practice, no source).
    for (const l of withSeries.levels) expect(l.errors.Linf_L2! >= l.errors.L2!).toBe(true);
  });

  it('--write-series with --write errors is refused (exit status 2, a message)', () => {
    const r = spawnSync('python3', [solver, '--n', '4', '--steps', '2', '--T', '1', '--method', 'cn', '--write', 'errors', '--write-series',
      '--data', join(root, 'rod-series', 'data'), '--out', join(root, 'bad')], { encoding: 'utf8', env: { PATH: process.env.PATH ?? '/usr/bin:/bin' } });
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/--write-series writes VTK files, one per time level; use it with --write vtk/);
  });
});
