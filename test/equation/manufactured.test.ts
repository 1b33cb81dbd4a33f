import { describe, expect, it } from 'vitest';
import { derivative, parse } from 'mathjs';
import { RungsInputError } from '../../src/errors.ts';
import { manufacture } from '../../src/equation/manufactured.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

const PI = Math.PI;

function randomPoints(n: number, seed: number, lo = 0, hi = 1): number[][] {
  const random = mulberry32(seed);
  return Array.from({ length: n }, () => [0, 0, 0].map(() => lo + (hi - lo) * random()));
}

/** |a − b| ≤ tol·max(|b|, 1): relative for large values, absolute near zeros of the function. */
function expectClose(actual: number, expected: number, tol = 1e-12): void {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tol * Math.max(Math.abs(expected), 1));
}

describe('manufacture: source terms against hand derivations (calculus, derived in the comments)', () => {
  it('u = sin(πx) sin(πy), k = 1: ∇u = π(cos πx sin πy, sin πx cos πy), f = −Δu = 2π² sin(πx) sin(πy)', () => {
    const s = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' }, 'exact');
    const g = new Float64Array(3);
    for (const [x, y] of randomPoints(25, 1)) {
      s.grad(x, y, 0, g);
      expectClose(g[0], PI * Math.cos(PI * x) * Math.sin(PI * y));
      expectClose(g[1], PI * Math.sin(PI * x) * Math.cos(PI * y));
      expectClose(s.f(x, y, 0), 2 * PI * PI * Math.sin(PI * x) * Math.sin(PI * y));
    }
  });

  it('u = x²y + y³, k = 1 + x: f = −(8y + 10xy)', () => {
    // ∇u = (2xy, x² + 3y²); k∇u = ((1+x)·2xy, (1+x)(x² + 3y²)).
    // ∂x[(1+x)·2xy] = 2xy + (1+x)·2y = 2y + 4xy;  ∂y[(1+x)(x² + 3y²)] = (1+x)·6y = 6y + 6xy.
    // ∇·(k∇u) = 8y + 10xy (check: kΔu + ∇k·∇u = (1+x)·8y + 2xy), so f = −8y − 10xy.
    const s = manufacture({ dim: 2, u: 'x^2*y + y^3', k: '1 + x' }, { u: 'exact', k: 'coefficients.k' });
    const g = new Float64Array(3);
    for (const [x, y] of randomPoints(25, 2, -2, 2)) {
      s.grad(x, y, 0, g);
      expectClose(g[0], 2 * x * y);
      expectClose(g[1], x * x + 3 * y * y);
      expectClose(s.f(x, y, 0), -8 * y - 10 * x * y);
      // Neumann data k∇u·n for n = (0.6, 0.8).
      expectClose(s.flux(x, y, 0, 0.6, 0.8, 0), (1 + x) * (2 * x * y * 0.6 + (x * x + 3 * y * y) * 0.8));
    }
  });

  it('1D convection–reaction: u = sin(3x) + x², k = 2, b = 4, c = 5', () => {
    // u' = 3cos(3x) + 2x, u'' = −9 sin(3x) + 2.
    // f = −2u'' + 4u' + 5u = 18 sin 3x − 4 + 12 cos 3x + 8x + 5 sin 3x + 5x² = 23 sin 3x + 12 cos 3x + 5x² + 8x − 4.
    const s = manufacture({ dim: 1, u: 'sin(3*x) + x^2', k: '2', b: ['4'], c: '5' });
    const g = new Float64Array(1);
    for (const [x] of randomPoints(25, 3, -1, 2)) {
      s.grad(x, 0, 0, g);
      expectClose(g[0], 3 * Math.cos(3 * x) + 2 * x);
      expectClose(s.f(x, 0, 0), 23 * Math.sin(3 * x) + 12 * Math.cos(3 * x) + 5 * x * x + 8 * x - 4);
      expectClose(s.flux(x, 0, 0, -1, 0, 0), -2 * (3 * Math.cos(3 * x) + 2 * x));
    }
  });

  it('3D with variable b and c: u = xyz + e^z, k = 1, b = (1, y, 0), c = x', () => {
    // ∇u = (yz, xz, xy + e^z), Δu = e^z; b·∇u = yz + xyz; cu = x²yz + x e^z.
    // f = −e^z + yz + xyz + x²yz + x e^z.
    const s = manufacture({ dim: 3, u: 'x*y*z + exp(z)', b: ['1', 'y', '0'], c: 'x' });
    const g = new Float64Array(3);
    const b = new Float64Array(3);
    for (const [x, y, z] of randomPoints(25, 4)) {
      s.grad(x, y, z, g);
      expectClose(g[2], x * y + Math.exp(z));
      s.b(x, y, z, b);
      expect([b[0], b[1], b[2]]).toEqual([1, y, 0]);
      const ez = Math.exp(z);
      expectClose(s.f(x, y, z), -ez + y * z + x * y * z + x * x * y * z + x * ez);
    }
  });
});

