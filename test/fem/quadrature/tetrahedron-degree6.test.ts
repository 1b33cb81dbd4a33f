import { describe, expect, it } from 'vitest';
import { collapsedTetrahedronRule, ruleFor, tetrahedronTwentyFourPointRule } from '../../../src/fem/quadrature/index.ts';
import { ruleMoment, tetrahedronMoment, worstErrorOfDegree, worstSimplexError } from './exact-moments.ts';

describe('the 24-point tetrahedron rule of degree 6 (Keast 1986)', () => {
  const rule = tetrahedronTwentyFourPointRule();

  it('integrates every monomial x^a y^b z^c with a+b+c <= 6 to 1e-14 (Dirichlet 1839: a! b! c!/(a+b+c+3)!)', () => {
    // 84 monomials, each against its exact integral; checked in plain code, asserted once.
    const bad: string[] = [];
    for (let a = 0; a <= 6; a++) {
      for (let b = 0; a + b <= 6; b++) {
        for (let c = 0; a + b + c <= 6; c++) {
          const exact = tetrahedronMoment(a, b, c);
          const err = Math.abs(ruleMoment(rule, [a, b, c]) - exact) / exact;
          if (!(err < 1e-14)) bad.push(`x^${a} y^${b} z^${c}: ${err.toExponential(2)}`);
        }
      }
    }
    expect(bad).toEqual([]);
  });

  it('is not exact for degree 7 (its stated degree is its precision; Keast 1986)', () => {
    expect(worstErrorOfDegree(rule, 7, 3)).toBeGreaterThan(1e-8);
  });

  it('has 24 points inside the tetrahedron, all distinct, and positive weights summing to 1/6 (Keast 1986)', () => {
    expect(rule.nPoints).toBe(24);
    let sum = 0;
    const seen = new Set<string>();
    let outside = 0;
    for (let q = 0; q < 24; q++) {
      const w = rule.weights[q]!, x = rule.points[3 * q]!, y = rule.points[3 * q + 1]!, z = rule.points[3 * q + 2]!;
      if (!(w > 0 && x > 0 && y > 0 && z > 0 && x + y + z < 1)) outside++;
      sum += w;
      seen.add([x, y, z].map((v) => v.toFixed(12)).join(','));
    }
    expect(outside).toBe(0);
    expect(seen.size).toBe(24);
    expect(Math.abs(sum - 1 / 6) * 6).toBeLessThan(1e-15);
  });

  it('is what ruleFor gives for degree 6 on tetrahedra (24 points instead of the 64 of the collapsed rule)', () => {
    const chosen = ruleFor('tetrahedron', 6);
    expect(chosen.nPoints).toBe(24);
    expect(chosen.source).toMatch(/Keast 1986/);
    expect(collapsedTetrahedronRule(4).nPoints).toBe(64);
    // Same integrals as the collapsed rule on a degree-6 polynomial (both exact; Dirichlet's formula above).
    expect(worstSimplexError(chosen, 6)).toBeLessThan(1e-14);
  });
});
