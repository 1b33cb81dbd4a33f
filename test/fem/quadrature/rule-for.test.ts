import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../../src/errors.ts';
import { MAX_RULE_DEGREE, ruleFor } from '../../../src/fem/quadrature/index.ts';
import type { CellKind } from '../../../src/mesh/types.ts';

describe('ruleFor input errors', () => {
  it.each([-1, 2.5, Number.NaN, Infinity, -0.5])('degree %s is rejected with RungsInputError naming the valid range', (d) => {
    expect(() => ruleFor('triangle', d)).toThrow(RungsInputError);
    expect(() => ruleFor('triangle', d)).toThrow(/degree for a triangle must be an integer from 0 to 399/);
  });
  it('degree above the cell maximum is rejected', () => {
    expect(() => ruleFor('tetrahedron', MAX_RULE_DEGREE.tetrahedron + 1)).toThrow(/from 0 to 99/);
  });
  it('a non-number degree is rejected', () => {
    expect(() => ruleFor('interval', '3' as unknown as number)).toThrow(RungsInputError);
  });
  it('an unknown cell is rejected, listing the valid cells', () => {
    expect(() => ruleFor('prism' as CellKind, 2)).toThrow(RungsInputError);
    expect(() => ruleFor('prism' as CellKind, 2)).toThrow(/interval, quadrilateral, triangle, tetrahedron, hexahedron/);
  });
  it('the error says where it came from', () => {
    try {
      ruleFor('interval', -3);
      expect.unreachable();
    } catch (e) {
      expect((e as RungsInputError).where).toBe('ruleFor.degree');
    }
  });
});

describe('ruleFor picks cheap rules', () => {
  // n-point Gauss rules are exact to 2n-1 and no n-1 point rule is (common practice, no source)
  it('interval: ceil((degree+1)/2) Gauss points', () => {
    for (let d = 0; d <= 30; d++) expect(ruleFor('interval', d).nPoints).toBe(Math.max(1, Math.ceil((d + 1) / 2)));
  });
  it('quadrilateral: tensor of ceil((degree+1)/2) Gauss points per direction', () => {
    for (let d = 0; d <= 12; d++) expect(ruleFor('quadrilateral', d).nPoints).toBe(Math.max(1, Math.ceil((d + 1) / 2)) ** 2);
  });
  it('triangle: 1 point to degree 1, 3 points for degree 2, 7 points for degree 5 (Dunavant 1985, from memory)', () => {
    expect(ruleFor('triangle', 0).nPoints).toBe(1);
    expect(ruleFor('triangle', 1).nPoints).toBe(1);
    expect(ruleFor('triangle', 2).nPoints).toBe(3);
    expect(ruleFor('triangle', 4).nPoints).toBe(6);
    expect(ruleFor('triangle', 5).nPoints).toBe(7);
  });
  it('triangle: never more points than the collapsed rule of the same degree', () => {
    for (let d = 0; d <= 20; d++) {
      const n = Math.max(1, Math.ceil((d + 1) / 2));
      expect(ruleFor('triangle', d).nPoints).toBeLessThanOrEqual(n * n);
    }
  });
  it('tetrahedron: 1 point to degree 1, 4 points for degree 2 (Keast 1986, from memory)', () => {
    expect(ruleFor('tetrahedron', 1).nPoints).toBe(1);
    expect(ruleFor('tetrahedron', 2).nPoints).toBe(4);
    for (let d = 0; d <= 12; d++) {
      const n = Math.max(1, Math.ceil((d + 1) / 2));
      expect(ruleFor('tetrahedron', d).nPoints).toBeLessThanOrEqual(n ** 3);
    }
  });
  it('rules are cached: the same request returns the same object', () => {
    for (const cell of ['interval', 'quadrilateral', 'triangle', 'tetrahedron'] as const) {
      expect(ruleFor(cell, 7)).toBe(ruleFor(cell, 7));
    }
    // degrees 6 and 7 share the 4-point Gauss rule on the interval
    expect(ruleFor('interval', 6)).toBe(ruleFor('interval', 7));
  });
  it('the points array has nPoints * dim entries and names a source', () => {
    const dims: Record<CellKind, number> = { interval: 1, quadrilateral: 2, triangle: 2, tetrahedron: 3, hexahedron: 3 };
    for (const cell of ['interval', 'quadrilateral', 'triangle', 'tetrahedron'] as const) {
      for (const d of [0, 3, 9]) {
        const rule = ruleFor(cell, d);
        expect(rule.points.length).toBe(rule.nPoints * dims[cell]);
        expect(rule.weights.length).toBe(rule.nPoints);
        expect(rule.source.length).toBeGreaterThan(0);
      }
    }
  });
});
