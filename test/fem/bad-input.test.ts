import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { assembleSystem } from '../../src/fem/assemble/system.ts';
import { solveSystem } from '../../src/linalg/index.ts';

// Bad input to the finite element core gives one clear error naming what and where, never a silent NaN.
const mesh = () => rectangleMesh({ x: [0, 1], y: [0, 1], nx: 3, ny: 3, cells: 'triangles' });
const bc = { dirichlet: { tags: ['left', 'right', 'bottom', 'top'], value: () => 0 } };

describe('finite element core bad input', () => {
  it('an inverted cell names the cell and its vertices', () => {
    const m = mesh();
    const c = m.cells; // swap two vertices of cell 4: clockwise, negative Jacobian
    [c[12], c[13]] = [c[13], c[12]];
    expect(() => assembleSystem(lagrangeSpace(m, 1), { f: () => 1 }, bc)).toThrow(/mesh cell 4 \(vertices .*\) is inverted \(negative Jacobian determinant\)/);
  });
  it('a degenerate cell names the cell', () => {
    const m = mesh();
    const [a, b] = [m.cells[0], m.cells[1]];
    m.coords[2 * b] = m.coords[2 * a]; m.coords[2 * b + 1] = m.coords[2 * a + 1];
    expect(() => assembleSystem(lagrangeSpace(m, 1), { f: () => 1 }, bc)).toThrow(/mesh cell 0 .* degenerate \(zero measure\)/);
  });
  it('a non-finite coefficient names the quantity, the point and the cell', () => {
    const k = (x: number) => (x > 0.9 ? Number.NaN : 1);
    expect(() => assembleSystem(lagrangeSpace(mesh(), 2), { k, f: () => 1 }, bc)).toThrow(/conductivity k is NaN at quadrature point \(0\.9\d*, .*\) of cell \d+/);
  });
  it('a boundary tag that does not exist lists the tags there are', () => {
    expect(() => assembleSystem(lagrangeSpace(mesh(), 1), { f: () => 1 }, { dirichlet: { tags: ['rim'], value: () => 0 } }))
      .toThrow(/rim.*left.*right.*bottom.*top/);
  });
  it('a solver that does not converge reports the iteration count and residual', () => {
    const sys = assembleSystem(lagrangeSpace(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 32, ny: 32, cells: 'triangles' }), 1), { f: () => 1 }, bc);
    const { stats } = solveSystem(sys.A, sys.b, { symmetric: true, method: 'cg', preconditioner: 'none', maxIter: 5 });
    expect(stats.converged).toBe(false);
    expect(stats.iterations).toBe(5);
    expect(stats.message).toMatch(/not converged after 5 iterations \(\|\|r\|\|\/\|\|b\|\| = \d\.\d+e[-+]\d+\)/);
  });
});
