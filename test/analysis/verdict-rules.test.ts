import { describe, expect, it } from 'vitest';
import { analyseSeries, CI_WIDTH_FACTOR } from '../../src/analysis/verdict.ts';
import { rateShape } from '../../src/analysis/rate-patterns.ts';
import { applyQuasiOptimality, assessQuasiOptimality } from '../../src/analysis/cea.ts';
import { crossNormReasons } from '../../src/analysis/diagnosis.ts';
import type { SeriesAnalysis, SeriesInput } from '../../src/analysis/types.ts';
import { expectationMet, runStudy } from '../../src/study/runner.ts';
import type { StudyResult } from '../../src/study/result.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { custom, defineStudy, lagrange, rectangle, solveLagrange, type LevelContext } from '../../src/index.ts';

// Every rule of the verdict on synthetic series whose answer is known by construction. Errors are built level by
// level from chosen rates, e_i = e_{i-1} / 2^{r_i} on a ladder whose h halves, so that the pairwise rate between
// levels i-1 and i is exactly r_i (common practice, no source).
const ladder = (levels: number, h0 = 1 / 4) => Array.from({ length: levels }, (_, i) => h0 / 2 ** i);

function fromRates(rates: number[], e0 = 1e-2): { errors: number[]; h: number[] } {
  const errors = [e0];
  for (const r of rates) errors.push(errors[errors.length - 1]! / 2 ** r);
  return { errors, h: ladder(errors.length) };
}

function series(errors: number[], h: number[] | null, extra: Partial<SeriesInput> = {}): SeriesInput {
  const sizes = h ?? errors.map((_, i) => 1 / 2 ** (i + 2));
  return {
    name: 'tile-L2', h, dofs: sizes.map((x) => (1 / x + 1) ** 2), dim: 2, errors,
    expected: 2, tolerance: 0.1, fitWindow: 3, ...extra,
  };
}

