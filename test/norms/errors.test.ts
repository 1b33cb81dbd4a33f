import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { lagrangeField, interpolate } from '../../src/fem/field/lagrange-field.ts';
import { errorNorms } from '../../src/norms/errors.ts';
import { manufacture } from '../../src/exact/index.ts';

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
