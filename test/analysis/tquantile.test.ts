import { describe, expect, it } from 'vitest';
import { studentTTwoSidedTail, tQuantileTwoSided } from '../../src/analysis/tquantile.ts';
import { RungsInputError } from '../../src/errors.ts';

describe('tQuantileTwoSided', () => {
  it('reproduces the printed two-sided 95% points for ν = 1..10, 20, 30, 60, 120, ∞', () => {
    // Percentage points of the t distribution, Q = 0.05 two-sided (Abramowitz & Stegun 1964, Table 26.10, and
    // every standard statistics table); three printed decimals, typed from memory.
    const printed: [number, number][] = [
      [1, 12.706], [2, 4.303], [3, 3.182], [4, 2.776], [5, 2.571], [6, 2.447], [7, 2.365], [8, 2.306],
      [9, 2.262], [10, 2.228], [20, 2.086], [30, 2.042], [60, 2.0], [120, 1.98], [Infinity, 1.96],
    ];
    for (const [nu, t] of printed) expect(Math.abs(tQuantileTwoSided(nu) - t)).toBeLessThanOrEqual(5e-4 + 1e-12);
  });
  it('reproduces the printed two-sided 99% points for ν = 1..5', () => {
    // Same tables, Q = 0.01 two-sided; typed from memory.
    const printed: [number, number][] = [[1, 63.657], [2, 9.925], [3, 5.841], [4, 4.604], [5, 4.032]];
    for (const [nu, t] of printed) expect(Math.abs(tQuantileTwoSided(nu, 0.01) - t)).toBeLessThanOrEqual(5e-4 + 1e-12);
  });
  it('matches the closed forms for ν = 1 (Cauchy) and ν = 2 to near machine precision', () => {
    // ν = 1: t = tan(π(1-α)/2) = 1/tan(πα/2); ν = 2: t = sqrt(2 q²/(1 - q²)) with q = 1 - α and
    // 1 - q² = α(2 - α) (from the closed-form CDFs, common practice, no source). Written without 1 - α so the
    // reference keeps its digits for small α.
    for (const alpha of [0.5, 0.2, 0.05, 0.01, 1e-6]) {
      const q = 1 - alpha;
      expect(tQuantileTwoSided(1, alpha) * Math.tan((Math.PI * alpha) / 2)).toBeCloseTo(1, 12);
      expect(tQuantileTwoSided(2, alpha) / Math.sqrt((2 * q * q) / (alpha * (2 - alpha)))).toBeCloseTo(1, 12);
    }
  });
  it('inverts the tail for non-integer and large ν and is continuous where the method switches', () => {
    for (const nu of [1.5, 2.5, 7.25, 333, 5e4]) {
      for (const alpha of [0.3, 0.05, 0.001]) {
        expect(studentTTwoSidedTail(tQuantileTwoSided(nu, alpha), nu) / alpha).toBeCloseTo(1, 10);
      }
    }
    // Above ν = 1e5 the A&S 26.7.5 expansion is used; it must join the inverted tail seamlessly.
    expect(Math.abs(tQuantileTwoSided(99_999) - tQuantileTwoSided(100_000))).toBeLessThan(1e-9);
  });
  it('rejects ν < 1 and α outside (0, 1) with a RungsInputError', () => {
    expect(() => tQuantileTwoSided(0.5)).toThrow(RungsInputError);
    expect(() => tQuantileTwoSided(3, 0)).toThrow(RungsInputError);
    expect(() => tQuantileTwoSided(Number.NaN)).toThrow(RungsInputError);
  });
});