describe('above-order is not a pass in a global norm', () => {
  // For u outside the discrete space, degree-k errors are bounded below by c·h^(k+1−m) in H^m (Lin, Xie & Xu 2014,
  // Math. Comp. 83; from memory): an H1 seminorm of P1 falling like h² is measured against the wrong thing.
  const { errors, h } = fromRates([2, 2, 2, 2]);
  it('flags an H1 seminorm at order 2 against 1 with the likely measuring mistake', () => {
    const a = analyseSeries(series(errors, h, { name: 'H1semi', expected: 1, normKind: 'global' }));
    expect(a.verdict).toBe('above-order');
    const text = a.reasons.join(' ');
    expect(text).toMatch(/global norm is not a pass/);
    expect(text).toMatch(/interpolant's gradient/);
    expect(a.allowed).toBeUndefined();
  });
  it('accepts it where the study declares it, quoting the study\'s reason', () => {
    const a = analyseSeries(series(errors, h, { name: 'maxNodal', expected: 1, normKind: 'pointwise', allowAboveOrder: 'nodal superconvergence' }));
    expect(a.verdict).toBe('above-order');
    expect(a.allowed).toEqual({ aboveOrder: 'nodal superconvergence' });
    expect(a.reasons.join(' ')).toMatch(/accepted: the study declares it for maxNodal \(nodal superconvergence\)/);
  });
  it('passes a plain study only when declared (project rule, no source)', () => {
    const study = (analyses: Partial<SeriesAnalysis>[]) => ({ expectation: { verdict: 'pass' }, analyses } as unknown as StudyResult);
    expect(expectationMet(study([{ verdict: 'on-order' }, { verdict: 'above-order' }]))).toBe(false);
    expect(expectationMet(study([{ verdict: 'on-order' }, { verdict: 'above-order', allowed: { aboveOrder: 'why' } }]))).toBe(true);
    expect(expectationMet(study([{ verdict: 'exact' }, { verdict: 'inconclusive' }]))).toBe(false);
  });
  it('takes the declaration from the study file, for the study\'s own norms only', () => {
    const base = { name: 'allow-probe', domain: rectangle([0, 1], [0, 1]), exact: 'sin(x)*exp(y)', discretization: lagrange({ degree: 1 }), ladder: { n: [4, 8, 16] } };
    const ok = validateStudy(defineStudy({ ...base, norms: ['L2', 'maxNodal'], allow: { aboveOrder: { maxNodal: 'nodes are special points' } } }), 'a.study.ts');
    expect(ok.allow?.aboveOrder?.maxNodal).toBe('nodes are special points');
    expect(() => validateStudy(defineStudy({ ...base, allow: { aboveOrder: { maxNodal: 'x' } } }), 'b.study.ts'))
      .toThrow(/allow\.aboveOrder\.maxNodal: 'maxNodal' is not one of the study's norms/);
    expect(() => validateStudy(defineStudy({ ...base, allow: { fewLevels: { L2: '' } } }), 'c.study.ts')).toThrow(/give the reason/);
  });
});

describe('below-order before inconclusive', () => {
  it('rates 1.78, 1.50, 1.22 against 2 are below-order although the interval is wide', () => {
    const { errors, h } = fromRates([1.78, 1.5, 1.22]);
    const a = analyseSeries(series(errors, h));
    // One degree of freedom: the 97.5% Student-t quantile for ν = 1 is 12.71 (from memory), so the interval is wide.
    expect((a.fit!.ciHigh - a.fit!.ciLow) / 2).toBeGreaterThan(CI_WIDTH_FACTOR * 0.1);
    expect(a.verdict).toBe('below-order');
    expect(a.reasons).toContain('every pairwise rate in the fit window (1.50, 1.22) is below 2 − 0.1');
    expect(a.reasons.join(' ')).toMatch(/rates fall away from 2 on the finest levels \(1\.78, 1\.50, 1\.22\)/);
  });
  it('rates that reach the order and fall away are below-order even when the finest fit is in the band', () => {
    const { errors, h } = fromRates([2, 2.02, 2, 1.75]);
    const a = analyseSeries(series(errors, h));
    expect(a.verdict).toBe('below-order');
  });
  it('is inconclusive only when the rates lie on both sides of the expected order', () => {
    const { errors, h } = fromRates([2, 2.6, 1.45]);
    const a = analyseSeries(series(errors, h));
    expect(a.verdict).toBe('inconclusive');
    expect(a.reasons[0]).toMatch(/lie on both sides of 2/);
  });
});

describe('pre-asymptotic only when the rates approach the expected order', () => {
  it('rates −0.15 → −0.03 against 2 are not pre-asymptotic: they stay near zero', () => {
    const { errors, h } = fromRates([-0.15, -0.09, -0.03]);
    const a = analyseSeries(series(errors, h));
    expect(a.verdict).toBe('below-order');
    const text = a.reasons.join(' ');
    expect(text).not.toMatch(/pre-asymptotic/);
    expect(text).toMatch(/rates stay near zero \(-0\.15, -0\.09, -0\.03\)/);
  });
  it('rates rising 0.5 → 0.8 against 2 say that they rise without approaching', () => {
    expect(rateShape([0.5, 0.65, 0.8], 2, 0.1).kind).toBe('drifting');
    const { errors, h } = fromRates([0.5, 0.65, 0.8]);
    const text = analyseSeries(series(errors, h)).reasons.join(' ');
    expect(text).toMatch(/rates rise \(0\.50, 0\.65, 0\.80\) but stay 1\.20 from 2: not a pre-asymptotic approach/);
  });
  it('rates closing the gap (1.2, 1.6, 1.85, 1.95) are pre-asymptotic', () => {
    expect(rateShape([1.2, 1.6, 1.85, 1.95], 2, 0.1)).toEqual({ kind: 'approaching', direction: 'rising', rates: [1.2, 1.6, 1.85, 1.95] });
  });
  it('rates that settle lower (2.16, 2.06, 2.01, 2.00 against 3) are stable, not falling away', () => {
    expect(rateShape([2.16, 2.06, 2.01, 2.0], 3, 0.1).kind).toBe('stable');
  });
});

describe('two levels never make a verdict on their own', () => {
  // A nodal error that reaches round-off after two levels, as 1D P1 nodal values do (Strang & Fix 1973, §1.2).
  const errors = [4e-9, 7e-11, 1e-15, 2e-15, 3e-15];
  const input = series(errors, ladder(5), { name: 'maxNodal', normKind: 'pointwise', scale: errors.map(() => 1), dofs: [9, 17, 33, 65, 129] });
  it('is inconclusive when a floor leaves two levels, naming the floor and the opt-in', () => {
    const a = analyseSeries(input);
    expect(a.fit!.levels).toEqual([0, 1]);
    expect(a.verdict).toBe('inconclusive');
    expect(a.reasons[0]).toMatch(/^too few levels: the floor from level 3 leaves 2 usable.*allow\.fewLevels for maxNodal/);
  });
  it('decides when the study opts in, and says so', () => {
    const a = analyseSeries({ ...input, allowFewLevels: 'round-off from level 3', allowAboveOrder: 'nodally exact' });
    expect(a.verdict).toBe('above-order');
    expect(a.reasons).toContain('a verdict on 2 levels, accepted: the study declares it for maxNodal (round-off from level 3)');
  });
});

describe('a floor reported by the code under test is a failure of the setup', () => {
  // Order 2 down to level 6, then errors held by a residual of 5e-6 (rates 2 then ~0.2; common practice, no source).
  const errors = [3.1e-2, 7.8e-3, 1.95e-3, 4.9e-4, 1.22e-4, 3.05e-5, 1.4e-5, 1.2e-5];
  const h = ladder(8);
  it('is named as such and is not a pass: the rates into the levels it spoils (1.1, 0.2) are a loss of order', () => {
    const a = analyseSeries(series(errors, h, { setupFloor: errors.map(() => 5e-6) }));
    expect(a.floorKind).toBe('setup');
    expect(a.verdict).toBe('below-order');
    expect(a.reasons[0]).toMatch(/^setup failure: your solver's own residual limits the error from level 7: tighten it/);
  });
  it('while the built-in solver\'s own floor keeps its treatment (left out with a warning)', () => {
    const a = analyseSeries(series(errors, h, { floorHint: errors.map(() => 5e-6) }));
    expect(a.floorKind).toBe('solver');
    expect(a.verdict).toBe('on-order');
  });
});

describe('the Céa ratio is part of the verdict', () => {
  // Céa's lemma: for a symmetric problem ‖u − u_h‖_E ≤ ‖u − I_h u‖_E (Céa 1964).
  const levels = (ratios: number[], atFloor = false) => ratios.map((ratio, index) => ({ index, ratio, atFloor }));
  it('a ratio stuck above 1 breaks the bound even when the rates look right, and every norm goes below order', () => {
    const cea = assessQuasiOptimality(levels([1.2, 1.2, 1.2, 1.2]));
    expect(cea.broken).toMatch(/^Céa bound broken at levels 1–4: energy error up to 1\.20× .*not shrinking toward 1/);
    const { errors, h } = fromRates([2, 2, 2, 2]);
    const analyses = [analyseSeries(series(errors, h)), analyseSeries(series(errors.map((e) => e * 3), h, { name: 'H1semi' }))];
    applyQuasiOptimality(analyses, cea.broken!);
    expect(analyses.map((a) => a.verdict)).toEqual(['below-order', 'below-order']);
    expect(analyses[0]!.reasons[0]).toMatch(/rates look right/);
  });
  it('a growing ratio (a wrong boundary sign) breaks it', () => {
    expect(assessQuasiOptimality(levels([11.6, 24.2, 49.1, 98.7])).broken).not.toBeNull();
  });
  it('an excess halving level by level is quadrature, a warning only', () => {
    const cea = assessQuasiOptimality(levels([1.016, 1.008, 1.004, 1.002]));
    expect(cea.broken).toBeNull();
    expect(cea.note).toMatch(/shrinking toward 1/);
  });
  it('levels where both errors sit at round-off are left out', () => {
    const cea = assessQuasiOptimality(levels([1.85, 2.63, 1655.9, 1705.7], true));
    expect(cea).toMatchObject({ broken: null, note: null, judged: [], leftOut: [0, 1, 2, 3] });
  });
});

describe('robust to jitter', () => {
  it('a P3 ladder on perturbed meshes with rates 4.12, 4.25, 4.02 against 4 is on-order, not inconclusive', () => {
    // Fitted in dofs as on perturbed ladders: N = (3n+1)² for P3 on n×n squares split in two (common practice,
    // no source), and e_i = e_{i-1} (N_i/N_{i-1})^(−r_i/2) has rate r_i in dofs in 2D.
    const dofs = [4, 8, 16, 32].map((n) => (3 * n + 1) ** 2);
    const rates = [4.12, 4.25, 4.02];
    const errors = [5.8e-4];
    rates.forEach((r, i) => errors.push(errors[i]! * (dofs[i + 1]! / dofs[i]!) ** (-r / 2)));
    const a = analyseSeries({ name: 'L2', h: null, dofs, dim: 2, errors, expected: 4, tolerance: 0.1, fitWindow: 3, normKind: 'global' });
    expect(a.verdict).toBe('on-order');
    expect(a.reasons.join(' ')).toMatch(/jitter/);
  });
});

describe('reasons that point at a cause, across norms', () => {
  const norm = (name: string, rates: number[], expected: number) => {
    const { errors, h } = fromRates(rates);
    return analyseSeries(series(errors, h, { name, expected, normKind: 'global' }));
  };
  const likelyOnly = (text: string) => /likely/.test(text) && !/certainly/.test(text);
  it('L2 one order down with H1 intact: a consistency error of order h^k, likely', () => {
    const found = crossNormReasons([norm('L2', [1, 1, 1, 1], 2), norm('H1semi', [1, 1, 1, 1], 1)]);
    expect(found).toHaveLength(1);
    expect(found[0]!.norms).toEqual(['L2']);
    expect(found[0]!.reason).toMatch(/L2 is about one order low .* consistency error of order h\^k/);
    expect(likelyOnly(found[0]!.reason)).toBe(true);
  });
  it('both flat: the discrete problem is likely not the PDE', () => {
    const found = crossNormReasons([norm('L2', [0.02, 0.01, 0], 2), norm('H1semi', [-0.05, 0, 0], 1)]);
    expect(found[0]!.norms).toEqual(['L2', 'H1semi']);
    expect(found[0]!.reason).toMatch(/no norm decreases .* likely the discrete problem is not the PDE/);
  });
  it('errors stopping at a constant in every norm: a fixed perturbation, likely', () => {
    const found = crossNormReasons([norm('L2', [2, 2, 2, 0.1, 0.02], 2), norm('H1semi', [1, 1, 1, 0.05, 0.01], 1)]);
    expect(found[0]!.reason).toMatch(/stop falling in every norm .* likely a fixed perturbation/);
  });
  it('every norm one order down: an inconsistent term such as a weak quadrature, likely', () => {
    const found = crossNormReasons([norm('L2', [2, 2, 2, 2], 3), norm('H1semi', [1, 1, 1, 1], 2)]);
    expect(found[0]!.reason).toMatch(/every norm is about 1 order low .* quadrature rule too weak/);
    expect(likelyOnly(found[0]!.reason)).toBe(true);
  });
  it('says nothing when every norm is on order', () => {
    expect(crossNormReasons([norm('L2', [2, 2, 2], 2), norm('H1semi', [1, 1, 1], 1)])).toEqual([]);
  });
});

describe('the study runner tells the two solver floors apart', () => {
  // A custom discretization whose own CG stops at relative residual 1e-3: the P1 errors (O(h²), Brenner & Scott
  // 2008, Thm 5.4.8) soon fall below what that residual leaves, so its finest levels measure the setup.
  it('names the code under test\'s own residual as a failure of the setup', async () => {
    const decl = validateStudy(defineStudy({
      name: 'loose-custom',
      domain: rectangle([0, 1], [0, 1]),
      exact: 'sin(pi*x) * exp(y)',
      discretization: custom({
        label: 'P1 with a loose CG', degree: 1,
        solve(level: LevelContext) {
          const sol = solveLagrange({ mesh: level.mesh, degree: 1, coefficients: level.coefficients, boundary: level.boundary,
            solver: { ...level.solver, method: 'cg', preconditioner: 'jacobi', relTol: 1e-3 } });
          return { field: sol.field, solver: sol.solver };
        },
      }),
      ladder: { n: [4, 8, 16, 32, 64] },
      norms: ['L2', 'H1semi'],
    }), 'loose-custom.study.ts');
    const r = await runStudy({ file: 'loose-custom.study.ts', declaration: decl });
    const l2 = r.analyses.find((a) => a.name === 'L2')!;
    expect(l2.floorKind).toBe('setup');
    expect(l2.reasons[0]).toMatch(/^setup failure: your solver's own residual limits the error from level \d: tighten it/);
    expect(r.asExpected).toBe(false);
  });
});
