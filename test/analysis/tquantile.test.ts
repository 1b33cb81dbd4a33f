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
  it('agrees with 40-digit values to 1e-13 relative where rungs uses it (ν ≤ 60), and to 2e-10 up to ν = 1e5', () => {
    // Reference: the root t of I_{ν/(ν+t²)}(ν/2, 1/2) = α (A&S 1964, eq. 26.7.1 with 26.5.27) found with mpmath 1.3.0
    // (Johansson et al., findroot on betainc(regularized=True)) at 40 significant digits, rounded to double; columns
    // α = 0.3, 0.05, 0.001, 1e-6. The same values came from @stdlib/stats-base-dists-t-quantile 0.2.3 to 1.1e-15.
    const reference: [number, number[]][] = [
      [1.5, [1.5471994495729788, 6.0166631044279315, 82.84744670365761, 8285.391195025039]],
      [2.5, [1.3016622771599353, 3.574654842003683, 18.277893528130647, 290.523061599015]],
      [3, [1.2497781050332253, 3.1824463052837095, 12.923978636687483, 130.15458955835794]],
      [4, [1.1895668524436942, 2.7764451051977943, 8.610301581379275, 49.45863675693464]],
      [5, [1.1557673428942932, 2.5705818356363155, 6.86882662588111, 28.47847346298421]],
      [7.25, [1.1161009396403132, 2.348194849105372, 5.302992013800605, 15.021388442917011]],
      [10, [1.093058073590526, 2.228138851986275, 4.586893858702636, 10.516489956914905]],
      [20, [1.064015771160399, 2.085963447265865, 3.8495162749308274, 6.927031381423296]],
      [60, [1.0454689431031825, 2.0002978220142604, 3.460200469196356, 5.448947832286069]],
    ];
    const alphas = [0.3, 0.05, 0.001, 1e-6];
    let worst = 0;
    for (const [nu, ts] of reference) {
      ts.forEach((t, k) => { worst = Math.max(worst, Math.abs(tQuantileTwoSided(nu, alphas[k]!) / t - 1)); });
    }
    expect(worst).toBeLessThan(1e-13);
    // Large ν: the incomplete beta's front factor, a difference of ln Γ values near ν/2 ln ν, loses digits (measured
    // 9e-13 at ν = 1000 and 1.3e-10 at ν = 99 999, against the same mpmath roots); far below what a fit resolves.
    const large: [number, number, number][] = [[1000, 0.05, 1.9623390808264085], [1000, 0.001, 3.300282648423913],
      [50000, 0.05, 1.96001143109368], [50000, 0.001, 3.2907213365587937]];
    expect(Math.max(...large.map(([nu, a, t]) => Math.abs(tQuantileTwoSided(nu, a) / t - 1)))).toBeLessThan(2e-10);
  });
  it('rejects ν < 1 and α outside (0, 1) with a RungsInputError', () => {
    expect(() => tQuantileTwoSided(0.5)).toThrow(RungsInputError);
    expect(() => tQuantileTwoSided(3, 0)).toThrow(RungsInputError);
    expect(() => tQuantileTwoSided(Number.NaN)).toThrow(RungsInputError);
  });
});
