import { describe, expect, it } from 'vitest';
import { fitTwoAxis, judgeTwoAxis, NEGLIGIBLE_SHARE } from '../../src/analysis/two-axis.ts';
import type { TwoAxisFit } from '../../src/analysis/types.ts';
import { RungsInputError } from '../../src/errors.ts';
import { seededGaussian } from './seeded-gaussian.ts';

// Errors of a kiln-rod heat study (invented): mesh sizes h and time steps Δt of a two-axis design. Unless a check says
// otherwise, the data are e = C_h h^p + C_t Δt^q evaluated by hand from the model (Kamm, Rider & Brock 2003, from
// memory), so the exact parameters are known in closed form.
const H4 = [1 / 4, 1 / 8, 1 / 16, 1 / 32];
const T4 = [1 / 10, 1 / 20, 1 / 40, 1 / 80];

function tensorDesign(hs: readonly number[], ts: readonly number[]): { h: number[]; dt: number[] } {
  const h: number[] = [];
  const dt: number[] = [];
  for (const a of hs) {
    for (const b of ts) {
      h.push(a);
      dt.push(b);
    }
  }
  return { h, dt };
}

const model = (h: number[], dt: number[], Ch: number, p: number, Ct: number, q: number): number[] =>
  h.map((x, i) => Ch * x ** p + Ct * dt[i]! ** q);

const relErr = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('fitTwoAxis on exact data (closed form: the data are the model)', () => {
  it('recovers p = 2, q = 1 and both constants of e = 0.7 h² + 0.3 Δt on a 4×4 grid to 1e-8', () => {
    const { h, dt } = tensorDesign(H4, T4);
    const f = fitTwoAxis(h, dt, model(h, dt, 0.7, 2, 0.3, 1));
    expect(f.converged).toBe(true);
    expect(Math.abs(f.p - 2)).toBeLessThan(1e-8);
    expect(Math.abs(f.q - 1)).toBeLessThan(1e-8);
    expect(relErr(f.Ch, 0.7)).toBeLessThan(1e-8);
    expect(relErr(f.Ct, 0.3)).toBeLessThan(1e-8);
    expect(f.points).toBe(16);
    expect(f.dof).toBe(12); // points − 4 parameters (Bates & Watts 1988, §2.3)
    expect(f.sigma).toBeLessThan(1e-12);
  });

  it('recovers p = 1, q = 3 (e = 2 h + 5 Δt³) on a 4×4 grid to 1e-8', () => {
    const { h, dt } = tensorDesign(H4, [0.4, 0.2, 0.1, 0.05]);
    const f = fitTwoAxis(h, dt, model(h, dt, 2, 1, 5, 3));
    expect(f.converged).toBe(true);
    expect(Math.abs(f.p - 1)).toBeLessThan(1e-8);
    expect(Math.abs(f.q - 3)).toBeLessThan(1e-8);
    expect(relErr(f.Ch, 2)).toBeLessThan(1e-8);
    expect(relErr(f.Ct, 5)).toBeLessThan(1e-8);
  });

  it('recovers p = 3, q = 2 on a design that is not a grid: the finest-h slice, the finest-Δt slice and a diagonal', () => {
    const h = [0.2, 0.2, 0.2, 0.2, 0.1, 0.05, 0.025, 0.1, 0.05];
    const dt = [0.1, 0.05, 0.025, 0.0125, 0.0125, 0.0125, 0.0125, 0.05, 0.025];
    const f = fitTwoAxis(h, dt, model(h, dt, 4, 3, 0.5, 2));
    expect(f.converged).toBe(true);
    expect(Math.abs(f.p - 3)).toBeLessThan(1e-8);
    expect(Math.abs(f.q - 2)).toBeLessThan(1e-8);
    expect(relErr(f.Ch, 4)).toBeLessThan(1e-8);
    expect(relErr(f.Ct, 0.5)).toBeLessThan(1e-8);
  });

  it('reports the smallest and largest ratio C_t Δt^q / (C_h h^p) over the design (closed form)', () => {
    const { h, dt } = tensorDesign(H4, T4);
    const f = fitTwoAxis(h, dt, model(h, dt, 0.7, 2, 0.3, 1));
    // Smallest at h = 1/4, Δt = 1/80; largest at h = 1/32, Δt = 1/10 (hand computation).
    expect(relErr(f.termRatio![0], (0.3 / 80) / (0.7 / 16))).toBeLessThan(1e-8);
    expect(relErr(f.termRatio![1], (0.3 / 10) / (0.7 / 1024))).toBeLessThan(1e-8);
  });
});

