import { describe, expect, it } from 'vitest';
import { analyseSeries, CI_WIDTH_FACTOR } from '../../src/analysis/verdict.ts';
import type { SeriesInput } from '../../src/analysis/types.ts';
import { RungsInputError } from '../../src/errors.ts';

// Synthetic series built from closed forms: e = C h^p has observed order p at every level (common practice,
// no source); e = h²/(1 + K h) has rates 2 - ln((1+K h1)/(1+K h2))/ln(h1/h2), rising to 2 as h → 0.
const ladder = (levels: number, h0 = 1 / 4) => Array.from({ length: levels }, (_, i) => h0 / 2 ** i);

function series(errors: number[], h: number[] | null, extra: Partial<SeriesInput> = {}): SeriesInput {
  const sizes = h ?? errors.map((_, i) => 1 / 2 ** (i + 2));
  return {
    name: 'tile-L2',
    h,
    dofs: sizes.map((x) => (1 / x + 1) ** 2),
    dim: 2,
    errors,
    expected: 2,
    tolerance: 0.1,
    fitWindow: 3,
    ...extra,
  };
}

describe('analyseSeries verdicts', () => {
  it('an exact power law of the expected order is on-order with a zero-width interval', () => {
    const h = ladder(5);
    const a = analyseSeries(series(h.map((x) => 0.7 * x * x), h));
    expect(a.verdict).toBe('on-order');
    expect(a.fit!.levels).toEqual([2, 3, 4]);
    expect(a.fit!.order).toBeCloseTo(2, 12);
    expect(a.reasons[0]).toBe('fitted order 2.00 (95% CI 2.00–2.00) vs expected 2 ± 0.1');
    expect(a.rates[0]).toBeNull();
    for (const r of a.rates.slice(1)) expect(r).toBeCloseTo(2, 12);
    expect(a.floorFrom).toBeNull();
    expect(a.asymptoticFrom).toBe(0);
    expect(a.warnings).toEqual([]);
  });

  it('rate 1 against expected 2 is below-order with the stable-loss-of-order reason', () => {
    const h = ladder(5);
    const a = analyseSeries(series(h.map((x) => 0.3 * x), h));
    expect(a.verdict).toBe('below-order');
    expect(a.reasons[0]).toBe('fitted order 1.00 (95% CI 1.00–1.00) vs expected 2 ± 0.1');
    expect(a.reasons[1]).toBe('every pairwise rate in the fit window (1.00, 1.00) is below 2 − 0.1');
    expect(a.reasons[2]).toBe(
      'rates are stable at 1.00 instead of 2: a consistent loss of order — typical of an inconsistent term ' +
        '(under-integration, wrong boundary data, wrong sign)',
    );
  });

  it('rate 3 against expected 2 is above-order; outside a global norm the reason names superconvergence', () => {
    const h = ladder(4);
    const a = analyseSeries(series(h.map((x) => 2 * x ** 3), h));
    expect(a.verdict).toBe('above-order');
    expect(a.reasons[1]).toBe('every pairwise rate in the fit window (3.00, 3.00) is above 2 + 0.1');
    expect(a.reasons[2]).toMatch(/^rates are stable at 3\.00 instead of 2: higher than expected — superconvergence/);
  });

  it('fits in dofs when h is null (order = -d × slope)', () => {
    const h = ladder(5);
    const input = series(h.map((x) => x * x), null);
    input.dofs = h.map((x) => x ** -2);
    const a = analyseSeries(input);
    expect(a.verdict).toBe('on-order');
    expect(a.fit!.order).toBeCloseTo(2, 12);
  });

  describe('a pre-asymptotic series e = h²/(1 + 20 h) over 11 levels', () => {
    const h = ladder(11, 1 / 2);
    const errors = h.map((x) => (x * x) / (1 + 20 * x));
    it('is on-order over the finest three levels, still naming the pre-asymptotic coarse levels', () => {
      const a = analyseSeries(series(errors, h));
      expect(a.verdict).toBe('on-order');
      expect(a.reasons[1]).toBe(
        'pre-asymptotic: pairwise rates still rising toward the expected order ' +
          '(1.13, 1.22, 1.36, 1.53, 1.69, 1.82, 1.90, 1.95, 1.97, 1.99); ' +
          'the coarsest levels are outside the asymptotic range',
      );
      // Rates 1.90..1.99 (levels 6-7 to 9-10) spread 0.087 ≤ 0.1; adding 1.82 would spread 0.17.
      expect(a.asymptoticFrom).toBe(6);
    });
    it('is below-order over all levels, with the advice to add finer levels', () => {
      const a = analyseSeries(series(errors, h, { fitWindow: 11 }));
      expect(a.verdict).toBe('below-order');
      expect(a.fit!.levels).toHaveLength(11);
      expect(a.reasons[0]).toMatch(/^fitted order 1\.68 \(95% CI 1\.56–1\.79\) vs expected 2 ± 0\.1$/);
      expect(a.reasons[1]).toMatch(/^pre-asymptotic: pairwise rates still rising .* — add finer levels$/);
    });
  });

  describe('rates that reach the order and then fall away', () => {
    // Errors built level by level from chosen rates: e_i = e_{i-1} / 2^rate (h halves).
    const build = (rates: number[]) => {
      const errors = [1e-2];
      for (const r of rates) errors.push(errors[errors.length - 1]! / 2 ** r);
      return { errors, h: ladder(errors.length) };
    };
    const stall = (list: string) =>
      `rates fall away from 2 on the finest levels (${list}): the error stalls — look for a consistency error ` +
      '(quadrature, boundary data) or a solver floor';
    it('are below-order over three levels, however wide the interval (every rate in the window is below the band)', () => {
      const { errors, h } = build([2, 2, 2, 1.6, 1.1]);
      const a = analyseSeries(series(errors, h));
      expect((a.fit!.ciHigh - a.fit!.ciLow) / 2).toBeGreaterThan(CI_WIDTH_FACTOR * 0.1);
      expect(a.verdict).toBe('below-order');
      expect(a.reasons).toContain(stall('2.00, 1.60, 1.10'));
    });
    it('are below-order when the wide interval lies wholly below the band', () => {
      const { errors, h } = build([2, 2, 2, 1.6, 1.1, 0.6]);
      const a = analyseSeries(series(errors, h, { fitWindow: 4 }));
      expect(a.fit!.ciHigh).toBeLessThan(1.9);
      expect(a.verdict).toBe('below-order');
      expect(a.reasons).toContain(stall('2.00, 1.60, 1.10, 0.60'));
    });
  });

  it('leaves a solver floor out of the fit and warns, naming the level', () => {
    const h = ladder(8);
    const errors = [3.1e-2, 7.8e-3, 1.95e-3, 4.9e-4, 1.22e-4, 3.05e-5, 1.4e-5, 1.2e-5];
    const a = analyseSeries(series(errors, h, { floorHint: errors.map(() => 5e-6) }));
    expect(a.floorFrom).toBe(6);
    expect(a.floorKind).toBe('solver');
    expect(a.warnings).toEqual(['floor: solver tolerance from level 7']);
    expect(a.fit!.levels).toEqual([3, 4, 5]);
    expect(a.verdict).toBe('on-order');
    expect(a.reasons[a.reasons.length - 1]).toBe('floor: solver tolerance from level 7 (levels 7–8 left out of the fit)');
    // The same errors without the hint stop at a constant on the finest levels: below-order, said in words.
    const blind = analyseSeries(series(errors, h));
    expect(blind.verdict).not.toBe('on-order');
    expect(blind.verdict).toBe('below-order');
    expect(blind.reasons.some((r) => r.startsWith('the errors stop at a constant (rates 1.12, 0.22)'))).toBe(true);
  });

  it('leaves a round-off floor out of the fit and warns, naming the level', () => {
    const h = ladder(7);
    const errors = [1e-4, 6.25e-6, 3.9e-7, 2.44e-8, 1.53e-9, 3e-11, 4e-11];
    const a = analyseSeries(series(errors, h, { expected: 4, scale: errors.map(() => 1), dofs: [1e2, 1e3, 3e3, 1e4, 3e4, 1e5, 4e5] }));
    expect(a.warnings).toEqual(['floor: round-off from level 6']);
    expect(a.floorKind).toBe('round-off');
    expect(a.fit!.levels).toEqual([2, 3, 4]);
    expect(a.verdict).toBe('on-order');
  });

  it('all errors at round-off relative to the scale is exact', () => {
    const h = ladder(4);
    const a = analyseSeries(series([3e-15, 5e-15, 1.2e-14, 2e-14], h, { scale: [1.5, 1.5, 1.5, 1.5] }));
    expect(a.verdict).toBe('exact');
    expect(a.fit).toBeNull();
    expect(a.floorFrom).toBe(0);
    expect(a.floorKind).toBe('round-off');
    expect(a.reasons[0]).toMatch(/^all errors at round-off: largest error\/scale 1\.3e-14 at level 4/);
  });

  it('exactly zero errors (the space contains u) are exact', () => {
    const a = analyseSeries(series([0, 0, 0], ladder(3)));
    expect(a.verdict).toBe('exact');
    expect(a.rates).toEqual([null, null, null]);
  });

  it('two levels are inconclusive with a "too few levels" reason, even at the exact order', () => {
    const a = analyseSeries(series([1e-2, 2.5e-3], [0.1, 0.05]));
    expect(a.verdict).toBe('inconclusive');
    expect(a.fit!.stderr).toBeNaN();
    expect(a.reasons).toEqual([
      'too few levels: 2 usable, need 3 for a verdict (two levels give one rate and no confidence interval); ' +
        'add levels, or declare allow.fewLevels for tile-L2 with the reason',
      'fitted order 2.00 (two levels, no confidence interval) vs expected 2 ± 0.1',
    ]);
  });

  it('a fit window of 2 inside a longer ladder says the window is too small for an interval', () => {
    const h = ladder(4);
    const a = analyseSeries(series(h.map((x) => x * x), h, { fitWindow: 2 }));
    expect(a.fit!.levels).toEqual([2, 3]);
    expect(a.verdict).toBe('inconclusive');
    expect(a.reasons[0]).toBe('too few levels in the fit window: 2, need 3 for a verdict (raise fitWindow)');
  });

  it('an isolated zero error on a coarse level is left out with a warning, not taken as a floor', () => {
    const h = ladder(5);
    const errors = h.map((x, i) => (i === 0 ? 0 : 0.5 * x * x));
    const a = analyseSeries(series(errors, h, { fitWindow: 5 }));
    expect(a.floorFrom).toBeNull();
    expect(a.fit!.levels).toEqual([1, 2, 3, 4]);
    expect(a.warnings).toEqual(['level 1 looks like a round-off floor but finer levels do not; left out of the fit']);
    expect(a.verdict).toBe('on-order');
    expect(a.reasons).toContain('the fit window holds 4 of the 5 levels the study asks for: the rest are left out as floors');
  });

  it('one usable level is inconclusive', () => {
    const a = analyseSeries(series([1e-2], [0.1]));
    expect(a.verdict).toBe('inconclusive');
    expect(a.fit).toBeNull();
    expect(a.reasons[0]).toBe('too few levels: 1 usable, need at least 2 to estimate an order');
  });

  it('noisy errors with a wide interval are inconclusive, saying why first', () => {
    const h = ladder(4);
    const wobble = [1, 1.6, 0.6, 1.5];
    const a = analyseSeries(series(h.map((x, i) => x * x * wobble[i]!), h, { fitWindow: 4 }));
    const half = (a.fit!.ciHigh - a.fit!.ciLow) / 2;
    expect(half).toBeGreaterThan(CI_WIDTH_FACTOR * 0.1);
    expect(a.verdict).toBe('inconclusive');
    expect(a.reasons[0]).toMatch(/^confidence interval wider than the tolerance: half-width \d+\.\d\d > 3 × 0\.1 and the rates in the fit window \(1\.32, 3\.42, 0\.68\) lie on both sides of 2/);
    expect(a.reasons[1]).toMatch(/^fitted order /);
  });

  it('no expected order is inconclusive but still reports the fit', () => {
    const h = ladder(4);
    const a = analyseSeries(series(h.map((x) => x ** 1.5), h, { expected: null }));
    expect(a.verdict).toBe('inconclusive');
    expect(a.fit!.order).toBeCloseTo(1.5, 12);
    expect(a.reasons[0]).toBe('no expected order to compare with: fitted order 1.50 (95% CI 1.50–1.50)');
  });

  it('reasons are deterministic: the same input gives the same analysis', () => {
    const h = ladder(6);
    const input = series(h.map((x, i) => x * x * (1 + 0.05 * (-1) ** i)), h);
    expect(analyseSeries(input)).toEqual(analyseSeries(structuredClone(input)));
  });

  it('rejects malformed input with a RungsInputError naming the series and field', () => {
    const h = ladder(3);
    const good = series([1e-2, 2.5e-3, 6e-4], h);
    expect(() => analyseSeries({ ...good, errors: [1e-2, Number.NaN, 1e-4] })).toThrow(/tile-L2.*errors/);
    expect(() => analyseSeries({ ...good, h: [0.1, 0.2, 0.05] })).toThrow(RungsInputError);
    expect(() => analyseSeries({ ...good, dofs: [1, 2] })).toThrow(/dofs/);
    expect(() => analyseSeries({ ...good, tolerance: 0 })).toThrow(/tolerance/);
    expect(() => analyseSeries({ ...good, fitWindow: 1 })).toThrow(/fitWindow/);
    expect(() => analyseSeries({ ...good, scale: [1, 0, 1] })).toThrow(/scale/);
    try {
      analyseSeries({ ...good, fitWindow: 1.5 });
    } catch (e) {
      expect((e as RungsInputError).where).toBe('tile-L2.fitWindow');
    }
  });
});