describe('manufacture: against mathjs derivative(...).evaluate (general-purpose library)', () => {
  const CASES: Array<{ dim: 2 | 3; u: string; k: string; b: string[]; c: string }> = [
    { dim: 2, u: 'exp(-x) * sin(3*y) + x*y', k: '1 + 0.25*x*y', b: ['0', '0'], c: '0' },
    { dim: 2, u: 'atan(5*(x - y)) * cosh(x)', k: 'exp(x - y)', b: ['y', '-x'], c: '1 + x^2' },
    { dim: 3, u: 'sin(pi*x)*sin(pi*y)*sin(pi*z)*exp(x*y*z)', k: '1 + x^2 + y*z', b: ['1', '0', 'z'], c: '2' },
  ];
  it.each(CASES)('u = $u, k = $k', ({ dim, u, k, b, c }) => {
    const s = manufacture({ dim, u, k, b, c });
    const vars = ['x', 'y', 'z'].slice(0, dim);
    // Reference source built from mathjs's own (default, simplified) derivatives.
    const du = vars.map((v) => derivative(u, v).toString());
    const divergence = vars.map((v, i) => derivative(`(${k}) * (${du[i]})`, v).toString());
    const fText = `-(${divergence.join(') - (')}) + ${vars.map((_, i) => `(${b[i]}) * (${du[i]})`).join(' + ')} + (${c}) * (${u})`;
    const fRef = parse(fText).compile();
    const gRef = du.map((d) => parse(d).compile());
    const g = new Float64Array(3);
    for (const [x, y, z] of randomPoints(25, 9)) {
      const scope = { x, y, z };
      s.grad(x, y, z, g);
      for (let i = 0; i < dim; i++) expectClose(g[i], gRef[i].evaluate(scope) as number);
      expectClose(s.f(x, y, z), fRef.evaluate(scope) as number, 1e-11);
    }
  });
});

