import { describe, expect, it } from 'vitest';
import { observedOrderThreeLevels, richardsonExtrapolate, richardsonSequence } from '../../src/analysis/richardson.ts';

// Richardson extrapolation removes the leading term of an error expansion f(h) = A + B h^p + ...
// (Richardson 1911; Roache 1998, ch. 5). The checks use sequences whose expansion is known exactly.
describe('Richardson extrapolation', () => {
  it('recovers A and p to 1e-10 from the exact sequence A + B h^p, for equal and unequal ratios', () => {
    const A = 1.2345;
    const B = -0.8;
    for (const p of [1, 2, 2.7]) {
      for (const h of [[0.4, 0.2, 0.1, 0.05], [0.5, 0.33, 0.21, 0.12, 0.1]]) {
        const f = h.map((x) => A + B * x ** p);
        const seq = richardsonSequence(h, f);
        for (let i = 2; i < h.length; i++) {
          expect(Math.abs(seq.order[i]! - p)).toBeLessThan(1e-10);
          expect(Math.abs(seq.extrapolated[i]! - A)).toBeLessThan(1e-10);
        }
        expect(seq.order[0]).toBeNull();
        expect(seq.order[1]).toBeNull();
      }
    }
  });

  it('on A + B h² + C h³, p → 2 like O(h) and the extrapolated value → A like O(h³)', () => {
    // With p = 2 exact, (4 f(h) - f(2h))/3 = A - (4/3) C h³ (the h² term cancels, algebra by hand); the
    // observed p differs from 2 by O(h) because the h³ term perturbs the differences.
    const A = Math.PI;
    const B = 0.5;
    const C = 2;
    const h = Array.from({ length: 12 }, (_, i) => 0.5 / 2 ** i);
    const f = h.map((x) => A + B * x * x + C * x ** 3);
    const seq = richardsonSequence(h, f);
    const orderError = seq.order.map((p) => (p === null ? null : Math.abs(p - 2)));
    const valueError = seq.extrapolated.map((v) => (v === null ? null : Math.abs(v - A)));
    // Halving h should halve the order error and divide the value error by 8 once h is small.
    for (let i = 7; i < h.length - 1; i++) {
      expect(orderError[i]! / orderError[i + 1]!).toBeGreaterThan(1.9);
      expect(orderError[i]! / orderError[i + 1]!).toBeLessThan(2.1);
      expect(valueError[i]! / valueError[i + 1]!).toBeGreaterThan(7.5);
      expect(valueError[i]! / valueError[i + 1]!).toBeLessThan(8.5);
    }
    const finest = h.length - 1;
    expect(orderError[finest]!).toBeLessThan(4e-3);
    expect(valueError[finest]!).toBeLessThan(1e-10);
  });

  it('the two-level formula equals f_fine + (f_fine - f_coarse)/(r^p - 1)', () => {
    // Algebraically identical forms of Richardson's formula (Roache 1998, eq. 5.4.1; common practice).
    const fine = 0.9871;
    const coarse = 0.9502;
    for (const [r, p] of [[2, 2], [1.5, 1.53], [3, 1]] as const) {
      expect(richardsonExtrapolate(fine, coarse, r, p)).toBeCloseTo(fine + (fine - coarse) / (r ** p - 1), 14);
    }
  });

  it('with equal ratios the iteration reduces to the classic ln(ε32/ε21)/ln r in one step', () => {
    // Celik et al. (2008), eq. 3: q(p) = 0 when r21 = r32 and s = 1.
    const o = observedOrderThreeLevels(1.0, 1.01, 1.05, 2, 2);
    expect(o.order).toBeCloseTo(Math.log(0.04 / 0.01) / Math.log(2), 12);
    expect(o.iterations).toBe(1);
    expect(o.sign).toBe(1);
  });

  it('uses the published fixed-point iteration when it contracts and bisection when r32 ≫ r21', () => {
    const A = 2;
    const exact = (h: number) => A + 0.3 * h;
    // r21 = 1.5, r32 = 4/3 (Celik's example ratios): the fixed-point map contracts.
    const mild = observedOrderThreeLevels(exact(1), exact(1.5), exact(2), 1.5, 4 / 3);
    expect(mild.method).toBe('fixed-point');
    expect(mild.order).toBeCloseTo(1, 12);
    // r21 = 1.2, r32 = 1.75: |dq/dp| / ln r21 > 1, the iteration diverges and bisection takes over.
    const steep = observedOrderThreeLevels(exact(0.1), exact(0.12), exact(0.21), 1.2, 1.75);
    expect(steep.method).toBe('bisection');
    expect(steep.order).toBeCloseTo(1, 12);
  });

  it('reports NaN and no convergence when two levels agree exactly', () => {
    const o = observedOrderThreeLevels(1, 1, 1.2, 2, 2);
    expect(o.order).toBeNaN();
    expect(o.converged).toBe(false);
  });
});
