import { describe, expect, it } from 'vitest';
import { SIXTH_ORDER_STEP, centralDerivative6 } from '../../src/exact/finite-difference.ts';

describe('centralDerivative6', () => {
  it('differentiates polynomials of degree ≤ 6 exactly up to round-off (order 6, Fornberg 1988, Table 1)', () => {
    const p = (t: number) => 1 - 2 * t + 3 * t ** 2 - t ** 3 + 0.5 * t ** 4 - 0.25 * t ** 5 + 0.125 * t ** 6;
    const dp = (t: number) => -2 + 6 * t - 3 * t ** 2 + 2 * t ** 3 - 1.25 * t ** 4 + 0.75 * t ** 5;
    for (const t of [-0.7, 0, 0.3, 1.9]) {
      expect(Math.abs(centralDerivative6(p, t, 0.1) - dp(t))).toBeLessThan(1e-12);
    }
    // A seventh power is not reproduced. Derived by hand at t = 0: [45·2h^7 − 9·2(2h)^7 + 2(3h)^7]/(60h)
    // = h^6 (90 − 2304 + 4374)/60 = 36 h^6 = h^6 f^(7)/140, and the same at every t since f^(9) = 0.
    const h = 0.1;
    const error = centralDerivative6((t) => t ** 7, 0.5, h) - 7 * 0.5 ** 6;
    expect(error).toBeCloseTo(36 * h ** 6, 12);
  });

  it('shows sixth-order convergence on exp and meets 1e-12 at the default step (calculus: (e^t)′ = e^t)', () => {
    const t = 0.3;
    const e1 = Math.abs(centralDerivative6(Math.exp, t, 0.2) - Math.exp(t));
    const e2 = Math.abs(centralDerivative6(Math.exp, t, 0.1) - Math.exp(t));
    expect(Math.log2(e1 / e2)).toBeCloseTo(6, 1);
    expect(Math.abs(centralDerivative6(Math.exp, t, SIXTH_ORDER_STEP) - Math.exp(t))).toBeLessThan(1e-12);
  });
});
