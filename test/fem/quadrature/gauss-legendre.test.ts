import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../../src/errors.ts';
import { gaussLegendre } from '../../../src/fem/quadrature/index.ts';

// Abramowitz & Stegun (1964), Table 25.4, positive abscissas and weights as printed (15 decimals),
// typed from memory; consistency is checked below (weights sum to 2, exactness on monomials), and
// n = 2..5 are also checked against their closed forms.
const AS_TABLE_25_4: Record<number, Array<[x: number, w: number]>> = {
  2: [[0.577350269189626, 1.0]],
  3: [
    [0.0, 0.888888888888889],
    [0.774596669241483, 0.555555555555556],
  ],
  4: [
    [0.339981043584856, 0.652145154862546],
    [0.861136311594053, 0.347854845137454],
  ],
  5: [
    [0.0, 0.568888888888889],
    [0.538469310105683, 0.478628670499366],
    [0.906179845938664, 0.236926885056189],
  ],
  6: [
    [0.238619186083197, 0.467913934572691],
    [0.661209386466265, 0.360761573048139],
    [0.932469514203152, 0.171324492379170],
  ],
  10: [
    [0.148874338981631, 0.295524224714753],
    [0.433395394129247, 0.269266719309996],
    [0.679409568299024, 0.219086362515982],
    [0.865063366688985, 0.149451349150581],
    [0.973906528517172, 0.066671344308688],
  ],
};

// half a unit in the 15th printed decimal (5e-16) plus a few ulps of our own round-off
const PRINTED = 1e-15;

describe('gaussLegendre against Abramowitz & Stegun 1964, Table 25.4 (digits from memory)', () => {
  for (const [nText, rows] of Object.entries(AS_TABLE_25_4)) {
    const n = Number(nText);
    it(`n = ${n}`, () => {
      const { points, weights } = gaussLegendre(n);
      expect(points.length).toBe(n);
      // positive half in ascending order sits at the end of the ascending node list
      const positive = rows.filter(([x]) => x > 0);
      const offset = n - positive.length;
      positive.forEach(([x, w], i) => {
        expect(Math.abs(points[offset + i]! - x)).toBeLessThan(PRINTED);
        expect(Math.abs(weights[offset + i]! - w)).toBeLessThan(PRINTED);
        // symmetric partner
        expect(points[n - 1 - offset - i]).toBe(-points[offset + i]!);
        expect(weights[n - 1 - offset - i]).toBe(weights[offset + i]!);
      });
      if (n % 2 === 1) {
        expect(points[(n - 1) / 2]).toBe(0);
        expect(Math.abs(weights[(n - 1) / 2]! - rows[0]![1])).toBeLessThan(PRINTED);
      }
      // the typed table itself is consistent: its weights sum to 2 (common practice, no source)
      const tableSum = rows.reduce((s, [x, w]) => s + (x === 0 ? w : 2 * w), 0);
      expect(Math.abs(tableSum - 2)).toBeLessThan(4 * PRINTED * rows.length);
    });
  }
});

