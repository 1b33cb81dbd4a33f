// End to end: examples/external/c/tile_p1.c, a P1 solver in C99, built by examples/external/c/run.sh against a
// hand-written stand-in for the rungs_data.h that rungs will generate (test/external/fixtures/c-stand-in), run per
// level as a study would run it; rungs reads its solution.vtk and integrates the errors itself.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runLevelsInParallel } from '../../src/external/command.ts';
import { runExternalLevel } from '../../src/external/level.ts';
import { levelFolder } from '../../src/external/output.ts';
import { external, type ExternalLevelRun } from '../../src/external/types.ts';
import { errorNorms } from '../../src/norms/errors.ts';
import { externalLevelResult } from '../../src/study/external-level.ts';
import type { ExactSolution } from '../../src/norms/types.ts';

const cDir = join(import.meta.dirname, '..', '..', 'examples', 'external', 'c');
const source = join(cDir, 'tile_p1.c');
const runSh = join(cDir, 'run.sh');
const standIn = join(import.meta.dirname, 'fixtures', 'c-stand-in');
const hasCc = (() => {
  const r = spawnSync('cc', ['--version']);
  return !r.error && r.status === 0;
})();
const ladder = [4, 8, 16, 32];
const rate = (e1: number, e2: number) => Math.log(e1 / e2) / Math.log(2);

// The stand-in's manufactured temperature and conductivity, transcribed independently of the header:
// u = exp(−x) sin(3y) + x y, k = 1 + x y / 4.
const tile: ExactSolution = {
  u: (x, y) => Math.exp(-x) * Math.sin(3 * y) + x * y,
  grad: (x, y, _z, g) => {
    g[0] = -Math.exp(-x) * Math.sin(3 * y) + y;
    g[1] = 3 * Math.exp(-x) * Math.cos(3 * y) + x;
  },
};
const k = (x: number, y: number) => 1 + 0.25 * x * y;

/** The mesh and field rungs read from a level's solution.vtk. */
function fieldOf(r: ExternalLevelRun) {
  if (r.output.kind !== 'field') throw new Error(`expected a VTK solution, got ${r.output.kind} from ${r.output.file}`);
  return r.output;
}

if (!hasCc) {
  describe('examples/external/c/tile_p1.c', () => {
    it.skip("no C compiler 'cc' on this machine (install Debian's gcc package): the C tile solver's runs are skipped", () => {});
  });
}

