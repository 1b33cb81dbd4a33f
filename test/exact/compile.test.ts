import { describe, expect, it } from 'vitest';
import { derivative, parse } from 'mathjs';
import { compileFlux, compileScalar, compileValueAndGradient, compileVector, javaScriptOf } from '../../src/exact/compile.ts';
import { parseFormula } from '../../src/exact/formula.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

// Reference: mathjs 15 `compile().evaluate(scope)` (general-purpose library) on the same trees. Arguments are kept
// where every function is real, so mathjs returns plain numbers.
const FORMULAS: Array<[string, 1 | 2 | 3]> = [
  ['sin(pi*x) * sin(pi*y)', 2],
  ['exp(-x) * sin(3*y) + x*y', 2],
  ['x^2*y + y^3 - 2.5e-3*x*y*z', 3],
  ['(x + y)^2 - (x - z)^3 + x^4', 3],
  ['tan(x) + sec(x) + csc(x + 0.5) + cot(x + 0.5)', 1],
  ['asin(x/2) + acos(x/2) + atan(3*x) + acot(x + 0.5)', 1],
  ['asec(x + 1.5) + acsc(x + 1.5)', 1],
  ['sinh(x) + cosh(y) + tanh(x*y) + sech(x) + csch(y + 0.5) + coth(x + 0.5)', 2],
  ['asinh(x) + acosh(x + 1.5) + atanh(x/2) + acoth(x + 2) + asech(x/2 + 0.1) + acsch(x + 0.5)', 1],
  ['exp(x*y) + log(x + 1) + log(y + 2, 3) + log10(x + 0.1) + sqrt(x) + cbrt(x - 0.5) + abs(y - 0.5)', 2],
  ['pow(x + 1, y) + (x + 1)^(1/3) + e^x + 2^(-y) + -x^2 + +y', 2],
  ['1 / (1 + 25*(x - 0.5)^2) * exp(-z) * cos(2*pi*y)', 3],
];

function randomPoints(n: number, seed: number): number[][] {
  const random = mulberry32(seed);
  return Array.from({ length: n }, () => [random(), random(), random()]);
}

function relativeDifference(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);
}

describe('compileScalar', () => {
  it.each(FORMULAS)('%s equals mathjs evaluate to 1e-14 relative', (text, dim) => {
    const node = parseFormula(text, 'exact', dim);
    const compiled = compileScalar(node);
    const reference = node.compile();
    for (const [x, y, z] of randomPoints(50, 11)) {
      const expected = reference.evaluate({ x, y, z }) as number;
      expect(typeof expected).toBe('number');
      expect(relativeDifference(compiled(x, y, z), expected)).toBeLessThanOrEqual(1e-14);
    }
  });

  it('compiles mathjs derivative trees (sec, sign, nested powers) to the same values', () => {
    for (const text of ['tan(x*y)', 'x^3 * exp(-y) / (1 + x^2)', 'cbrt(x^2 + 1) * sqrt(y + 1)']) {
      for (const v of ['x', 'y']) {
        const d = derivative(parse(text), v);
        const compiled = compileScalar(d);
        for (const [x, y] of randomPoints(20, 5)) {
          const expected = d.evaluate({ x, y }) as number;
          expect(relativeDifference(compiled(x, y, 0), expected)).toBeLessThanOrEqual(1e-14);
        }
      }
    }
  });

  it('writes plain JavaScript: no scope lookups, constants folded, squares as products', () => {
    const source = javaScriptOf(parseFormula('sin(pi/4) * x^2 + (x + y)^2', 'exact', 2));
    expect(source).not.toMatch(/scope|Math\.PI|Math\.pow/);
    expect(source).toContain('0.7071067811865475'); // sin(π/4) = √2/2 (from memory)
    expect(source).toContain('(x * x)');
  });
});

describe('compileVector and compileFlux', () => {
  it('match mathjs evaluate of each component and of k ∇u·n', () => {
    const k = parse('1 + x*y');
    const g = [parse('2*x*y'), parse('x^2 + 3*y^2')];
    const vector = compileVector(g);
    const flux = compileFlux(k, g);
    const out = new Float64Array(3);
    for (const [x, y] of randomPoints(30, 3)) {
      vector(x, y, 0, out);
      const g0 = g[0].evaluate({ x, y }) as number;
      const g1 = g[1].evaluate({ x, y }) as number;
      expect(relativeDifference(out[0], g0)).toBeLessThanOrEqual(1e-14);
      expect(relativeDifference(out[1], g1)).toBeLessThanOrEqual(1e-14);
      const [nx, ny] = [0.6, -0.8];
      const expected = (k.evaluate({ x, y }) as number) * (g0 * nx + g1 * ny);
      expect(relativeDifference(flux(x, y, 0, nx, ny, 0), expected)).toBeLessThanOrEqual(1e-14);
    }
  });
});

describe('compileValueAndGradient', () => {
  // Gradients by mathjs's derivative (an outside symbolic differentiator); each value must be the same bits as the
  // separately compiled u and ∇u, which the tests above check against mathjs's own evaluation.
  const formulas = [
    'sin(pi*x) * sin(pi*y)',
    'exp(-(x^2 + y^2) / 0.1) + cos(3*x*y)^2',
    'x^3 * y^2 + sqrt(1 + x^2 + y^2) * log(2 + x)',
    '(x - 0.3)^2 * tanh(20 * (y - 0.5))',
  ];
  for (const text of formulas) {
    it(`gives the bits of compileScalar and compileVector: ${text}`, () => {
      const u = parse(text);
      const grad = [derivative(u, 'x'), derivative(u, 'y')];
      const both = compileValueAndGradient(u, grad);
      const value = compileScalar(u), gradient = compileVector(grad);
      const g1 = new Float64Array(2), g2 = new Float64Array(2);
      for (const [x, y] of randomPoints(40, 7)) {
        const v = both(x, y, 0, g1);
        gradient(x, y, 0, g2);
        expect(v).toBe(value(x, y, 0));
        expect(Array.from(g1)).toEqual(Array.from(g2));
      }
    });
  }

  it('evaluates each distinct call once: sin(πx)·sin(πy) needs four, not six', () => {
    const u = parse('sin(pi*x) * sin(pi*y)');
    const source = compileValueAndGradient(u, [derivative(u, 'x'), derivative(u, 'y')]).toString();
    expect(source.match(/Math\.(sin|cos)\(/g)?.length).toBe(4);
  });
});

describe('shared calls in compiled formulas', () => {
  it('a derived source term computes each distinct call once and still matches mathjs evaluate', () => {
    // f = −∇·(k∇u) for u = exp(−x) sin(3y) + xy, k = 1 + xy/4 repeats sin(3y) and exp(−x) in its tree.
    const tree = parse('-(1/4*y*(y - sin(3*y)*exp(-x)) + (1 + 1/4*x*y)*-(sin(3*y)*-1*exp(-x)) + 1/4*x*(3*exp(-x)*cos(3*y) + x) + 9*(1 + 1/4*x*y)*exp(-x)*-sin(3*y))');
    const source = javaScriptOf(tree);
    expect(source.match(/Math\.(sin|cos|exp)\(/g)?.length).toBe(3);
    const f = compileScalar(tree);
    for (const [x, y] of randomPoints(30, 11)) {
      expect(relativeDifference(f(x, y, 0), tree.evaluate({ x, y }) as number)).toBeLessThanOrEqual(1e-14);
    }
  });
});
