// Demonstration of a flaw: Dirichlet data taken one node along the boundary from where it belongs (an
// off-by-one in a boundary loop). The boundary error is O(h), so the L2 order drops from 2 to 1.
import { defineStudy, rectangle, custom, solveLagrange, type LevelContext } from 'rungs';

export default defineStudy({
  name: 'flaw-dirichlet-node',
  description: 'P1 with each Dirichlet value taken at the neighbouring boundary node: must fall below order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(x) * sin(2*y) + y',
  discretization: custom({
    label: 'P1, Dirichlet value from the wrong node',
    degree: 1,
    solve(level: LevelContext) {
      const g = level.boundary.dirichlet!.value;
      const step = 1 / level.n;
      // Shift along the boundary: on vertical sides move in y, on horizontal sides in x.
      const shifted = (x: number, y: number, z: number) => (x === 0 || x === 1 ? g(x, Math.min(1, y + step), z) : g(Math.min(1, x + step), y, z));
      const boundary = { ...level.boundary, dirichlet: { tags: level.boundary.dirichlet!.tags, value: shifted } };
      const sol = solveLagrange({ mesh: level.mesh, degree: 1, coefficients: level.coefficients, boundary, solver: level.solver });
      return { field: sol.field, solver: sol.solver };
    },
  }),
  ladder: { n: [8, 16, 32, 64, 128] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'Dirichlet value taken at the wrong node' },
});