describe('gaussLegendre against closed forms (Abramowitz & Stegun 1964, 25.4.29; roots of P_n by hand)', () => {
  const close = (a: number, b: number) => expect(Math.abs(a - b)).toBeLessThan(4e-16);
  it('n = 1: node 0, weight 2', () => {
    const { points, weights } = gaussLegendre(1);
    expect(points[0]).toBe(0);
    close(weights[0]!, 2);
  });
  it('n = 2: ±1/√3, weights 1', () => {
    const { points, weights } = gaussLegendre(2);
    close(points[1]!, 1 / Math.sqrt(3));
    close(weights[0]!, 1);
  });
  it('n = 3: 0, ±√(3/5); weights 8/9, 5/9', () => {
    const { points, weights } = gaussLegendre(3);
    close(points[2]!, Math.sqrt(3 / 5));
    close(weights[1]!, 8 / 9);
    close(weights[2]!, 5 / 9);
  });
  it('n = 4: √(3/7 ∓ (2/7)√(6/5)); weights (18 ± √30)/36', () => {
    const { points, weights } = gaussLegendre(4);
    close(points[2]!, Math.sqrt(3 / 7 - (2 / 7) * Math.sqrt(6 / 5)));
    close(points[3]!, Math.sqrt(3 / 7 + (2 / 7) * Math.sqrt(6 / 5)));
    close(weights[2]!, (18 + Math.sqrt(30)) / 36);
    close(weights[3]!, (18 - Math.sqrt(30)) / 36);
  });
  it('n = 5: (1/3)√(5 ∓ 2√(10/7)); weights 128/225, (322 ± 13√70)/900', () => {
    const { points, weights } = gaussLegendre(5);
    close(points[3]!, Math.sqrt(5 - 2 * Math.sqrt(10 / 7)) / 3);
    close(points[4]!, Math.sqrt(5 + 2 * Math.sqrt(10 / 7)) / 3);
    close(weights[2]!, 128 / 225);
    close(weights[3]!, (322 + 13 * Math.sqrt(70)) / 900);
    close(weights[4]!, (322 - 13 * Math.sqrt(70)) / 900);
  });
});

describe('gaussLegendre exactness: n points integrate x^k exactly for k <= 2n-1 (common practice, no source)', () => {
  // ∫_{-1}^{1} x^k dx = 2/(k+1) for even k, 0 for odd k
  const moment = (k: number) => (k % 2 === 0 ? 2 / (k + 1) : 0);
  for (const n of [1, 2, 3, 7, 16, 33, 64]) {
    it(`n = ${n}`, () => {
      const { points, weights } = gaussLegendre(n);
      for (let k = 0; k <= 2 * n - 1; k++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += weights[i]! * points[i]! ** k;
        expect(Math.abs(s - moment(k))).toBeLessThan(1e-15 * n);
      }
    });
  }
  // The error for x^(2n) is the remainder 2^(2n+1) (n!)^4 / ((2n+1) ((2n)!)^2) (Abramowitz & Stegun 1964, 25.4.29,
  // with f^(2n) = (2n)!): the rule is not exact one degree higher, and by exactly this much.
  for (const n of [1, 2, 3, 5, 8]) {
    it(`n = ${n}: x^${2 * n} misses by the A&S 25.4.29 remainder`, () => {
      const { points, weights } = gaussLegendre(n);
      let s = 0;
      for (let i = 0; i < n; i++) s += weights[i]! * points[i]! ** (2 * n);
      let fact = 1;
      for (let i = 2; i <= n; i++) fact *= i;
      let fact2 = 1;
      for (let i = 2; i <= 2 * n; i++) fact2 *= i;
      const remainder = (2 ** (2 * n + 1) * fact ** 4) / ((2 * n + 1) * fact2 ** 2);
      expect(Math.abs(moment(2 * n) - s - remainder) / remainder).toBeLessThan(1e-10);
    });
  }
  it('n = 1000: weights sum to 2, nodes ascending inside (-1, 1), low moments exact', () => {
    const { points, weights } = gaussLegendre(1000);
    let sum = 0;
    for (let i = 0; i < 1000; i++) sum += weights[i]!;
    expect(Math.abs(sum - 2)).toBeLessThan(1e-14);
    for (let i = 1; i < 1000; i++) expect(points[i]!).toBeGreaterThan(points[i - 1]!);
    expect(points[0]!).toBeGreaterThan(-1);
    expect(points[999]!).toBeLessThan(1);
    for (const k of [2, 10, 50]) {
      let s = 0;
      for (let i = 0; i < 1000; i++) s += weights[i]! * points[i]! ** k;
      expect(Math.abs(s - moment(k)) / moment(k)).toBeLessThan(1e-13);
    }
  });
});

describe('gaussLegendre input errors', () => {
  it.each([0, -1, 2.5, Number.NaN, Infinity, 1e6])('rejects n = %s with RungsInputError', (n) => {
    expect(() => gaussLegendre(n)).toThrow(RungsInputError);
    expect(() => gaussLegendre(n)).toThrow(/integer from 1 to 4096/);
  });
});
