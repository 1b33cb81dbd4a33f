import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { executeStudies } from '../../src/cli/execute.ts';
import { runStudy } from '../../src/study/runner.ts';
import { coupledSteps, ladderRungs, quickLevels, timeAxis } from '../../src/study/time-ladder.ts';
import { defineStudy, lagrange } from '../../src/study/declaration.ts';
import { interval, rectangle } from '../../src/study/domain.ts';
import { heat } from '../../src/equation/presets.ts';
import { TIME_ORDER, type TimeMethodName } from '../../src/fem/time/methods.ts';
import type { StudyDeclaration } from '../../src/study/declaration.ts';

const base = (ladder: StudyDeclaration['ladder'], extra: Partial<StudyDeclaration> = {}): StudyDeclaration => defineStudy({
  name: 'rod', domain: interval(0, 1), pde: heat({ k: 0.25 }), exact: 'sin(pi*x)*(1 + t*t)',
  boundary: { dirichlet: ['left', 'right'] }, discretization: lagrange({ degree: 3 }),
  time: { final: 1, stepper: 'bdf2' }, ladder, ...extra,
});

describe('time ladders: the levels each design runs', () => {
  it('a temporal ladder repeats its one mesh; a spatial one its one step count; a grid runs every pair, n slowest', () => {
    expect(ladderRungs(base({ n: [32], steps: [4, 8] }))).toEqual([{ n: 32, steps: 4 }, { n: 32, steps: 8 }]);
    expect(timeAxis(base({ n: [32], steps: [4, 8] }))).toBe('dt');
    expect(ladderRungs(base({ n: [4, 8], steps: [64] }))).toEqual([{ n: 4, steps: 64 }, { n: 8, steps: 64 }]);
    expect(timeAxis(base({ n: [4, 8], steps: [64] }))).toBe('h');
    expect(ladderRungs(base({ n: [4, 8], steps: [2, 4, 8], grid: true })).map((r) => `${r.n}/${r.steps}`)).toEqual(['4/2', '4/4', '4/8', '8/2', '8/4', '8/8']);
    // Δt given directly: T/Δt steps (1/0.25 = 4, 1/0.125 = 8).
    expect(ladderRungs(base({ n: [32], dt: [0.25, 0.125] })).map((r) => r.steps)).toEqual([4, 8]);
  });

  it('--quick runs the 3 coarsest levels, or on a grid every step count of enough coarse meshes for a joint fit (≥ 5 pairs)', () => {
    expect(quickLevels(base({ n: [32], steps: [4, 8, 16, 32] }))).toBe(3);
    expect(quickLevels(base({ n: [4, 8, 16], steps: [2, 4, 8], grid: true }))).toBe(6);
    expect(quickLevels(base({ n: [4, 8, 16], steps: [2, 4], grid: true }))).toBe(6);
    expect(quickLevels(base({ n: [4, 8], steps: [2, 4, 8, 16, 32], grid: true }))).toBe(10);
    expect(quickLevels(base({ n: [32], steps: [4, 8, 16, 32], quick: 2 }))).toBe(2);
  });

  it('a coupled path takes the fewest equal steps with Δt ≤ c·h^s (h = 1/n on the unit interval)', () => {
    // c = 0.5, s = 1: Δt ≤ 1/(2n) → 2n steps over T = 1; s = 2 with c = 1: n² steps; T = 0.3, c·h = 0.1/… rounds up.
    expect(coupledSteps(1, 8, { c: 0.5, exponent: 1 })).toBe(16);
    expect(coupledSteps(1, 8, { c: 1, exponent: 2 })).toBe(64);
    // T/(c h) = 0.3/(0.5/8) = 4.8 → 5 steps of 0.06 ≤ 0.0625.
    expect(coupledSteps(0.3, 8, { c: 0.5, exponent: 1 })).toBe(5);
    expect(ladderRungs(base({ n: [4, 8], coupled: { c: 0.5, exponent: 1 } }))).toEqual([{ n: 4, steps: 8 }, { n: 8, steps: 16 }]);
  });
});

