import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../../src/errors.ts';
import { gaussJacobi, gaussJacobiOnUnit, gaussLegendre } from '../../../src/fem/quadrature/index.ts';

// ∫_{-1}^{1} (1-x)^alpha (1-x)^j dx = 2^(alpha+j+1) / (alpha+j+1): exact integral (elementary)
const jacobiMoment = (alpha: number, j: number) => 2 ** (alpha + j + 1) / (alpha + j + 1);

describe('gaussJacobi closed forms', () => {
  it('n = 1: node -alpha/(alpha+2), weight 2^(alpha+1)/(alpha+1) (root of P_1^(alpha,0), A&S 1964 §22.3)', () => {
    for (const alpha of [0, 1, 2, 0.5, -0.5]) {
      const { points, weights } = gaussJacobi(1, alpha);
      expect(Math.abs(points[0]! + alpha / (alpha + 2))).toBeLessThan(1e-16);
      expect(Math.abs(weights[0]! - jacobiMoment(alpha, 0))).toBeLessThan(1e-15);
    }
  });
  it('n = 2, alpha = 1: nodes (-1 ± √6)/5, roots of 10x² + 4x - 2 = 4 P_2^(1,0) (explicit sum, A&S 1964 §22.3, by hand)', () => {
    const { points, weights } = gaussJacobi(2, 1);
    expect(Math.abs(points[0]! - (-1 - Math.sqrt(6)) / 5)).toBeLessThan(3e-16);
    expect(Math.abs(points[1]! - (-1 + Math.sqrt(6)) / 5)).toBeLessThan(3e-16);
    // weights from the two moment equations w0 + w1 = 2, w0 x0 + w1 x1 = -2/3 (exact integrals)
    const [x0, x1] = [points[0]!, points[1]!];
    const w1 = (-2 / 3 - 2 * x0) / (x1 - x0);
    expect(Math.abs(weights[1]! - w1)).toBeLessThan(1e-15);
    expect(Math.abs(weights[0]! - (2 - w1))).toBeLessThan(1e-15);
  });
  it('alpha = 0 reproduces Gauss–Legendre (common practice, no source)', () => {
    for (const n of [1, 4, 9, 30]) {
      const j = gaussJacobi(n, 0);
      const l = gaussLegendre(n);
      for (let i = 0; i < n; i++) {
        expect(Math.abs(j.points[i]! - l.points[i]!)).toBeLessThan(1e-15);
        expect(Math.abs(j.weights[i]! - l.weights[i]!)).toBeLessThan(1e-15);
      }
    }
  });
});

describe('gaussJacobi exactness on (1-x)^j, j <= 2n-1 (exact integrals)', () => {
  for (const alpha of [1, 2, 0.5, -0.5, 5]) {
    for (const n of [1, 2, 3, 6, 12, 40]) {
      it(`alpha = ${alpha}, n = ${n}`, () => {
        const { points, weights } = gaussJacobi(n, alpha);
        for (let i = 1; i < n; i++) expect(points[i]!).toBeGreaterThan(points[i - 1]!);
        expect(points[0]!).toBeGreaterThan(-1);
        expect(points[n - 1]!).toBeLessThan(1);
        for (let i = 0; i < n; i++) expect(weights[i]!).toBeGreaterThan(0);
        const momentOf = (j: number) => {
          let s = 0;
          for (let i = 0; i < n; i++) s += weights[i]! * (1 - points[i]!) ** j;
          return s;
        };
        for (let j = 0; j <= 2 * n - 1; j++) {
          const exact = jacobiMoment(alpha, j);
          expect(Math.abs(momentOf(j) - exact) / exact).toBeLessThan(2e-14);
        }
        // Gauss rules are exact to degree 2n-1 only (common practice, no source); for larger n the
        // miss at degree 2n shrinks like 4^-n below round-off, so it is only visible for small n
        if (n <= 6) {
          const exact = jacobiMoment(alpha, 2 * n);
          expect(Math.abs(momentOf(2 * n) - exact) / exact).toBeGreaterThan(1e-10);
        }
      });
    }
  }
});

describe('gaussJacobiOnUnit: ∫_0^1 (1-s)^alpha s^k ds = B(k+1, alpha+1) (Euler beta integral)', () => {
  it('alpha = 1 and 2, n = 5, k <= 9', () => {
    for (const alpha of [1, 2]) {
      const { points, weights } = gaussJacobiOnUnit(5, alpha);
      for (let k = 0; k <= 9; k++) {
        // B(k+1, alpha+1) = k! alpha! / (k+alpha+1)! for integer alpha
        let exact = 1;
        for (let i = 1; i <= alpha; i++) exact *= i / (k + i);
        exact /= k + alpha + 1;
        let s = 0;
        for (let i = 0; i < 5; i++) s += weights[i]! * points[i]! ** k;
        expect(Math.abs(s - exact) / exact).toBeLessThan(1e-14);
      }
    }
  });
});

describe('gaussJacobi input errors', () => {
  it('rejects alpha <= -1 and non-finite alpha, naming the valid range', () => {
    for (const alpha of [-1, -2, Number.NaN, Infinity]) {
      expect(() => gaussJacobi(3, alpha)).toThrow(RungsInputError);
      expect(() => gaussJacobi(3, alpha)).toThrow(/greater than -1/);
    }
  });
  it('rejects bad point counts', () => {
    for (const n of [0, 1.5, -3]) expect(() => gaussJacobi(n, 1)).toThrow(RungsInputError);
  });
});