describe.skipIf(!hasCc)('examples/external/c/tile_p1.c against the stand-in header', () => {
  // Made in beforeAll: a skipped describe still runs this body, and must leave no folder behind.
  let root = '';
  let binary = '';
  afterAll(() => { if (root) rmSync(root, { recursive: true, force: true }); });
  let build: ReturnType<typeof spawnSync>;
  let square: ExternalLevelRun[];
  let rectangle: ExternalLevelRun[];

  // One spec per boundary split; run.sh compiles the solver into each level folder, as a study's levels would.
  const runLadder = (name: string, ns: number[], tail: string[]) => {
    const spec = external({ command: ['sh', runSh, standIn, '{n}', '{out}', ...tail], output: 'vtk', degree: 1, timeoutSeconds: 600 });
    return runLevelsInParallel(ns.map((n, index) => () => runExternalLevel(spec, {
      study: name, index, n, h: Math.SQRT2 / n, outDir: levelFolder(join(root, name), index),
    })), 2);
  };

  beforeAll(async () => {
    root = mkdtempSync(join(tmpdir(), 'rungs-c-tile-'));
    binary = join(root, 'tile_p1');
    build = spawnSync('cc', ['-O2', '-std=c99', '-Wall', '-Wextra', '-pedantic', '-Werror', `-I${standIn}`, '-o', binary, source, '-lm'], { encoding: 'utf8' });
    // Unit square: Dirichlet on left, right, bottom; the top edge takes the Neumann flux.
    square = await runLadder('c-square', ladder, ['left', 'right', 'bottom']);
    // [−0.5, 1.5] × [0, 0.75]: Dirichlet on top only, so the left, right and bottom normals are exercised too.
    rectangle = await runLadder('c-rectangle', [16, 32], ['top', '--', '--x', '-0.5', '1.5', '--y', '0', '0.75']);
  });

  it('compiles as strict C99 without a warning (-Wall -Wextra -pedantic -Werror)', () => {
    expect(build.status, String(build.stderr)).toBe(0);
  });

  it('its quadrature rules are exact to the degrees their sources give, and not beyond', () => {
    // Highest degree of exactness: 3-point interior rule 2 (Strang & Fix 1973, Table 4.1, from memory); Radon's
    // 7-point rule 5 (Stroud 1971, T2:5-1, from memory); 3-point Gauss–Legendre 2·3 − 1 = 5 (Abramowitz & Stegun
    // 1964, §25.4.29).
    const r = spawnSync(binary, ['--check-rules'], { encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout.trim().split('\n')).toEqual(['stiffness_rule_degree 2', 'load_rule_degree 5', 'edge_rule_degree 5']);
  });

  it('the stand-in header matches its formulas: ∇u, f = −∇·(k∇u) and k∇u·n against central differences', () => {
    // A probe prints the header's values at points the test chooses (x, y, nx, ny per point).
    const probe = join(root, 'probe');
    writeFileSync(`${probe}.c`, [
      '#include <stdio.h>', '#include <stdlib.h>', '#include "rungs_data.h"',
      'int main(int argc, char **argv) {',
      '  int a;',
      '  for (a = 1; a + 3 < argc; a += 4) {',
      '    double x = atof(argv[a]), y = atof(argv[a + 1]), nx = atof(argv[a + 2]), ny = atof(argv[a + 3]), g[3] = { 0, 0, 0 };',
      '    grad_u(x, y, 0, 0, g);',
      '    printf("%.17g %.17g %.17g %.17g %.17g %.17g\\n", exact_u(x, y, 0, 0), g[0], g[1], coef_k(x, y, 0, 0),',
      '           source_balance(x, y, 0, 0), flux_balance(x, y, 0, 0, nx, ny, 0));',
      '  }',
      '  return 0;',
      '}', ''].join('\n'));
    const cc = spawnSync('cc', ['-std=c99', `-I${standIn}`, '-o', probe, `${probe}.c`, '-lm'], { encoding: 'utf8' });
    expect(cc.status, cc.stderr).toBe(0);
    const d = 1e-4;
    const bases = [[0.1, 0.2], [0.5, 0.5], [0.9, 0.35], [0.3, 0.95], [-0.4, 0.7], [1.4, 0.05]];
    const normal = [0.6, 0.8];
    const pts: number[][] = [];
    for (const [x, y] of bases) pts.push([x!, y!], [x! + d, y!], [x! - d, y!], [x!, y! + d], [x!, y! - d]);
    const r = spawnSync(probe, pts.flatMap(([x, y]) => [String(x), String(y), String(normal[0]), String(normal[1])]), { encoding: 'utf8' });
    expect(r.status, r.stderr).toBe(0);
    const rows = r.stdout.trim().split('\n').map((l) => l.split(' ').map(Number));
    expect(rows.length).toBe(pts.length);
    const worst = { u: 0, grad: 0, source: 0, flux: 0 };
    const g = new Float64Array(3);
    for (let b = 0; b < bases.length; b++) {
      const [c, xp, xm, yp, ym] = rows.slice(5 * b, 5 * b + 5) as number[][];
      const [x, y] = bases[b] as [number, number];
      const [u, gx, gy, kk, f, flux] = c!;
      tile.grad(x, y, 0, g);
      worst.u = Math.max(worst.u, Math.abs(u! - tile.u(x, y, 0)), Math.abs(kk! - k(x, y)), Math.abs(gx! - g[0]!), Math.abs(gy! - g[1]!));
      // Central differences of the header's own u, and of k ∂u/∂x_i for the divergence.
      const fdx = (xp![0]! - xm![0]!) / (2 * d), fdy = (yp![0]! - ym![0]!) / (2 * d);
      worst.grad = Math.max(worst.grad, Math.abs(gx! - fdx), Math.abs(gy! - fdy));
      const div = (xp![3]! * xp![1]! - xm![3]! * xm![1]!) / (2 * d) + (yp![3]! * yp![2]! - ym![3]! * ym![2]!) / (2 * d);
      worst.source = Math.max(worst.source, Math.abs(f! + div) / Math.max(1, Math.abs(f!)));
      worst.flux = Math.max(worst.flux, Math.abs(flux! - kk! * (fdx * normal[0]! + fdy * normal[1]!)));
    }
    // Same formulas in TypeScript: round-off only (common practice, no source).
    expect(worst.u).toBeLessThan(1e-13);
    // Central differences err by d²/6 |third derivative| ≈ 5e-8 here (common practice, no source).
    expect(worst.grad).toBeLessThan(1e-6);
    expect(worst.source).toBeLessThan(1e-5);
    expect(worst.flux).toBeLessThan(1e-6);
  });

  it('unit square, Neumann on top: L2 and H1-seminorm errors converge at rates 2 and 1', () => {
    // P1 on a smooth solution: H1 error O(h) by Céa's lemma, L2 error O(h²) by the Aubin–Nitsche argument
    // (Ciarlet 1978, Theorem 3.2.2 and §3.2; from memory).
    const errs = square.map((r) => errorNorms(fieldOf(r).field, tile, { k }));
    const l2 = errs.map((e) => e.L2), h1 = errs.map((e) => e.H1semi);
    expect(Math.abs(rate(l2[2]!, l2[3]!) - 2)).toBeLessThan(0.1);
    expect(Math.abs(rate(h1[2]!, h1[3]!) - 1)).toBeLessThan(0.1);
    // The mesh rungs rebuilt from the file: n × n squares, two triangles each, (n + 1)² nodes.
    expect(square.map((r) => fieldOf(r).mesh.nCells)).toEqual(ladder.map((n) => 2 * n * n));
    expect(square.map((r) => r.output.dofs)).toEqual(ladder.map((n) => (n + 1) ** 2));
    // Céa's lemma in the energy norm ∫ k|∇e|²: the Galerkin solution is no farther from u than the nodal interpolant
    // (exactly so with exact integration; quadrature of f and of the flux perturbs it far below the margin).
    const levels = square.map((r, i) => externalLevelResult(r, { index: i, n: ladder[i]!, exact: tile, norms: ['L2'], symmetric: true, errorOptions: { k } }).level);
    for (const l of levels) expect(l.quasiOptimality!).toBeLessThanOrEqual(1 + 1e-6);
  });

  it('rectangle [−0.5, 1.5] × [0, 0.75], Neumann on left, right, bottom: the same rates on round(n·width) × round(n·height) squares', () => {
    // Rates as above (Ciarlet 1978, Theorem 3.2.2; from memory).
    const fields = rectangle.map(fieldOf);
    expect(fields.map((f) => f.mesh.nCells)).toEqual([2 * 32 * 12, 2 * 64 * 24]);
    const c = fields[1]!.mesh.coords;
    const xs = c.filter((_, i) => i % 2 === 0), ys = c.filter((_, i) => i % 2 === 1);
    expect([Math.min(...xs), Math.max(...xs), Math.min(...ys), Math.max(...ys)]).toEqual([-0.5, 1.5, 0, 0.75]);
    const errs = fields.map((f) => errorNorms(f.field, tile, { k }));
    expect(Math.abs(rate(errs[0]!.L2, errs[1]!.L2) - 2)).toBeLessThan(0.1);
    expect(Math.abs(rate(errs[0]!.H1semi, errs[1]!.H1semi) - 1)).toBeLessThan(0.1);
  });

  it('bad arguments: non-zero exit, one line on stderr naming the problem, no solution written', () => {
    const out = join(root, 'bad');
    mkdirSync(out);
    const cases: [string[], RegExp][] = [
      [['--n', '0', '--out', out], /--n must be a positive integer, found 0/],
      [['--n', '4', '--out', out, '--dirichlet', 'left,front'], /unknown edge in --dirichlet .*front/],
      [['--n', '4', '--out', out, '--x', '1', '0'], /--x needs its lower bound below its upper bound/],
      [['--n', '4'], /--out is required/],
      [['--n', '4', '--out', out, '--mesh', 'fine'], /unknown argument --mesh/],
    ];
    for (const [args, message] of cases) {
      const r = spawnSync(binary, args, { encoding: 'utf8' });
      expect(r.status, args.join(' ')).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split('\n').length).toBe(1);
    }
    expect(existsSync(join(out, 'solution.vtk'))).toBe(false);
    // run.sh itself: too few arguments, and a data folder without the header.
    const few = spawnSync('sh', [runSh, standIn, '4'], { encoding: 'utf8' });
    expect(few.status).toBe(2);
    expect(few.stderr).toMatch(/^run\.sh: usage: /);
    const noHeader = spawnSync('sh', [runSh, out, '4', out], { encoding: 'utf8' });
    expect(noHeader.status).toBe(2);
    expect(noHeader.stderr).toMatch(/rungs_data\.h not found/);
  });
});
