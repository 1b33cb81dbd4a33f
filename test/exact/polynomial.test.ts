import { describe, expect, it } from 'vitest';
import { parse } from 'mathjs';
import { polynomialDegree } from '../../src/exact/polynomial.ts';

// Total degree of a polynomial (common practice, no source): the largest i + j + k over monomials x^i y^j z^k with
// a nonzero coefficient after expansion.
describe('polynomialDegree', () => {
  it.each([
    ['x*y + x^2', 2],
    ['x^2*y + y^3', 3],
    ['(x + 1)^2 - x^2', 1],
    ['(x + y)^3 - 3*x*y*(x + y) - x^3 - y^3', 0],
    ['(0.1 + 0.2)*x^2 - 0.3*x^2 + x', 1],
    ['x^3 / 2', 3],
    ['sqrt(2) * x * y * z', 3],
    ['pi', 0],
    ['2^3 * x', 1],
    ['pow(x*y, 2) + z', 4],
    ['-(x - y)^4 * sin(pi/6)', 4],
  ])('%s → %s', (text, degree) => {
    expect(polynomialDegree(parse(text))).toBe(degree);
  });

  it.each(['sin(x)', 'x/y', 'x^0.5', 'exp(x)', 'x^y', 'abs(x)', '1/(1 + x^2)', 'x^-1'])('%s is not a polynomial', (text) => {
    expect(polynomialDegree(parse(text))).toBeNull();
  });
});
