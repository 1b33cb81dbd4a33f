import { describe, expect, it } from 'vitest';
import { householderLeastSquares } from '../../../src/fem/quadrature/least-squares.ts';

describe('householderLeastSquares (used to refine symmetric triangle tables)', () => {
  it('straight-line fit through (0,0), (1,1), (2,1): intercept 1/6, slope 1/2 (normal equations by hand)', () => {
    const J = Float64Array.of(1, 0, 1, 1, 1, 2);
    const r = Float64Array.of(0, 1, 1);
    const x = householderLeastSquares(J, r, 3, 2)!;
    expect(Math.abs(x[0]! - 1 / 6)).toBeLessThan(1e-15);
    expect(Math.abs(x[1]! - 1 / 2)).toBeLessThan(1e-15);
  });
  it('a consistent overdetermined system is solved exactly', () => {
    const J = Float64Array.of(2, 0, 0, 3, 1, 1);
    const r = Float64Array.of(2, 6, 3);
    const x = householderLeastSquares(J, r, 3, 2)!;
    expect(Math.abs(x[0]! - 1)).toBeLessThan(1e-15);
    expect(Math.abs(x[1]! - 2)).toBeLessThan(1e-15);
  });
  it('dependent columns are reported as null', () => {
    const J = Float64Array.of(1, 2, 2, 4, 3, 6);
    expect(householderLeastSquares(J, Float64Array.of(1, 2, 3), 3, 2)).toBeNull();
  });
});
