import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { assertFinite } from '../../src/exact/finite.ts';
import { manufacture } from '../../src/equation/manufactured.ts';

describe('assertFinite', () => {
  it('names a point where log(x − 0.5) is NaN (log of a negative number is NaN, IEEE 754)', () => {
    const fn = manufacture({ dim: 2, u: 'log(x - 0.5) + y' }).u;
    let message = '';
    try {
      assertFinite(fn, 'exact', [[0, 1], [0, 1]], 32);
    } catch (err) {
      expect(err).toBeInstanceOf(RungsInputError);
      expect((err as RungsInputError).where).toBe('exact');
      message = (err as Error).message;
    }
    expect(message).toMatch(/^exact is NaN at \(x=[0-9.]+, y=[0-9.]+\)/);
    const x = Number(/x=([0-9.]+)/.exec(message)?.[1]);
    expect(x).toBeLessThan(0.5);
  });

  it('reports infinities with their sign', () => {
    expect(() => assertFinite(() => -Infinity, 'coefficients.c', [[0, 1]])).toThrow(/^coefficients\.c is -Infinity at \(x=/);
  });

  it('accepts a source singular only on the boundary: u = √x has f = x^(−3/2)/4, infinite at x = 0 alone', () => {
    const s = manufacture({ dim: 1, u: 'sqrt(x)' });
    expect(s.f(0.25, 0, 0)).toBeCloseTo(0.25 * 0.25 ** -1.5, 12);
    expect(() => assertFinite(s.f, 'exact', [[0, 1]], 256)).not.toThrow();
  });

  it('refuses a malformed box', () => {
    expect(() => assertFinite(() => 0, 'exact', [[1, 0]])).toThrow(/low < high/);
    expect(() => assertFinite(() => 0, 'exact', [])).toThrow(/1, 2 or 3/);
  });
});
