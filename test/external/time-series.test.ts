// An external code of a problem in time that writes its solution at every time level, solution-<k>.vtk (or .vtu) for
// k = 0 … steps: rungs measures every file against u(·, t_k) and reports the norms over time Linf_L2 = max_k ‖e(t_k)‖_L2
// and L2_H1 = (Σ_{k=1..N} Δt ‖e(t_k)‖²_H1)^(1/2) (Thomée 2006, Galerkin Finite Element Methods for Parabolic Problems,
// ch. 1), the norms at T from the file of k = steps. The "code" here is `cp`, copying files the test wrote into the
// level folder, so that the field values are known exactly.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { defineStudy, lagrange, type StudyDeclaration } from '../../src/study/declaration.ts';
import { interval, rectangle } from '../../src/study/domain.ts';
import { heat, linearElasticity } from '../../src/equation/presets.ts';
import { external } from '../../src/external/types.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { prepareStudy } from '../../src/study/runner.ts';
import { runLevel } from '../../src/study/level.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { RungsInputError } from '../../src/errors.ts';
import { legacyVtk, vtuText, type NodalGrid } from './vtk-writers.ts';
import type { LevelResult } from '../../src/study/result.ts';

// Every run of rungs's own heat stepper in this file hands its time levels here as well (a copy of each), so that
// the external route can be given exactly the field values the built-in route measured.
const captured = vi.hoisted(() => ({ runs: [] as Float64Array[][] }));
vi.mock('../../src/fem/time/heat.ts', async (importOriginal) => {
  const orig = await importOriginal<typeof import('../../src/fem/time/heat.ts')>();
  const solveHeat: typeof orig.solveHeat = (p, method, T, steps, opts = {}) => {
    const levels: Float64Array[] = [];
    captured.runs.push(levels);
    return orig.solveHeat(p, method, T, steps, {
      ...opts,
      onTimeLevel: (step, t, u) => { levels[step] = u.slice(); opts.onTimeLevel?.(step, t, u); },
    });
  };
  return { ...orig, solveHeat };
});