describe('fitTwoAxis: coverage of the 95% intervals under seeded multiplicative noise', () => {
  // Noise: e_i = model_i · exp(σ z_i), z standard normal from Marsaglia's xorshift (2003) and Box & Muller (1958)
  // (test/analysis/seeded-gaussian.ts). Ln e then has Gaussian residuals, the setting of the Wald intervals of Bates &
  // Watts (1988, §2.3). A 95% method covers the true order in Binomial(N, 0.95) of N trials: with N = 500 the standard
  // deviation of the fraction is 0.0097, so 0.95 ± 0.03 (about 3 standard deviations) holds with probability ≈ 0.998
  // (normal approximation, common practice, no source). The upper side catches grossly conservative intervals.
  // Measured with the seeds below (500 trials): see the comment at each design. Measured in separate runs (1000 trials
  // each, other seeds): 4×4, p = 2, q = 1, σ = 0.01 / 0.03 / 0.1: p 0.948 / 0.947 / 0.943, q 0.953 / 0.950 / 0.950;
  // 4×4, p = 2, q = 2, σ = 0.01–0.1: 0.942–0.956; 3×3, p = 2, q = 1, σ = 0.01 / 0.03: 0.953–0.957; 4×4, p = 1,
  // q = 3, σ = 0.01 / 0.03: 0.940–0.951. With 4000 trials: 3×3, p = q = 2, σ = 0.02: p 0.952, q 0.946; σ = 0.1:
  // p 0.944, q 0.928 (large noise on a small design: the linearization begins to undercover); five points (one degree
  // of freedom), σ = 0.01 / 0.05: 0.950–0.958; nine points on two slices and a diagonal, σ = 0.02 / 0.1: 0.944–0.956.
  function coverage(h: number[], dt: number[], truth: [number, number, number, number], sigma: number, trials: number, seed: number) {
    const [Ch, p, Ct, q] = truth;
    const clean = model(h, dt, Ch, p, Ct, q);
    const z = seededGaussian(seed);
    let coverP = 0, coverQ = 0, converged = 0;
    for (let k = 0; k < trials; k++) {
      const f = fitTwoAxis(h, dt, clean.map((v) => v * Math.exp(sigma * z())));
      if (f.converged) converged++;
      if (f.pInterval[0] <= p && p <= f.pInterval[1]) coverP++;
      if (f.qInterval[0] <= q && q <= f.qInterval[1]) coverQ++;
    }
    return { p: coverP / trials, q: coverQ / trials, converged: converged / trials };
  }

  it('4×4 grid, e = 0.7 h² + 0.3 Δt, σ = 0.03: both intervals cover in 0.95 ± 0.03 of 500 trials', () => {
    const { h, dt } = tensorDesign(H4, T4);
    const c = coverage(h, dt, [0.7, 2, 0.3, 1], 0.03, 500, 20231);
    // measured: p 0.952, q 0.950, all converged
    expect(c.converged).toBe(1);
    expect(Math.abs(c.p - 0.95)).toBeLessThanOrEqual(0.03);
    expect(Math.abs(c.q - 0.95)).toBeLessThanOrEqual(0.03);
  });

  it('3×3 grid (5 degrees of freedom), e = h² + 2 Δt², σ = 0.02: both intervals cover in 0.95 ± 0.03 of 500 trials', () => {
    const { h, dt } = tensorDesign([0.2, 0.1, 0.05], [0.1, 0.05, 0.025]);
    const c = coverage(h, dt, [1, 2, 2, 2], 0.02, 500, 4242);
    // measured: p 0.936, q 0.954, all converged
    expect(c.converged).toBe(1);
    expect(Math.abs(c.p - 0.95)).toBeLessThanOrEqual(0.03);
    expect(Math.abs(c.q - 0.95)).toBeLessThanOrEqual(0.03);
  });
});