// Temporal orders of rungs's own steppers on a manufactured heat solution, refined in Δt on a cubic mesh whose
// spatial error lies far below the temporal one: backward Euler 1, Crank–Nicolson 2, BDF2 2, the DIRK 3 (Hairer &
// Wanner 1996, Solving ODEs II, ch. IV; the DIRK: Alexander 1977). The solution's modes have Δt·λ small enough
// (k = 0.25) that the classical orders show; u = sin(πx)(1 + t²) + … keeps its boundary data fixed (order reduction
// of the DIRK with moving boundary data is a separate matter, see studies/kiln-rod-dirk3.study.ts).
describe('temporal order of every stepper through a study', () => {
  const cases: [TimeMethodName, number[]][] = [
    ['backward-euler', [16, 32, 64]],
    ['crank-nicolson', [8, 16, 32]],
    ['bdf2', [8, 16, 32]],
    ['dirk3', [8, 16, 32]],
  ];
  it.each(cases)('%s', async (stepper, steps) => {
    const decl = base({ n: [64], steps }, {
      name: `rod-${stepper}`, exact: 'sin(pi*x)*(cos(2*t) + 1 - exp(-2*t))', time: { final: 1, stepper }, norms: ['L2', 'Linf_L2'],
    });
    const r = await runStudy({ declaration: decl, file: `time-${stepper}.study.ts` });
    const l2 = r.analyses.find((a) => a.name === 'L2')!;
    expect(r.time?.axis).toBe('dt');
    expect(l2.expected).toBe(TIME_ORDER[stepper]);
    expect(Math.abs(l2.fit!.order - TIME_ORDER[stepper]), `rates ${l2.rates.join(', ')}`).toBeLessThan(0.1);
    expect(r.analyses.map((a) => a.verdict)).toEqual(['on-order', 'on-order']);
    expect(r.levels.map((l) => l.dt)).toEqual(steps.map((s) => 1 / s));
  });

  it('a spatial ladder at a fine Δt shows the element orders; the norms over time follow them', async () => {
    // P2 on a spatial ladder with 256 BDF2 steps: L2 and ℓ∞(L2) order 3, H1 seminorm and ℓ2(H1) order 2 (Thomée 2006).
    const decl = base({ n: [4, 8, 16, 32], steps: [256] }, {
      name: 'rod-space', discretization: lagrange({ degree: 2 }), time: { final: 1, stepper: 'dirk3' },
      exact: 'sin(pi*x)*(1 + t*t) + x*t', norms: ['L2', 'H1semi', 'Linf_L2', 'L2_H1'],
    });
    const r = await runStudy({ declaration: decl, file: 'time-space.study.ts' });
    expect(r.time?.axis).toBe('h');
    expect(Object.fromEntries(r.analyses.map((a) => [a.name, [a.expected, a.verdict]]))).toEqual({
      L2: [3, 'on-order'], H1semi: [2, 'on-order'], Linf_L2: [3, 'on-order'], L2_H1: [2, 'on-order'],
    });
  });
});

describe('heat-flux (Neumann) parts with rungs\'s own stepper', () => {
  // ∫ k∇u·n v ds at every time F(t) is formed: with the data right, the orders are the element's and the stepper's
  // (Thomée 2006, ch. 1 and 7); with the flux of the wrong sign the discrete problem is another one and the error
  // stops falling (the bundled flaw-neumann-sign shows the same in a steady study).
  const tile = (ladder: StudyDeclaration['ladder'], extra: Partial<StudyDeclaration> = {}): StudyDeclaration => defineStudy({
    name: 'tile-flux', domain: rectangle([0, 1], [0, 1]), pde: heat({ k: '1 + x*y/2' }),
    exact: 'cos(x)*exp(y)*(1 + t) + x*y*sin(t)', boundary: { dirichlet: ['left', 'bottom'], neumann: ['right', 'top'] },
    discretization: lagrange({ degree: 1 }), time: { final: 0.5, stepper: 'bdf2' }, ladder, norms: ['L2', 'H1semi'], ...extra,
  });

  it('a spatial ladder of P1 with a flux on two edges: L2 2, H1 seminorm 1', async () => {
    const r = await runStudy({ declaration: tile({ n: [4, 8, 16, 32], steps: [64] }), file: 'tile-flux.study.ts' });
    expect(Object.fromEntries(r.analyses.map((a) => [a.name, [a.expected, a.verdict]]))).toEqual({ L2: [2, 'on-order'], H1semi: [1, 'on-order'] });
  });

  it('a temporal ladder of Crank–Nicolson in 1D with a flux at one end: order 2 in Δt', async () => {
    const decl = base({ n: [32], steps: [8, 16, 32] }, {
      name: 'rod-flux', exact: 'cos(x)*(cos(2*t) + 1 - exp(-2*t)) + x*t', boundary: { dirichlet: ['left'], neumann: ['right'] },
      time: { final: 1, stepper: 'crank-nicolson' }, norms: ['L2'],
    });
    const r = await runStudy({ declaration: decl, file: 'rod-flux.study.ts' });
    const l2 = r.analyses[0]!;
    expect([l2.expected, l2.verdict]).toEqual([2, 'on-order']);
  });
});

