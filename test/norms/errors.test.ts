import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { lagrangeField, interpolate } from '../../src/fem/field/lagrange-field.ts';
import { errorNorms } from '../../src/norms/errors.ts';
import { manufacture } from '../../src/equation/index.ts';
import { mapReferencePoint } from '../../src/fem/geometry/map.ts';

describe('error integrals', () => {
  // ∫∫_[0,1]² |u|² for u = sin(πx) sin(πy) is 1/4 and |u|²_H1 = π²/2 (exact integrals).
  it('of the zero field give the exact norms of u', () => {
    const ms = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' });
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 8, cells: 'triangles' });
    const zero = lagrangeField(lagrangeSpace(mesh, 1), new Float64Array(81));
    const e = errorNorms(zero, ms);
    expect(e.L2).toBeCloseTo(0.5, 6);
    expect(e.H1semi).toBeCloseTo(Math.PI / Math.SQRT2, 5);
  });
  it('on a sample of cells estimate the full integral within 10% (used only for solver tolerances)', () => {
    const ms = manufacture({ dim: 2, u: 'exp(x) * sin(3*y)' });
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 64, ny: 64, cells: 'triangles' });
    const sp = lagrangeSpace(mesh, 2);
    const f = lagrangeField(sp, interpolate(sp, ms.u));
    const full = errorNorms(f, ms), sampled = errorNorms(f, ms, { cellStride: 7 });
    for (const k of ['L2', 'H1semi', 'energy'] as const) expect(Math.abs(sampled[k] / full[k] - 1)).toBeLessThan(0.1);
  });
});

describe('the Lagrange field', () => {
  // A Lagrange space of degree k holds every polynomial of degree ≤ k, so its nodal interpolant of one is the
  // polynomial itself: value and gradient exact at any point of any cell (common practice, no source). The P1
  // triangle takes the one-gradient-per-cell path, P2 and quadrilaterals the general one.
  const cases = [
    { degree: 1, cells: 'triangles' as const, u: (x: number, y: number) => 0.3 - 2 * x + 5 * y, g: () => [-2, 5] },
    { degree: 2, cells: 'triangles' as const, u: (x: number, y: number) => x * y - y * y + x, g: (x: number, y: number) => [y + 1, x - 2 * y] },
    { degree: 1, cells: 'quadrilaterals' as const, u: (x: number, y: number) => 1 + x - 3 * y, g: () => [1, -3] },
  ];
  for (const { degree, cells, u, g } of cases) {
    it(`reproduces a polynomial of its degree exactly at arbitrary points: P${degree} on ${cells}`, () => {
      const mesh = rectangleMesh({ x: [0, 2], y: [0, 1], nx: 5, ny: 3, cells });
      const sp = lagrangeSpace(mesh, degree);
      const field = lagrangeField(sp, interpolate(sp, u));
      const ref = new Float64Array([0.1, 0.2, 0.6, 0.3, 0.25, 0.05]); // three reference points inside the cell
      const values = new Float64Array(3), grads = new Float64Array(6);
      const x = new Float64Array(3);
      for (let c = 0; c < mesh.nCells; c++) {
        field.evaluate(c, ref, 3, values, grads);
        for (let p = 0; p < 3; p++) {
          mapReferencePoint(mesh, c, ref, 2 * p, x);
          expect(values[p]).toBeCloseTo(u(x[0], x[1]), 12);
          const [gx, gy] = g(x[0], x[1]);
          expect(grads[2 * p]).toBeCloseTo(gx, 11);
          expect(grads[2 * p + 1]).toBeCloseTo(gy, 11);
        }
      }
    });
  }
});
