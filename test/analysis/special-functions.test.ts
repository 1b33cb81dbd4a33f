import { describe, expect, it } from 'vitest';
import { erf, lgamma } from 'mathjs';
import { logGamma } from '../../src/analysis/log-gamma.ts';
import { erfc, regularizedGammaP, regularizedGammaQ } from '../../src/analysis/incomplete-gamma.ts';
import { regularizedIncompleteBeta } from '../../src/analysis/incomplete-beta.ts';
import { normalUpperQuantile, normalUpperTail } from '../../src/analysis/normal-quantile.ts';

describe('logGamma', () => {
  it('matches ln((n-1)!) exactly computed factorials', () => {
    // Γ(n) = (n-1)! (A&S 1964, eq. 6.1.6); factorials up to 20! are exact in double precision.
    let factorial = 1;
    for (let n = 1; n <= 21; n++) {
      expect(logGamma(n)).toBeCloseTo(Math.log(factorial), 13);
      factorial *= n;
    }
  });
  it('matches Γ(1/2) = √π and the half-integer values Γ(n+1/2)', () => {
    // Γ(1/2) = √π, Γ(n + 1/2) = (2n-1)!! √π / 2^n (A&S 1964, eqs. 6.1.8 and 6.1.12).
    let value = Math.sqrt(Math.PI);
    for (let n = 0; n <= 12; n++) {
      expect(Math.abs(logGamma(n + 0.5) - Math.log(value))).toBeLessThan(1e-13);
      value *= n + 0.5;
    }
  });
  it('agrees with mathjs lgamma (a general-purpose reference library) over a wide range', () => {
    // mathjs' lgamma is itself accurate to about 1e-11 relative, hence the tolerance.
    for (const x of [0.1, 0.7, 2.3, 7.9, 14.999, 15, 33.3, 171.5, 1e5]) {
      expect(Math.abs(logGamma(x) - lgamma(x))).toBeLessThan(1e-11 * Math.max(1, Math.abs(lgamma(x))));
    }
  });
});

describe('regularized incomplete gamma and erfc', () => {
  it('erfc agrees with mathjs erf where 1 - erf keeps its digits', () => {
    for (const x of [-2, -0.5, 0, 0.01, 0.3, 1, 1.5, 2, 3]) {
      expect(Math.abs(erfc(x) - (1 - erf(x)))).toBeLessThan(2e-15);
    }
  });
  it('erfc keeps relative accuracy in the far tail', () => {
    // erfc(5) = 1.5374597944280349e-12 (from memory).
    expect(erfc(5) / 1.5374597944280349e-12).toBeCloseTo(1, 12);
  });
  it('P(1, x) = 1 - e^-x and P + Q = 1', () => {
    // Γ(1, x) = e^-x (A&S 1964, eq. 6.5.2 with a = 1).
    for (const x of [0.1, 1, 2, 5, 20]) {
      expect(regularizedGammaP(1, x)).toBeCloseTo(1 - Math.exp(-x), 14);
      expect(regularizedGammaP(3.5, x) + regularizedGammaQ(3.5, x)).toBeCloseTo(1, 14);
    }
  });
});

describe('regularizedIncompleteBeta', () => {
  it('matches the closed forms I_x(a,1) = x^a, I_x(1,b) = 1-(1-x)^b, I_x(1/2,1/2) = (2/π) asin √x', () => {
    // Closed forms from the definition (A&S 1964, eq. 26.5.1); the last is the arcsine distribution.
    for (const x of [0.001, 0.1, 0.37, 0.5, 0.8, 0.999]) {
      expect(regularizedIncompleteBeta(x, 2.5, 1)).toBeCloseTo(Math.pow(x, 2.5), 14);
      expect(regularizedIncompleteBeta(x, 1, 4.5)).toBeCloseTo(1 - Math.pow(1 - x, 4.5), 14);
      expect(regularizedIncompleteBeta(x, 0.5, 0.5)).toBeCloseTo((2 / Math.PI) * Math.asin(Math.sqrt(x)), 13);
    }
  });
  it('satisfies the symmetry I_x(a,b) = 1 - I_{1-x}(b,a)', () => {
    // A&S 1964, eq. 26.5.2.
    for (const [x, a, b] of [[0.3, 2, 7], [0.9, 0.5, 30], [0.05, 12, 0.5]] as const) {
      expect(regularizedIncompleteBeta(x, a, b) + regularizedIncompleteBeta(1 - x, b, a)).toBeCloseTo(1, 13);
    }
  });
});

describe('normal quantiles', () => {
  it('reproduces the standard two-sided points 1.6449, 1.9600, 2.5758, 3.2905', () => {
    // z_{0.95}, z_{0.975}, z_{0.995}, z_{0.9995}: standard normal percentage points, full digits from memory.
    expect(normalUpperQuantile(0.05)).toBeCloseTo(1.6448536269514722, 13);
    expect(normalUpperQuantile(0.025)).toBeCloseTo(1.959963984540054, 13);
    expect(normalUpperQuantile(0.005)).toBeCloseTo(2.5758293035489004, 13);
    expect(normalUpperQuantile(0.0005)).toBeCloseTo(3.2905267314919255, 12);
  });
  it('agrees with 40-digit values of √2 erfc⁻¹(2p) to 1e-15 relative', () => {
    // Reference: z = -√2 erfinv(2p - 1) evaluated by mpmath 1.3.0 (Johansson et al.) at 40 significant digits,
    // rounded to double.
    const reference: [number, number][] = [[1e-12, 7.034483825301132], [1e-6, 4.753424308822899], [0.0005, 3.290526731491895],
      [0.005, 2.575829303548901], [0.025, 1.9599639845400543], [0.2, 0.8416212335729142], [0.7, -0.5244005127080407],
      [0.999, -3.090232306167813]];
    expect(Math.max(...reference.map(([p, z]) => Math.abs(normalUpperQuantile(p) / z - 1)))).toBeLessThan(1e-15);
  });
  it('inverts the upper tail across ten decades', () => {
    for (const p of [1e-12, 1e-6, 0.001, 0.2, 0.5, 0.7, 0.999]) {
      expect(normalUpperTail(normalUpperQuantile(p)) / p).toBeCloseTo(1, 12);
    }
  });
});
