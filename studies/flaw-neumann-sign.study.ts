// Demonstration of a flaw: a discretization of our own that adds the Neumann flux with the wrong sign, as a
// hand-written assembly might. The discrete problem is then not the PDE: the errors stop falling.
import { defineStudy, rectangle, custom, solveLagrange, type LevelContext } from 'rungs';

export default defineStudy({
  name: 'flaw-neumann-sign',
  description: 'P1 with the Neumann boundary term subtracted instead of added: must fall below order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'cos(x) * exp(y)',
  boundary: { dirichlet: ['left', 'bottom'], neumann: ['right', 'top'] },
  discretization: custom({
    label: 'P1, Neumann term with the wrong sign',
    degree: 1,
    solve(level: LevelContext) {
      const flux = level.boundary.neumann!.flux;
      const wrong = { ...level.boundary, neumann: { tags: level.boundary.neumann!.tags, flux: (x: number, y: number, z: number, nx: number, ny: number, nz: number) => -flux(x, y, z, nx, ny, nz) } };
      const sol = solveLagrange({ mesh: level.mesh, degree: 1, coefficients: level.coefficients, boundary: wrong, solver: level.solver });
      return { field: sol.field, solver: sol.solver };
    },
  }),
  ladder: { n: [4, 8, 16, 32, 64] },
  norms: ['L2', 'H1semi', 'energy'],
  expect: { verdict: 'below-order', flaw: 'wrong sign in the Neumann term' },
});
