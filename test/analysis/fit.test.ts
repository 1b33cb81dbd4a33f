import { describe, expect, it } from 'vitest';
import { Matrix, inverse, solve } from 'ml-matrix';
import { fitLine, fitOrderInDofs, fitOrderInH } from '../../src/analysis/fit.ts';
import { RungsInputError } from '../../src/errors.ts';
import { seededGaussian } from './seeded-gaussian.ts';

const halving = (h0: number, m: number) => Array.from({ length: m }, (_, i) => h0 / 2 ** i);

describe('fitOrderInH and fitOrderInDofs', () => {
  it('recover exact power laws to 1e-12 (order, constant, zero-width interval)', () => {
    // An exact power law lies on a straight line in log-log axes (common practice, no source).
    const h = [0.4, 0.21, 0.1, 0.047, 0.02, 0.011];
    for (const p of [0.5, 1, 2, 4.25]) {
      const C = 3.7;
      const e = h.map((x) => C * Math.pow(x, p));
      const fit = fitOrderInH(e, h, [1, 2, 3, 4, 5]);
      expect(Math.abs(fit.order - p)).toBeLessThan(1e-12);
      expect(Math.abs(fit.logConstant - Math.log(C))).toBeLessThan(1e-12);
      expect(fit.stderr).toBeLessThan(1e-12);
      expect(fit.ciHigh - fit.ciLow).toBeLessThan(1e-10);
      expect(fit.levels).toEqual([1, 2, 3, 4, 5]);
    }
  });
  it('recovers the order in dofs in 2-D with the same constant as in h when h = N^(-1/d)', () => {
    const h = halving(0.25, 5);
    const dofs = h.map((x) => Math.pow(x, -2));
    const e = h.map((x) => 0.8 * x ** 3);
    const fit = fitOrderInDofs(e, dofs, 2, [0, 1, 2, 3, 4]);
    expect(Math.abs(fit.order - 3)).toBeLessThan(1e-12);
    expect(Math.abs(fit.logConstant - Math.log(0.8))).toBeLessThan(1e-12);
  });
  it('gives the exact slope, NaN stderr and an infinite interval with two points', () => {
    const fit = fitOrderInH([1e-2, 2.6e-3], [0.1, 0.05], [0, 1]);
    expect(fit.order).toBeCloseTo(Math.log(1e-2 / 2.6e-3) / Math.log(2), 14);
    expect(fit.stderr).toBeNaN();
    expect(fit.ciLow).toBe(-Infinity);
    expect(fit.ciHigh).toBe(Infinity);
  });
  it('matches least squares by QR in ml-matrix (an outside reference) on scattered data, standard error included', () => {
    // The line is simple-statistics' linearRegression, so the reference is another library and another method: the
    // overdetermined system [1 x] (b, m) = y solved by ml-matrix's QR, and the slope's standard error
    // s √((AᵀA)⁻¹)₂₂ with s² = SSR / (m − 2) (Draper & Smith 1998, ch. 1 and 5).
    const noise = seededGaussian(7);
    const x: number[] = [];
    const y: number[] = [];
    for (let i = 0; i < 12; i++) {
      x.push(-6 + 0.37 * i + 0.05 * noise());
      y.push(1.3 - 2.1 * x[i]! + 0.2 * noise());
    }
    const ours = fitLine(x, y);
    const a = new Matrix(x.map((xi) => [1, xi]));
    const coef = solve(a, Matrix.columnVector(y)).to1DArray();
    const residuals = y.map((yi, i) => yi - coef[0]! - coef[1]! * x[i]!);
    const s = Math.sqrt(residuals.reduce((acc, r) => acc + r * r, 0) / (x.length - 2));
    const stderr = s * Math.sqrt(inverse(a.transpose().mmul(a)).get(1, 1));
    expect(ours.slope).toBeCloseTo(coef[1]!, 12);
    expect(ours.intercept).toBeCloseTo(coef[0]!, 12);
    expect(ours.slopeStderr / stderr).toBeCloseTo(1, 12);
  });
  it('uses the textbook standard error s / sqrt(Sxx) on a hand-checkable set', () => {
    // x = 0,1,2, y = 0,2,1: slope 0.5, intercept 0.5, residuals (-0.5, 1, -0.5), SSR = 1.5, ν = 1,
    // s = sqrt(1.5), Sxx = 2, stderr = sqrt(0.75) (least squares by hand; common practice, no source).
    const line = fitLine([0, 1, 2], [0, 2, 1]);
    expect(line.slope).toBeCloseTo(0.5, 14);
    expect(line.intercept).toBeCloseTo(0.5, 14);
    expect(line.slopeStderr).toBeCloseTo(Math.sqrt(0.75), 14);
  });
  it('95% intervals cover the true order in about 95% of 2000 seeded noisy trials', () => {
    // With Gaussian errors in ln e the Student-t interval has exact 95% coverage (Draper & Smith 1998, ch. 1);
    // with 2000 trials the binomial standard deviation is about 0.5%, so 93–97% is a wide band.
    const h = halving(0.5, 5);
    const noise = seededGaussian(20240611);
    let covered = 0;
    const trials = 2000;
    for (let t = 0; t < trials; t++) {
      const e = h.map((x) => 2 * x ** 2 * Math.exp(0.1 * noise()));
      const fit = fitOrderInH(e, h, [0, 1, 2, 3, 4]);
      if (fit.ciLow <= 2 && 2 <= fit.ciHigh) covered++;
    }
    expect(covered / trials).toBeGreaterThan(0.93);
    expect(covered / trials).toBeLessThan(0.97);
  });
  it('rejects unusable fits with a RungsInputError', () => {
    expect(() => fitOrderInH([1, 0], [0.1, 0.05], [0, 1])).toThrow(RungsInputError);
    expect(() => fitOrderInH([1, 0.5], [0.1, 0.05], [0, 2])).toThrow(RungsInputError);
    expect(() => fitOrderInH([1, 0.5], [0.1, 0.1], [0, 1])).toThrow(RungsInputError);
    expect(() => fitOrderInH([1, 0.5], [0.1, 0.05], [0, 1], 1.5)).toThrow(RungsInputError);
  });
});
