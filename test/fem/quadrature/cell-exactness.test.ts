import { describe, expect, it } from 'vitest';
import {
  collapsedTetrahedronRule,
  collapsedTriangleRule,
  expandTriangleTable,
  polishTriangleTable,
  ruleFor,
  SYMMETRIC_TRIANGLE_TABLES,
  symmetricTetrahedronRules,
  symmetricTriangleRules,
  type QuadratureRule,
} from '../../../src/fem/quadrature/index.ts';
import { ruleMoment, squareMoment, worstErrorOfDegree, worstSimplexError } from './exact-moments.ts';

const TOL = 1e-14;

/** Weights positive, summing to the cell measure; points inside the closed reference cell. */
function expectSaneRule(rule: QuadratureRule, measure: number): void {
  let sum = 0;
  for (let q = 0; q < rule.nPoints; q++) {
    expect(rule.weights[q]!).toBeGreaterThan(0);
    sum += rule.weights[q]!;
  }
  expect(Math.abs(sum - measure) / measure).toBeLessThan(TOL);
  const dim = rule.points.length / rule.nPoints;
  for (let q = 0; q < rule.nPoints; q++) {
    let total = 0;
    for (let k = 0; k < dim; k++) {
      const x = rule.points[q * dim + k]!;
      expect(x).toBeGreaterThanOrEqual(0);
      expect(x).toBeLessThanOrEqual(1);
      total += x;
    }
    if (rule.cell === 'triangle' || rule.cell === 'tetrahedron') expect(total).toBeLessThanOrEqual(1 + 1e-15);
  }
}

describe('interval rules from ruleFor integrate x^a, a <= degree, to 1e-14 (exact 1/(a+1))', () => {
  it('degrees 0..40', () => {
    for (let degree = 0; degree <= 40; degree++) {
      const rule = ruleFor('interval', degree);
      expect(rule.cell).toBe('interval');
      expect(rule.degree).toBeGreaterThanOrEqual(degree);
      expectSaneRule(rule, 1);
      expect(worstSimplexError(rule, degree)).toBeLessThan(TOL);
    }
  });
});

describe('quadrilateral rules from ruleFor integrate x^a y^b, a, b <= degree, to 1e-14 (exact 1/((a+1)(b+1)))', () => {
  it('degrees 0..20', () => {
    for (let degree = 0; degree <= 20; degree++) {
      const rule = ruleFor('quadrilateral', degree);
      expect(rule.cell).toBe('quadrilateral');
      expectSaneRule(rule, 1);
      for (let a = 0; a <= degree; a++) {
        for (let b = 0; b <= degree; b++) {
          const exact = squareMoment(a, b);
          expect(Math.abs(ruleMoment(rule, [a, b]) - exact) / exact).toBeLessThan(TOL);
        }
      }
    }
  });
});

describe('triangle rules from ruleFor integrate x^a y^b, a+b <= degree, to 1e-14 (Dirichlet: a! b!/(a+b+2)!)', () => {
  it('degrees 0..20', () => {
    for (let degree = 0; degree <= 20; degree++) {
      const rule = ruleFor('triangle', degree);
      expect(rule.cell).toBe('triangle');
      expect(rule.degree).toBeGreaterThanOrEqual(degree);
      expectSaneRule(rule, 0.5);
      expect(worstSimplexError(rule, degree)).toBeLessThan(TOL);
    }
  });
});

describe('tetrahedron rules from ruleFor integrate x^a y^b z^c, a+b+c <= degree, to 1e-14 (Dirichlet: a! b! c!/(a+b+c+3)!)', () => {
  it('degrees 0..14', () => {
    for (let degree = 0; degree <= 14; degree++) {
      const rule = ruleFor('tetrahedron', degree);
      expect(rule.cell).toBe('tetrahedron');
      expect(rule.degree).toBeGreaterThanOrEqual(degree);
      expectSaneRule(rule, 1 / 6);
      expect(worstSimplexError(rule, degree)).toBeLessThan(TOL);
    }
  });
});

describe('symmetric rules are exact to their stated degree and not beyond', () => {
  // Each table's degree is the precision Dunavant (1985) reports for that rule (from memory); the
  // 4-point and 14-point tetrahedron rules likewise (Keast 1986; Walkington 2000; from memory).
  it('every triangle table, refined: exact to its degree (1e-14), misses degree + 1', () => {
    for (const rule of symmetricTriangleRules()) {
      expectSaneRule(rule, 0.5);
      expect(worstSimplexError(rule, rule.degree)).toBeLessThan(TOL);
      expect(worstErrorOfDegree(rule, rule.degree + 1, 2)).toBeGreaterThan(1e-8);
    }
  });
  it('every triangle table as typed is already a rule of its degree to the printed 15 decimals (5e-14)', () => {
    for (const table of SYMMETRIC_TRIANGLE_TABLES) {
      expect(worstSimplexError(expandTriangleTable(table), table.degree)).toBeLessThan(5e-14);
    }
  });
  it('refinement moves no tabulated parameter by more than 1e-11 (the table is that rule)', () => {
    for (const table of SYMMETRIC_TRIANGLE_TABLES) {
      if (table.closedForm === true) continue;
      expect(polishTriangleTable(table).maxShift).toBeLessThan(1e-11);
    }
  });
  it('every tetrahedron symmetric rule: exact to its degree (1e-14), misses degree + 1', () => {
    for (const rule of symmetricTetrahedronRules()) {
      expectSaneRule(rule, 1 / 6);
      expect(worstSimplexError(rule, rule.degree)).toBeLessThan(TOL);
      expect(worstErrorOfDegree(rule, rule.degree + 1, 3)).toBeGreaterThan(1e-8);
    }
  });
});

describe('collapsed rules with n points per direction: exact to degree 2n-1, not 2n (Karniadakis & Sherwin 2005, ch. 4)', () => {
  // y^(2n) becomes t^(2n) against the n-point Gauss–Jacobi rule in t, which is not exact for it
  it('triangle, n = 1..6', () => {
    for (let n = 1; n <= 6; n++) {
      const rule = collapsedTriangleRule(n);
      expect(worstSimplexError(rule, 2 * n - 1)).toBeLessThan(TOL);
      expect(worstErrorOfDegree(rule, 2 * n, 2)).toBeGreaterThan(1e-10);
    }
  });
  it('tetrahedron, n = 1..4', () => {
    for (let n = 1; n <= 4; n++) {
      const rule = collapsedTetrahedronRule(n);
      expect(worstSimplexError(rule, 2 * n - 1)).toBeLessThan(TOL);
      expect(worstErrorOfDegree(rule, 2 * n, 3)).toBeGreaterThan(1e-10);
    }
  });
});
