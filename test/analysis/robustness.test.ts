import { describe, expect, it } from 'vitest';
import { judgeRobustness } from '../../src/analysis/robustness.ts';

// Synthetic sweeps whose answer is known by construction (common practice, no source): errors e = C(v) h^p on one h.
const h = 1 / 32;
describe('robustness of the error constant over a sweep', () => {
  it('a constant that does not depend on the parameter is robust, with growth 1', () => {
    const f = judgeRobustness('L2_u', 'lambda', 2, [1, 1e2, 1e4, 1e6].map((value) => ({ value, h, error: 0.3 * h ** 2 })));
    expect(f.robust).toBe(true);
    expect(f.growth).toBeCloseTo(1, 12);
    expect(f.trend).toBeCloseTo(0, 12);
  });
  it('a constant growing like the square root of λ is not robust, and the trend says 0.5', () => {
    const f = judgeRobustness('L2_u', 'lambda', 2, [1, 1e2, 1e4].map((value) => ({ value, h, error: 0.3 * Math.sqrt(value) * h ** 2 })));
    expect(f.robust).toBe(false);
    expect(f.growth).toBeCloseTo(100, 8);
    expect(f.trend).toBeCloseTo(0.5, 12);
    expect(f.reason).toMatch(/not robust — likely locking/);
  });
  it('growth is measured from the smallest constant before the largest (a dip then a rise counts)', () => {
    const cs = [2, 1, 30];
    const f = judgeRobustness('H1semi_u', 'nu', 1, cs.map((c, i) => ({ value: i + 1, h, error: c * h })));
    expect(f.growth).toBeCloseTo(30, 10);
    expect(f.robust).toBe(false);
  });
  it('a growth at the allowed factor is still robust; above it is not', () => {
    expect(judgeRobustness('L2', 'Pe', 2, [{ value: 1, h, error: h ** 2 }, { value: 10, h, error: 10 * h ** 2 }]).robust).toBe(true);
    expect(judgeRobustness('L2', 'Pe', 2, [{ value: 1, h, error: h ** 2 }, { value: 10, h, error: 10.5 * h ** 2 }]).robust).toBe(false);
  });
});
