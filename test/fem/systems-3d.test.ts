import { describe, expect, it } from 'vitest';
import { boxMesh } from '../../src/mesh/box.ts';
import { solveElasticity } from '../../src/fem/discretizations/elasticity.ts';
import { solveStokes } from '../../src/fem/discretizations/stokes.ts';
import { vectorLagrangeField } from '../../src/fem/field/vector-field.ts';
import { lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { fieldErrors } from '../../src/norms/field-errors.ts';
import { derive, linearElasticity, stokes } from '../../src/equation/index.ts';
import { systemData } from '../../src/study/discretizations/system-data.ts';

// Orders of rungs's own system discretizations in 3D on smooth manufactured solutions, between the two finest of
// three levels of a box mesh: vector P_k / Q_k elasticity L2 k+1, H1 seminorm k (Braess 2007, ch. VI §1 with the
// interpolation estimates of Brenner & Scott 2008, Thm 4.4.20); Taylor–Hood P2–P1 velocity L2 3, H1 2, pressure L2 2
// (Girault & Raviart 1986, ch. II §4). Small 3D ladders are pre-asymptotic (the pressure in particular falls faster
// than 2 first, as in 2D), so the pressure is required to reach at least 2 − 0.15.
const rate = (a: number, b: number) => Math.log2(a / b);
const elastic = systemData('elastic-3d', derive({
  dim: 3, pde: linearElasticity({ lambda: 2, mu: '1 + 0.5*z' }),
  exact: { u: ['sin(x)*y*z + 0.1*x', 'cos(y)*x - 0.1*z', 'x*y*z + exp(0.3*z)'] },
}));

describe('3D systems', () => {
  it.each([
    ['tetrahedra', 2, [2, 4]],
    ['hexahedra', 2, [2, 4]],
    ['tetrahedra', 3, [1, 2]],
  ] as const)('elasticity on %s, degree %i: L2 order k+1 and H1-seminorm order k, mixed Dirichlet and traction', (cells, k, ns) => {
    const ex = elastic.exact('u');
    const errs = ns.map((n) => {
      const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: n, ny: n, nz: n, cells });
      const sol = solveElasticity({
        mesh, degree: k, lambda: elastic.point('coef_lambda'), mu: elastic.point('coef_mu'), source: elastic.point('source_momentum'),
        dirichlet: { tags: ['left', 'bottom', 'front'], value: ex.value },
        traction: { tags: ['right', 'top', 'back'], value: elastic.normal('flux_momentum') },
      });
      expect(sol.solver.converged).toBe(true);
      return fieldErrors([vectorLagrangeField(sol.space.fields[0].space.scalar, 3, sol.coefficients)], ex)[0];
    });
    expect(Math.abs(rate(errs[0].L2, errs[1].L2) - (k + 1))).toBeLessThan(0.2);
    expect(Math.abs(rate(errs[0].H1semi, errs[1].H1semi) - k)).toBeLessThan(0.1);
  });

  it('Taylor–Hood P2–P1 Stokes on tetrahedra with a mean-free pressure', () => {
    const s = systemData('stokes-3d', derive({
      dim: 3, pde: stokes({ nu: 1 }),
      exact: { u: ['sin(pi*y)*sin(pi*z)', 'sin(pi*x)*sin(pi*z)', 'sin(pi*x)*sin(pi*y)'], p: 'cos(pi*x)*cos(pi*y)*cos(pi*z)' },
    }));
    const errs = [4, 8].map((n) => {
      const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: n, ny: n, nz: n, cells: 'tetrahedra' });
      const sol = solveStokes({
        mesh, degree: 2, nu: s.point('coef_nu'), momentumSource: s.point('source_momentum'), massSource: s.point('source_mass'),
        dirichlet: { tags: mesh.tagNames, value: s.exact('u').value }, pressureMeanFree: true,
      });
      expect(sol.solver.converged).toBe(true);
      const [u] = fieldErrors([vectorLagrangeField(sol.space.fields[0].space.scalar, 3, sol.velocity)], s.exact('u'), { divergence: true });
      const [p] = fieldErrors([lagrangeField(sol.space.fields[1].space.scalar, sol.pressure)], s.exact('p'), { meanFree: true });
      return { u, p };
    });
    expect(Math.abs(rate(errs[0].u.L2, errs[1].u.L2) - 3)).toBeLessThan(0.15);
    expect(Math.abs(rate(errs[0].u.H1semi, errs[1].u.H1semi) - 2)).toBeLessThan(0.1);
    expect(rate(errs[0].p.L2, errs[1].p.L2)).toBeGreaterThan(2 - 0.15);
  });
});
