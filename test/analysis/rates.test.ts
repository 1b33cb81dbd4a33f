import { describe, expect, it } from 'vitest';
import { pairwiseRates, rateInDofs, rateInH } from '../../src/analysis/rates.ts';

// Observed order between two levels, p = ln(e1/e2)/ln(h1/h2) and p = -d ln(e1/e2)/ln(N1/N2) with h ~ N^(-1/d)
// (common practice, no source).
describe('pairwise rates', () => {
  it('recovers the exponent of exact power laws in h, including non-uniform refinement', () => {
    const h = [0.5, 0.3, 0.1, 0.07, 0.01];
    for (const p of [1, 2, 3.5]) {
      const e = h.map((x) => 4.2 * Math.pow(x, p));
      for (let i = 1; i < h.length; i++) expect(rateInH(e[i - 1]!, e[i]!, h[i - 1]!, h[i]!)).toBeCloseTo(p, 12);
    }
  });
  it('recovers the order from dofs when N = h^-d', () => {
    for (const dim of [1, 2, 3]) {
      const h = [1 / 4, 1 / 8, 1 / 16];
      const dofs = h.map((x) => Math.pow(x, -dim));
      const e = h.map((x) => 0.3 * x * x);
      const rates = pairwiseRates(e, null, dofs, dim);
      expect(rates[0]).toBeNull();
      expect(rates[1]).toBeCloseTo(2, 12);
      expect(rates[2]).toBeCloseTo(2, 12);
      expect(rateInDofs(e[0]!, e[2]!, dofs[0]!, dofs[2]!, dim)).toBeCloseTo(2, 12);
    }
  });
  it('halving h and quartering the error is order 2', () => {
    // The textbook example: e drops by 4 when h halves, p = ln 4 / ln 2 = 2 (common practice, no source).
    expect(rateInH(1, 0.25, 0.1, 0.05)).toBeCloseTo(2, 14);
  });
  it('gives null where an error is zero and NaN for a single non-positive pair', () => {
    const rates = pairwiseRates([1e-2, 0, 1e-4], [0.1, 0.05, 0.025], [10, 20, 40], 1);
    expect(rates).toEqual([null, null, null]);
    expect(rateInH(0, 1, 0.1, 0.05)).toBeNaN();
  });
});