describe('fitTwoAxis refusals', () => {
  const { h, dt } = tensorDesign(H4, T4);
  const e = model(h, dt, 0.7, 2, 0.3, 1);
  const message = (f: () => unknown): string => {
    try {
      f();
    } catch (err) {
      expect(err).toBeInstanceOf(RungsInputError);
      return (err as Error).message;
    }
    throw new Error('expected a refusal');
  };

  it('fewer than 5 points: four parameters need a fifth point for the residual variance (Bates & Watts 1988, §2.3)', () => {
    expect(message(() => fitTwoAxis(h.slice(0, 4), dt.slice(0, 4), e.slice(0, 4)))).toMatch(/at least 5 \(h, Δt\) points; got 4/);
  });

  it('a design with one value of h, or one of Δt (common practice, no source)', () => {
    const oneH = h.map(() => 0.1);
    expect(message(() => fitTwoAxis(oneH, dt, e))).toMatch(/a two-axis fit needs at least two values of h and two of Δt/);
    const oneT = dt.map(() => 0.01);
    expect(message(() => fitTwoAxis(h, oneT, e))).toMatch(/a two-axis fit needs at least two values of h and two of Δt/);
  });

  it('pairs on one line Δt = c·h (coupled refinement): the terms cannot be told apart (common practice, no source)', () => {
    const hh = [0.4, 0.2, 0.1, 0.05, 0.025];
    expect(message(() => fitTwoAxis(hh, hh.map((x) => x / 2), hh.map((x) => x * x)))).toMatch(/lie on one line/);
  });

  it('non-positive or non-finite errors, naming the level (1-based)', () => {
    const zero = [...e];
    zero[2] = 0;
    expect(message(() => fitTwoAxis(h, dt, zero))).toMatch(/error at level 3 is 0/);
    const nan = [...e];
    nan[6] = Number.NaN;
    expect(message(() => fitTwoAxis(h, dt, nan))).toMatch(/error at level 7 is NaN/);
  });

  it('mismatched lengths and non-positive sizes', () => {
    expect(message(() => fitTwoAxis(h, dt.slice(1), e))).toMatch(/one entry per point/);
    const negative = [...dt];
    negative[0] = -0.1;
    expect(message(() => fitTwoAxis(h, negative, e))).toMatch(/Δt at level 1 is -0.1/);
  });
});

// The verdict rules mirror analyseSeries (src/analysis/verdict.ts): tolerance 0.1 and a half-width above
// CI_WIDTH_FACTOR (3) tolerances decides nothing; the rules are common practice, no source. The fits are built by
// hand so each rule is met exactly.
function handFit(p: number, pIv: [number, number], q: number, qIv: [number, number], termRatio: [number, number] = [0.2, 5]): TwoAxisFit {
  return { p, q, Ch: 1, Ct: 1, pInterval: pIv, qInterval: qIv, sigma: 0.01, dof: 12, points: 16, converged: true, termRatio };
}