const root = mkdtempSync(join(tmpdir(), 'rungs-time-series-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

/** A study whose external "code" copies the files under `files/level-<k>` into its level folder. */
function copyingStudy(name: string, files: string, over: Partial<StudyDeclaration> = {}): StudyDeclaration {
  return validateStudy(defineStudy({
    name,
    domain: interval(0, 1),
    pde: heat({ k: 1 }),
    exact: 't*x*x',
    boundary: { dirichlet: ['left', 'right'] },
    discretization: external({ command: ['cp', '-r', `${files}/level-{level}/.`, '{out}'], output: 'vtk', degree: 1, timeoutSeconds: 60 }),
    time: { final: 1, order: 1 },
    ladder: { n: [1], steps: [2, 4] },
    norms: ['L2', 'H1semi', 'Linf_L2', 'L2_H1'],
    ...over,
  }), `${name}.study.ts`);
}

/** Runs the first level of a study with its output in a temporary folder. */
async function firstLevel(decl: StudyDeclaration): Promise<LevelResult> {
  const file = `${decl.name}.study.ts`;
  const p = prepareStudy({ declaration: decl, file }, { out: join(root, 'out'), levels: 1 });
  return runLevel(decl, file, p.problem, 0, p.norms, p.solver, p.env);
}

/** The message of the RungsInputError a level throws. */
async function refusal(decl: StudyDeclaration): Promise<string> {
  try {
    await firstLevel(decl);
  } catch (err) {
    if (err instanceof RungsInputError) return err.message;
    throw err;
  }
  return '(the level ran)';
}

/** One P1 cell [0, 1] with the values a at x = 0 and b at x = 1. */
const oneCell = (a: number, b: number): NodalGrid => ({ points: [[0, 0, 0], [1, 0, 0]], cells: [[0, 1]], type: 3, values: [a, b] });

/** Writes files (name → grid) into files/level-1 of a fresh folder; returns the folder. */
function filesOf(key: string, files: Record<string, NodalGrid>): string {
  const dir = join(root, key);
  mkdirSync(join(dir, 'level-1'), { recursive: true });
  for (const [name, g] of Object.entries(files)) writeFileSync(join(dir, 'level-1', name), name.endsWith('.vtu') ? vtuText(g) : legacyVtk(g));
  return dir;
}

// Exact integrals by hand for u = t·x² and u_h = a + c·x on [0, 1] (c = b − a):
//   ‖u − u_h‖²_L2 = t²/5 + a² + c²/3 − 2ta/3 − tc/2 + ac,   ‖(u − u_h)'‖²_L2 = 4t²/3 − 2tc + c².
const l2sq = (t: number, a: number, b: number) => { const c = b - a; return t * t / 5 + a * a + c * c / 3 - 2 * t * a / 3 - t * c / 2 + a * c; };
const h1semisq = (t: number, a: number, b: number) => { const c = b - a; return 4 * t * t / 3 - 2 * t * c + c * c; };
/** |a − b| ≤ 1e-13·|b|: an exact integral evaluated with a rule exact for the integrand, up to round-off (common
 *  practice, no source). */
const close = (a: number, b: number) => Math.abs(a - b) <= 1e-13 * Math.abs(b);

// Three time levels (T = 1, two steps of Δt = 1/2): at t = 0 the values (0.5, 0.5), at t = 1/2 the interpolant
// (0, 0.5), at t = 1 the values (0.1, 0.8). The largest L2 error is the initial one (0.5), which the maximum must take
// and the ℓ2(H1) sum must leave out.
const LEVELS: [number, number, number][] = [[0, 0.5, 0.5], [0.5, 0, 0.5], [1, 0.1, 0.8]];

describe('norms over time from a series of VTK files: hand-computed integrals', () => {
  it('Linf_L2 and L2_H1 are the exact sums; the norms at T come from the file of k = steps (names with and without leading zeros, .vtk and .vtu)', async () => {
    const files = filesOf('hand', {
      'solution-0.vtk': oneCell(0.5, 0.5),
      'solution-01.vtu': oneCell(0, 0.5),
      'solution-002.vtk': oneCell(0.1, 0.8),
    });
    const level = await firstLevel(copyingStudy('series-by-hand', files));
    const dt = 0.5;
    const linf = Math.max(...LEVELS.map(([t, a, b]) => Math.sqrt(l2sq(t, a, b))));
    const l2h1 = Math.sqrt(LEVELS.slice(1).reduce((s, [t, a, b]) => s + dt * (l2sq(t, a, b) + h1semisq(t, a, b)), 0));
    expect(linf).toBe(0.5); // the initial level's error, by construction
    const e = level.errors;
    const want = { L2: Math.sqrt(l2sq(1, 0.1, 0.8)), H1semi: Math.sqrt(h1semisq(1, 0.1, 0.8)), Linf_L2: linf, L2_H1: l2h1 };
    const off = Object.entries(want).filter(([nm, v]) => !close(e[nm]!, v)).map(([nm, v]) => `${nm}: ${e[nm]} vs ${v}`);
    expect(off).toEqual([]);
    expect(level.steps).toBe(2);
    // No interpolant error is defined over time (as for rungs's own stepper).
    expect(Number.isNaN(level.interpolationErrors!.Linf_L2)).toBe(true);
  });

  it('a code that writes one file at T is measured as before: the same norms at T as the series, bit for bit', async () => {
    const single = filesOf('single', { 'solution.vtk': oneCell(0.1, 0.8) });
    const series = filesOf('single-series', { 'solution-0.vtk': oneCell(0.5, 0.5), 'solution-1.vtk': oneCell(0, 0.5), 'solution-2.vtk': oneCell(0.1, 0.8) });
    const norms = ['L2', 'H1semi', 'H1', 'maxNodal'];
    const a = await firstLevel(copyingStudy('one-file', single, { norms }));
    const b = await firstLevel(copyingStudy('one-file-series', series, { norms }));
    expect(close(a.errors.L2!, Math.sqrt(l2sq(1, 0.1, 0.8)))).toBe(true); // by hand, above
    expect(close(a.errors.H1semi!, Math.sqrt(h1semisq(1, 0.1, 0.8)))).toBe(true);
    expect(b.errors).toEqual(a.errors);
    expect(b.interpolationErrors).toEqual(a.interpolationErrors);
    expect(b.dofs).toBe(a.dofs);
  });
});

describe('series that cannot be measured: one message each, naming the level folder', () => {
  const level1 = /level-1/;
  it('a missing time level, with the norms over time asked for', async () => {
    const files = filesOf('gap', { 'solution-0.vtk': oneCell(0.5, 0.5), 'solution-2.vtk': oneCell(0.1, 0.8) });
    const msg = await refusal(copyingStudy('gap', files));
    expect(msg).toMatch(level1);
    expect(msg).toMatch(/the series lacks time level 1 of 0 … 2; write solution-<k>\.vtk \(or \.vtu\) for every time level t_k = k·Δt, k = 0 … 2/);
  });

  it('several missing time levels are named as runs', async () => {
    const dir = join(root, 'gaps');
    mkdirSync(join(dir, 'level-1'), { recursive: true });
    for (const k of [0, 4, 6, 8]) writeFileSync(join(dir, 'level-1', `solution-${k}.vtk`), legacyVtk(oneCell(0, k / 8)));
    const msg = await refusal(copyingStudy('gaps', dir, { ladder: { n: [1], steps: [8, 16] } }));
    expect(msg).toMatch(/lacks time levels 1–3, 5, 7 of 0 … 8/);
  });

  it('one file at T, with the norms over time asked for', async () => {
    const files = filesOf('only-final', { 'solution.vtk': oneCell(0.1, 0.8) });
    const msg = await refusal(copyingStudy('only-final', files));
    expect(msg).toMatch(level1);
    expect(msg).toMatch(/the norms over time \(Linf_L2, L2_H1\), which need the solution at every time level, but the solver wrote only the final time \(solution\.vtk\); write solution-<k>\.vtk/);
  });

  it('both solution.vtk and a series: refused, whatever the norms', async () => {
    const files = filesOf('both', { 'solution.vtk': oneCell(0.1, 0.8), 'solution-0.vtk': oneCell(0.5, 0.5), 'solution-1.vtk': oneCell(0, 0.5), 'solution-2.vtk': oneCell(0.1, 0.8) });
    const msg = await refusal(copyingStudy('both', files, { norms: ['L2'] }));
    expect(msg).toMatch(level1);
    expect(msg).toMatch(/wrote both solution\.vtk and a series of time levels \(solution-0\.vtk, …\); write either .* not both/);
  });

  it('a series without its final time level, even for the norms at T alone', async () => {
    const files = filesOf('no-final', { 'solution-0.vtk': oneCell(0.5, 0.5), 'solution-1.vtk': oneCell(0, 0.5) });
    const msg = await refusal(copyingStudy('no-final', files, { norms: ['L2'] }));
    expect(msg).toMatch(/level-1: the series of time levels has no file for the final time level k = 2 \(missing time levels: 2 of 0 … 2\)/);
  });

  it('two files for one time level, and a time level beyond the steps', async () => {
    const twice = filesOf('twice', { 'solution-0.vtk': oneCell(0.5, 0.5), 'solution-1.vtk': oneCell(0, 0.5), 'solution-01.vtk': oneCell(0, 0.5), 'solution-2.vtk': oneCell(0.1, 0.8) });
    expect(await refusal(copyingStudy('twice', twice))).toMatch(/time level 1 has two files, solution-01\.vtk and solution-1\.vtk/);
    const beyond = filesOf('beyond', { 'solution-0.vtk': oneCell(0.5, 0.5), 'solution-1.vtk': oneCell(0, 0.5), 'solution-2.vtk': oneCell(0.1, 0.8), 'solution-3.vtk': oneCell(0, 1) });
    expect(await refusal(copyingStudy('beyond', beyond))).toMatch(/solution-3\.vtk: time level 3 is beyond the level's 2 steps/);
  });
});

describe('the schema: norms over time for studies with time only', () => {
  const fail = (decl: unknown) => { try { validateStudy(decl, 'x.study.ts'); return '(accepted)'; } catch (err) { return (err as Error).message; } };
  it('accepts Linf_L2 and L2_H1 for the heat preset with output vtk, with the orders of P_k in space (Thomée 2006, ch. 1: k+1 and k)', () => {
    const decl = copyingStudy('accepted', root, { ladder: { n: [4, 8], steps: [64] }, discretization: external({ command: 'true', output: 'vtk', degree: 2 }) });
    const p = prepareStudy({ declaration: decl, file: 'accepted.study.ts' }, { out: join(root, 'out') });
    expect(p.expected).toMatchObject({ Linf_L2: 3, L2_H1: 2 });
  });
  it('refuses them in a steady study, saying why', () => {
    const steadyScalar = { name: 'steady', domain: interval(0, 1), exact: 'x*x', boundary: { dirichlet: ['left', 'right'] }, discretization: lagrange({ degree: 1 }), ladder: { n: [4, 8] }, norms: ['L2', 'Linf_L2'] };
    expect(fail(steadyScalar)).toMatch(/norms\[1\]: 'Linf_L2' is a norm over the time levels t_0 … t_N \(max_n ‖e\(t_n\)‖_L2\), but this study is steady/);
    const steadyVtk = {
      name: 'steady-vtk', domain: rectangle([0, 1], [0, 1]), pde: linearElasticity({ lambda: 1, mu: 1 }), exact: { u: ['x*y', 'x'] },
      boundary: { dirichlet: ['left', 'right', 'bottom', 'top'] }, discretization: external({ command: 'true', output: 'vtk', degree: 1 }),
      ladder: { n: [4, 8] }, norms: ['L2_u', 'L2_H1'],
    };
    expect(fail(steadyVtk)).toMatch(/norms\[1\]: 'L2_H1' is a norm over the time levels .* but this study is steady/);
  });
});

// The same field values through both routes: rungs's own P1 heat stepper measures its time levels itself; the same
// values, written as VTK in rungs's own node and cell order and read back as an external code's series, must give the
// same norms. Compared to 1e-12 relative (round-off of the same sums done twice; common practice, no source); measured
// on this machine they agree bit for bit, in 1D and 2D.
describe('the external series and rungs\'s own stepper agree on the same field values', () => {
  const same = (a: number, b: number) => a === b || Math.abs(a - b) <= 1e-12 * Math.abs(a);
  const norms = ['L2', 'H1semi', 'H1', 'maxNodal', 'Linf_L2', 'L2_H1'];

  it.each([
    ['P1 on 8 intervals, backward Euler, 4 steps', interval(0, 1), 8, ['left', 'right'], 'sin(pi*x)*(1 + t*t) + x*t'],
    ['P1 on 4 × 4 squares in triangles, backward Euler, 4 steps', rectangle([0, 1], [0, 1]), 4, ['left', 'right', 'bottom', 'top'], 'sin(pi*x)*(1 + t*t) + x*t + y*y*t'],
  ] as const)('%s', async (_what, domain, n, tags, exact) => {
    const common = {
      domain, pde: heat({ k: '1 + x/2' }), exact,
      boundary: { dirichlet: [...tags] }, ladder: { n: [n], steps: [4, 8] }, norms,
    };
    const own = validateStudy(defineStudy({ ...common, name: 'own-heat', discretization: lagrange({ degree: 1 }), time: { final: 1, stepper: 'backward-euler' } }), 'own-heat.study.ts');
    const before = captured.runs.length;
    const a = await firstLevel(own);
    const levels = captured.runs[before]!;
    expect(levels.length).toBe(5); // t_0 … t_4
    // The time levels as VTK, one point per dof (rungs's P1 dofs sit at the vertices), cells in rungs's order.
    const mesh = domain.mesh(n);
    const space = lagrangeSpace(mesh, 1);
    const points: number[][] = Array.from({ length: space.nDofs }, (_, i) => [0, 1, 2].map((d) => (d < mesh.dim ? space.dofCoords[i * mesh.dim + d]! : 0)));
    const nLoc = space.element.nDofs;
    const cells: number[][] = Array.from({ length: mesh.nCells }, (_, c) => Array.from(space.cellDofs.subarray(c * nLoc, (c + 1) * nLoc)));
    const dir = join(root, `same-${mesh.dim}d`);
    mkdirSync(join(dir, 'level-1'), { recursive: true });
    levels.forEach((u, k) => writeFileSync(join(dir, 'level-1', `solution-${k}.vtk`), legacyVtk({ points, cells, type: mesh.dim === 1 ? 3 : 5, values: Array.from(u) })));
    const ext = validateStudy(defineStudy({
      ...common, name: 'series-heat', time: { final: 1, order: 1 },
      discretization: external({ command: ['cp', '-r', `${dir}/level-{level}/.`, '{out}'], output: 'vtk', degree: 1 }),
    }), 'series-heat.study.ts');
    const b = await firstLevel(ext);
    const off = norms.filter((nm) => !same(a.errors[nm]!, b.errors[nm]!)).map((nm) => `${nm}: ${a.errors[nm]} vs ${b.errors[nm]}`);
    expect(off).toEqual([]);
    expect(b.dofs).toBe(a.dofs);
    // The series was read from the level folder, every file of it.
    expect(readdirSync(join(root, 'out', 'series-heat', 'level-1')).filter((f) => f.startsWith('solution-')).length).toBe(5);
  });
});