describe('manufacture: degrees, formulas, defaults', () => {
  it('detects the total degree of a polynomial u (algebra, common practice, no source)', () => {
    expect(manufacture({ dim: 2, u: 'x*y + x^2' }).polynomialDegree).toBe(2);
    expect(manufacture({ dim: 1, u: 'sin(x)' }).polynomialDegree).toBeNull();
    const s = manufacture({ dim: 2, u: 'x^2*y + y^3', k: '1 + x' });
    expect(s.polynomialDegree).toBe(3);
    expect(s.kDegreeHint).toBe(1);
    expect(s.fDegreeHint).toBe(2); // f = −8y − 10xy from the hand derivation above
    expect(manufacture({ dim: 1, u: 'x', k: 'exp(x)' }).kDegreeHint).toBeNull();
  });

  it('reports derived formulas that mathjs can parse back to the same values', () => {
    const s = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' });
    expect(s.formulas.u).toBe('sin(pi * x) * sin(pi * y)');
    expect(s.formulas.grad).toHaveLength(2);
    expect(s.formulas.k).toBe('1');
    expect(s.formulas.b).toEqual(['0', '0']);
    const [x, y] = [0.3, 0.8];
    expectClose(parse(s.formulas.f).evaluate({ x, y }) as number, 2 * PI * PI * Math.sin(PI * x) * Math.sin(PI * y));
  });

  it('defaults: k = 1, b = 0, c = 0', () => {
    const s = manufacture({ dim: 1, u: 'x^3' });
    const b = new Float64Array(1);
    s.b(0.4, 0, 0, b);
    expect([s.k(0.4, 0, 0), b[0], s.c(0.4, 0, 0)]).toEqual([1, 0, 0]);
    expectClose(s.f(0.4, 0, 0), -6 * 0.4); // −(x³)'' = −6x
  });

  it('replaces abs(g)/g by sign(g) so the gradient of |x − 1/2| is defined at its kink', () => {
    const s = manufacture({ dim: 1, u: 'abs(x - 0.5) * x' });
    const g = new Float64Array(1);
    s.grad(0.5, 0, 0, g);
    expect(g[0]).toBe(0); // d/dx (|x−½| x) = sign(x−½) x + |x−½|, = 0 at x = ½ by the convention sign(0) = 0
    s.grad(0.2, 0, 0, g);
    expectClose(g[0], -0.2 + 0.3);
  });

  it('keeps a simplification only where it preserves the domain: d/dx cbrt(x²) stays real for x < 0', () => {
    const s = manufacture({ dim: 1, u: 'cbrt(x^2)' }, '', { simplify: 'full' });
    const g = new Float64Array(1);
    s.grad(-0.5, 0, 0, g);
    expectClose(g[0], (2 / 3) * -0.5 / Math.cbrt(0.25) ** 2); // (2/3) x (x²)^(−2/3)
  });
});

describe('manufacture: bad input', () => {
  it('names the field of a formula that does not parse, with the column', () => {
    expect(() => manufacture({ dim: 2, u: 'sin(pi*x' }, { u: 'exact' })).toThrow(/^exact: cannot parse .*column 9/);
    expect(() => manufacture({ dim: 2, u: 'x', k: '1 +* x' }, { k: 'coefficients.k' })).toThrow(/coefficients\.k/);
  });
  it('refuses unknown symbols and coordinates beyond the dimension', () => {
    expect(() => manufacture({ dim: 2, u: 'x*t' }, 'exact')).toThrow(RungsInputError);
    expect(() => manufacture({ dim: 2, u: 'x*t' }, 'exact')).toThrow(/exact\.u: .*"t".*valid: variables x, y; constants pi, e/);
    expect(() => manufacture({ dim: 1, u: 'x + y' })).toThrow(/"y".*valid: variables x;/);
    expect(() => manufacture({ dim: 2, u: 'x', c: 'z' }, { c: 'coefficients.c' })).toThrow(/^coefficients\.c: /);
  });
  it('refuses a b with the wrong number of components and a bad dimension', () => {
    expect(() => manufacture({ dim: 2, u: 'x', b: ['1'] }, 'exact')).toThrow(/exact\.b: expected 2 formula/);
    expect(() => manufacture({ dim: 4 as 1, u: 'x' })).toThrow(/dimension must be 1, 2 or 3/);
  });
  it('refuses a source that is NaN inside the bounding box when a box is given', () => {
    // f = −2 + x² log(x − 0.5): log of a negative number is NaN (IEEE 754), so f is NaN for x < 0.5.
    let message = '';
    try {
      manufacture({ dim: 1, u: 'x^2', c: 'log(x - 0.5)' }, 'exact', { box: [[0, 1]] });
    } catch (err) {
      expect(err).toBeInstanceOf(RungsInputError);
      message = (err as Error).message;
    }
    expect(message).toMatch(/^source term f derived from exact\.u is NaN at \(x=/);
    const x = Number(/x=([0-9.e-]+)/.exec(message)?.[1]);
    expect(x).toBeLessThan(0.5);
    // Without the bad region the same solution is accepted.
    expect(() => manufacture({ dim: 1, u: 'x^2', c: 'log(x - 0.5)' }, 'exact', { box: [[0.6, 1]] })).not.toThrow();
  });
});
