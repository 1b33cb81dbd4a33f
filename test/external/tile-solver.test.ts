// End to end: examples/external/tile_solver.py (a P1 solver in plain Python) run per level through both protocols.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runLevelsInParallel } from '../../src/external/command.ts';
import { runExternalLevel } from '../../src/external/level.ts';
import { externalLevelResult } from '../../src/study/external-level.ts';
import { levelFolder } from '../../src/external/output.ts';
import { external, type ExternalLevelRun } from '../../src/external/types.ts';
import { analyseQuantity } from '../../src/analysis/quantities.ts';
import { loadStudy } from '../../src/study/load.ts';
import { buildProblem } from '../../src/study/problem.ts';
import { writeStudyData } from '../../src/study/data-files.ts';
import type { ExactSolution } from '../../src/norms/types.ts';

const solver = join(import.meta.dirname, '..', '..', 'examples', 'external', 'tile_solver.py');
const hasPython = spawnSync('python3', ['--version']).status === 0;
const ladder = [4, 8, 16, 32];
const rate = (e1: number, e2: number) => Math.log(e1 / e2) / Math.log(2);

// The solver's manufactured temperature u = sin(πx) sinh(πy)/sinh(π) + x(1 − x)/2, with −Δu = 1.
const tile: ExactSolution = {
  u: (x, y) => Math.sin(Math.PI * x) * Math.sinh(Math.PI * y) / Math.sinh(Math.PI) + 0.5 * x * (1 - x),
  grad: (x, y, _z, g) => {
    g[0] = Math.PI * Math.cos(Math.PI * x) * Math.sinh(Math.PI * y) / Math.sinh(Math.PI) + 0.5 - x;
    g[1] = Math.PI * Math.sin(Math.PI * x) * Math.cosh(Math.PI * y) / Math.sinh(Math.PI);
  },
};
// Exact integrals: ∫∫ u = 2(cosh π − 1)/(π² sinh π) + 1/12, and the flux ∫ ∂u/∂y (x, 1) dx = 2 coth π.
const MEAN_EXACT = 2 * (Math.cosh(Math.PI) - 1) / (Math.PI ** 2 * Math.sinh(Math.PI)) + 1 / 12;
const FLUX_EXACT = 2 / Math.tanh(Math.PI);

if (!hasPython) {
  describe('examples/external/tile_solver.py', () => {
    it.skip('python3 is not installed on this machine: the end-to-end runs of the Python tile solver are skipped', () => {});
  });
}