describe('judgeTwoAxis', () => {
  it('on order on both axes, in words that name the axis and the interval', () => {
    const a = judgeTwoAxis('L2', handFit(2.02, [1.91, 2.13], 0.98, [0.93, 1.04]), { space: 2, time: 1 });
    expect(a.verdict).toEqual({ space: 'on-order', time: 'on-order' });
    expect(a.reasons[0]).toBe('spatial order 2.02 (95% interval 1.91–2.13) against 2: on order');
    expect(a.reasons[1]).toBe('temporal order 0.98 (95% interval 0.93–1.04) against 1: on order');
  });

  it('below order in time: the whole interval below expected − tolerance', () => {
    const a = judgeTwoAxis('L2', handFit(2.02, [1.91, 2.13], 0.98, [0.93, 1.04]), { space: 2, time: 2 });
    expect(a.verdict).toEqual({ space: 'on-order', time: 'below-order' });
    expect(a.reasons[1]).toMatch(/^temporal order 0\.98 \(95% interval 0\.93–1\.04\) against 2: below order — the time stepper loses an order/);
  });

  it('above order in space is a flaw in a global norm (best-approximation bound; Lin, Xie & Xu 2014, from memory)', () => {
    const a = judgeTwoAxis('L2', handFit(3.01, [2.9, 3.12], 1, [0.95, 1.05]), { space: 2, time: 1 });
    expect(a.verdict.space).toBe('above-order');
    expect(a.reasons[0]).toMatch(/measured wrongly or the expected order is wrong/);
  });

  it('inconclusive when the interval is wider than 3 tolerances on each side, even with the estimate on order', () => {
    const a = judgeTwoAxis('L2', handFit(2.05, [1.2, 2.9], 1, [0.95, 1.05]), { space: 2, time: 1 });
    expect(a.verdict).toEqual({ space: 'inconclusive', time: 'on-order' });
    expect(a.reasons[0]).toMatch(/add \(h, Δt\) pairs/);
  });

  it('on order within the scatter when the interval contains the expected order; inconclusive when it only meets the band', () => {
    const a = judgeTwoAxis('L2', handFit(1.85, [1.7, 2.05], 1.85, [1.8, 1.92]), { space: 2, time: 2 });
    expect(a.verdict).toEqual({ space: 'on-order', time: 'inconclusive' });
    expect(a.reasons[1]).toMatch(/reaches into that band/);
  });

  it('a temporal term below 5% of the spatial one at every pair leaves q unidentifiable: inconclusive in time', () => {
    expect(NEGLIGIBLE_SHARE).toBe(0.05);
    const a = judgeTwoAxis('L2', handFit(2, [1.95, 2.05], 1, [0.99, 1.01], [1e-4, 0.01]), { space: 2, time: 1 });
    expect(a.verdict).toEqual({ space: 'on-order', time: 'inconclusive' });
    expect(a.reasons[1]).toMatch(/the temporal error is below 5% of the spatial one at every \(h, Δt\) pair.*refine h further or coarsen Δt/);
    const b = judgeTwoAxis('L2', handFit(2, [1.95, 2.05], 1, [0.99, 1.01], [30, 1e4]), { space: 2, time: 1 });
    expect(b.verdict).toEqual({ space: 'inconclusive', time: 'on-order' });
    expect(b.reasons[0]).toMatch(/the spatial error is below 5% of the temporal one/);
  });

  it('no fit, a fit that did not converge, or no expected order: inconclusive with the reason', () => {
    expect(judgeTwoAxis('L2', null, { space: 2, time: 1 }).verdict).toEqual({ space: 'inconclusive', time: 'inconclusive' });
    const stuck = { ...handFit(2, [1.95, 2.05], 1, [0.95, 1.05]), converged: false };
    const s = judgeTwoAxis('L2', stuck, { space: 2, time: 1 });
    expect(s.verdict).toEqual({ space: 'inconclusive', time: 'inconclusive' });
    expect(s.reasons[0]).toMatch(/did not converge/);
    const n = judgeTwoAxis('L2', handFit(2, [1.95, 2.05], 1, [0.95, 1.05]), { space: 2, time: null });
    expect(n.verdict.time).toBe('inconclusive');
    expect(n.reasons[1]).toMatch(/no expected order/);
  });

  it('refuses a non-positive tolerance', () => {
    expect(() => judgeTwoAxis('L2', null, { space: 2, time: 1 }, 0)).toThrow(RungsInputError);
  });

  it('end to end: a first-order stepper in a study that expects second order is below order in time only', () => {
    // e = h² + 0.5 Δt with 2% seeded noise (closed form plus Marsaglia 2003 / Box & Muller 1958 noise).
    const { h, dt } = tensorDesign(H4, T4);
    const z = seededGaussian(77);
    const e = model(h, dt, 1, 2, 0.5, 1).map((v) => v * Math.exp(0.02 * z()));
    const a = judgeTwoAxis('L2', fitTwoAxis(h, dt, e), { space: 2, time: 2 });
    expect(a.verdict).toEqual({ space: 'on-order', time: 'below-order' });
  });

  it('end to end: a temporal term that vanishes from the fit leaves the spatial interval finite', () => {
    // e = h² (1 + 1% noise): no temporal error at all (closed form plus seeded noise, as above).
    const { h, dt } = tensorDesign(H4, T4);
    const z = seededGaussian(5);
    const f = fitTwoAxis(h, dt, h.map((x) => x * x * Math.exp(0.01 * z())));
    const a = judgeTwoAxis('L2', f, { space: 2, time: 1 });
    expect(Number.isFinite(f.pInterval[0]) && Number.isFinite(f.pInterval[1])).toBe(true);
    expect(a.verdict).toEqual({ space: 'on-order', time: 'inconclusive' });
  });

  it('a capped iteration count reports converged = false and the judge says inconclusive', () => {
    const { h, dt } = tensorDesign(H4, T4);
    const f = fitTwoAxis(h, dt, model(h, dt, 0.7, 2, 0.3, 1).map((v, i) => v * (1 + 0.01 * Math.sin(i))), { maxIterations: 0 });
    expect(f.converged).toBe(false);
    expect(judgeTwoAxis('L2', f, { space: 2, time: 1 }).verdict).toEqual({ space: 'inconclusive', time: 'inconclusive' });
  });
});