describe('two-axis designs and the pitfalls of one-axis ladders', () => {
  it('a 4 × 4 grid of P1 with BDF2 recovers p = 2 and q = 2 in L2, jointly', async () => {
    // P1 in L2: order 2 in h (Thomée 2006, Thm 1.5); BDF2: order 2 in Δt (Hairer & Wanner 1996, ch. III).
    const decl = base({ n: [8, 16, 32, 64], steps: [8, 16, 32, 64], grid: true }, {
      name: 'rod-grid', discretization: lagrange({ degree: 1 }), pde: heat({ k: '1 + x/2' }),
      exact: 'sin(pi*x)*cos(2*t) + (1 + x)*(1 - exp(-t))', norms: ['L2'],
    });
    const r = await runStudy({ declaration: decl, file: 'time-grid.study.ts' });
    const two = r.twoAxis![0]!;
    expect(r.time?.axis).toBe('grid');
    expect(r.levels).toHaveLength(16);
    expect(Math.abs(two.fit!.p - 2)).toBeLessThan(0.1);
    expect(Math.abs(two.fit!.q - 2)).toBeLessThan(0.1);
    expect(two.verdict).toEqual({ space: 'on-order', time: 'on-order' });
    expect(r.analyses[0]!.verdict).toBe('on-order');
  });

  it('names the spatial floor a temporal ladder runs into', async () => {
    // Cubic elements on 64 cells: the H1-seminorm error of the mesh (about 2.5e-7) is reached by the DIRK's
    // temporal error at 128 steps, so the errors stall there while their differences still fall at order 3
    // (Nishikawa 2023, arXiv:2305.10331); L2, whose spatial error is 64 times smaller, keeps order 3.
    const decl = base({ n: [64], steps: [16, 32, 64, 128] }, {
      name: 'rod-floor', time: { final: 1, stepper: 'dirk3' }, exact: 'sin(pi*x)*(cos(2*t) + 1 - exp(-2*t))', norms: ['L2', 'H1semi'],
    });
    const r = await runStudy({ declaration: decl, file: 'time-floor.study.ts' });
    const [l2, h1] = r.analyses;
    expect(l2!.verdict).toBe('on-order');
    expect(h1!.verdict).not.toBe('on-order');
    expect(h1!.reasons[0]).toMatch(/the errors approach a floor of .* from level 4: the spatial error of the fixed mesh \(n = 64\)/);
    // The floor is the reason: no pattern across norms is offered for it.
    expect(h1!.reasons.some((t) => t.startsWith('across norms:'))).toBe(false);
  });

  it('says where a temporal ladder that stalls from the start probably stands', async () => {
    // Linear elements on 8 cells: the spatial error (about 1.6e-2) swamps BDF2's at every step count.
    const decl = base({ n: [8], steps: [4, 8, 16, 32] }, { name: 'rod-stall', discretization: lagrange({ degree: 1 }), norms: ['L2'] });
    const r = await runStudy({ declaration: decl, file: 'time-stall.study.ts' });
    expect(r.analyses[0]!.verdict).not.toBe('on-order');
    expect(r.analyses[0]!.reasons.join('\n')).toMatch(/spatial error of the fixed mesh \(n = 8\)/);
  });
});

describe('bad time input', async () => {
  const out = mkdtempSync(join(tmpdir(), 'rungs-time-bad-'));
  afterAll(() => rmSync(out, { recursive: true, force: true }));
  const { results, problems } = await executeStudies(['test/fixtures/time-bad'], { out, quiet: true });
  const msg = (file: string) => problems.find((p) => p.file.endsWith(file))?.message ?? `(no problem reported for ${file})`;

  it('still runs the sound study (backward Euler, order 1)', () => {
    expect(results.map((r) => [r.study, r.asExpected])).toEqual([['time-good-be', true]]);
    expect(problems).toHaveLength(11);
  });
  it('a ladder in time without a final time', () => expect(msg('no-final.study.ts')).toMatch(/ladder\.steps: belongs to a study with time; give time: \{ final: T/));
  it('a final time without a time ladder', () => expect(msg('no-time-ladder.study.ts')).toMatch(/ladder: missing: a study with time needs a time ladder: steps: \[16, 32, 64, 128\] on one mesh/));
  it('steps in a steady study', () => expect(msg('steps-without-time.study.ts')).toMatch(/ladder\.steps: belongs to a study with time/));
  it('both axes varying without saying how', () => expect(msg('both-vary.study.ts')).toMatch(/both n \(2 values\) and steps \(2 values\) vary: give one value of n .* grid: true .* coupled/));
  it('a coupled path with a negative exponent', () => expect(msg('coupled-exponent.study.ts')).toMatch(/ladder\.coupled\.exponent: expected a positive exponent/));
  // 1/0.3 = 3.333…: 4 steps of 0.25 is the nearest Δt below that divides T.
  it('a Δt that does not divide T, with one that does', () => expect(msg('dt-not-dividing.study.ts')).toMatch(/ladder\.dt\[0\]: Δt = 0\.3 does not divide the final time T = 1 \(T\/Δt = 3\.33333\); .* such as 0\.25 \(4 steps\)/));
  it('rungs\'s own elements without a stepper, listing them', () => expect(msg('no-stepper.study.ts')).toMatch(/time\.stepper: missing: .* 'backward-euler', 'crank-nicolson', 'bdf2', 'dirk3'/));
  it('an external code without its temporal order', () => expect(msg('external-no-order.study.ts')).toMatch(/time\.order: missing: the expected temporal order of the external code's stepper/));
  it('a final time on a steady problem', () => expect(msg('time-on-steady-pde.study.ts')).toMatch(/time: the study declares a final time, but the problem does not depend on t/));
  it('a {steps} placeholder in a steady study', () => expect(msg('steps-placeholder.study.ts')).toMatch(/the command uses \{steps\}, but the study has no time/));
  it('a negative final time', () => expect(msg('negative-final.study.ts')).toMatch(/time\.final: expected the final time T, a positive number/));
});