describe.skipIf(!hasPython)('examples/external/tile_solver.py through both output protocols', () => {
  const root = mkdtempSync(join(tmpdir(), 'rungs-tile-'));
  afterAll(() => rmSync(root, { recursive: true, force: true }));
  // The solver types nothing of the manufactured solution: it imports the rungs_data.py generated for the study.
  let data = '';
  beforeAll(async () => {
    const { declaration } = await loadStudy('studies/tile-python.study.ts');
    data = writeStudyData(join(root, 'data'), declaration, buildProblem(declaration, 'studies/tile-python.study.ts'), ['python']);
  });
  const runAll = (write: string, extra = '') => {
    const spec = external({ command: `python3 '${solver}' --n {n} --data '${data}' --out {out} --write ${write}${extra}`, output: write === 'errors' ? 'errors' : 'vtk', degree: 1, timeoutSeconds: 60 });
    return runLevelsInParallel(ladder.map((n, index) => () => runExternalLevel(spec, {
      study: `tile-${write}`, index, n, h: Math.SQRT2 / n, outDir: levelFolder(join(root, write), index),
      norms: write === 'errors' ? ['L2', 'H1semi'] : undefined,
      quantities: extra || write === 'errors' ? ['mean_temperature', 'flux_top'] : undefined,
    })), 2);
  };
  let json: ExternalLevelRun[];
  let vtk: ExternalLevelRun[];
  beforeAll(async () => {
    [json, vtk] = [await runAll('errors'), await runAll('vtk', ' --quantities')];
  });

  it('the solver\'s quadrature rule integrates monomials of degree ≤ 5 exactly (∫ x^a y^b = a! b! / (a+b+2)!)', () => {
    const r = spawnSync('python3', [solver, '--check-rule'], { encoding: 'utf8' });
    expect(r.status, r.stdout + r.stderr).toBe(0);
  });

  it('JSON protocol: the errors rungs reads are the numbers in the file, bit for bit', () => {
    for (const [i, r] of json.entries()) {
      expect(r.output.kind).toBe('errors');
      const file = JSON.parse(readFileSync(join(levelFolder(join(root, 'errors'), i), 'errors.json'), 'utf8'));
      const level = externalLevelResult(r, { index: i, n: ladder[i]!, exact: tile, norms: ['L2', 'H1semi'] });
      expect(level.level.errors).toEqual(file.errors);
      expect(level.level.dofs).toBe((ladder[i]! + 1) ** 2);
      expect(level.quantities).toEqual(file.quantities);
    }
  });

  it('VTK protocol: the L2 and H1 errors rungs integrates converge at rates 2 and 1 (P1 with a smooth solution)', () => {
    // Expected orders k+1 and k for P1 (Ciarlet 1978, §3.2, with the Aubin–Nitsche argument; section from memory).
    const levels = vtk.map((r, i) => externalLevelResult(r, { index: i, n: ladder[i]!, exact: tile, norms: ['L2', 'H1semi'], symmetric: true }).level);
    const l2 = levels.map((l) => l.errors.L2!), h1 = levels.map((l) => l.errors.H1semi!);
    expect(Math.abs(rate(l2[2]!, l2[3]!) - 2)).toBeLessThan(0.05);
    expect(Math.abs(rate(h1[2]!, h1[3]!) - 1)).toBeLessThan(0.05);
    // Céa's lemma: the Galerkin solution is at least as close to u in energy as the nodal interpolant.
    for (const l of levels) expect(l.quasiOptimality!).toBeLessThanOrEqual(1 + 1e-9);
    expect(levels.map((l) => l.cells)).toEqual(ladder.map((n) => 2 * n * n));
  });

  it('both protocols measure the same errors: the solver\'s own quadrature agrees with rungs\'s integration of its VTK field', () => {
    // Two independent integrations of one field: Python's 7-point degree-5 rule (Stroud 1971, T2:5-1, label from memory; its exactness is checked in the solver's rule) and rungs's
    // degree-6 rule. They differ by quadrature error only: for ∫(u − u_h)² a rule of fixed degree errs by O(h^6) per
    // unit area while the integral is O(h^4), so the relative gap shrinks like h² (common practice, no source).
    for (const [i, r] of vtk.entries()) {
      const h = Math.SQRT2 / ladder[i]!;
      const mine = externalLevelResult(r, { index: i, n: ladder[i]!, exact: tile, norms: ['L2', 'H1semi'] }).level.errors;
      const theirs = json[i]!.output.kind === 'errors' ? json[i]!.output.errors : {};
      expect(Math.abs(mine.L2! - theirs.L2!) / theirs.L2!).toBeLessThan(0.01 * h * h);
      expect(Math.abs(mine.H1semi! - theirs.H1semi!) / theirs.H1semi!).toBeLessThan(0.01 * h * h);
    }
  });

  it('the .vtu writer gives the same field as the legacy one', async () => {
    const spec = external({ command: `python3 '${solver}' --n {n} --data '${data}' --out {out} --write vtu`, output: 'vtk', degree: 1 });
    const r = await runExternalLevel(spec, { study: 'tile-vtu', index: 1, n: 8, h: Math.SQRT2 / 8, outDir: levelFolder(join(root, 'vtu'), 1) });
    expect(r.output.file.endsWith('solution.vtu')).toBe(true);
    const a = externalLevelResult(r, { index: 1, n: 8, exact: tile, norms: ['L2'] }).level.errors.L2!;
    const b = externalLevelResult(vtk[1]!, { index: 1, n: 8, exact: tile, norms: ['L2'] }).level.errors.L2!;
    expect(a).toBe(b);
  });

  it('the GCI of the reported quantities brackets their exact values (Celik et al. 2008 procedure)', () => {
    const h = ladder.map((n) => Math.SQRT2 / n);
    for (const [name, exact] of [['mean_temperature', MEAN_EXACT], ['flux_top', FLUX_EXACT]] as const) {
      const values = vtk.map((r) => r.output.quantities[name]!);
      const q = analyseQuantity(name, h, values);
      const trueError = Math.abs(q.finest - exact) / Math.abs(q.finest);
      expect(q.convergence).toBe('monotone');
      expect(trueError).toBeLessThanOrEqual(q.gci!);
      expect(Math.abs(q.extrapolated! - exact)).toBeLessThan(Math.abs(q.finest - exact));
    }
    // The top-edge flux from the gradient of the edge triangles is first-order accurate.
    const flux = analyseQuantity('flux_top', h, vtk.map((r) => r.output.quantities.flux_top!));
    expect(Math.abs(flux.order! - 1)).toBeLessThan(0.1);
  });
});
