// Sound: P1 with the load integrated by the one-point centroid rule (rungs's own assembly with its load quadrature
// degree set to 1), Neumann data on the right and top. The P1 counterpart of the bundled P2 load-quadrature flaw.
// Kiln rod cross-section, invented data.
import { defineStudy, rectangle, custom, solveLagrange, type LevelContext } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'the centroid rule is exact for degree 1 = 2k − 1 when k = 1, which keeps O(h²) in L2 and O(h) in H1 ' +
  '(Ciarlet & Raviart 1972; Ciarlet 1978, Thm 4.1.6)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-centroid-load-p1',
  description: 'P1 with a one-point load quadrature: must be on order.',
  domain: rectangle([0, 1], [0, 1], { diagonal: 'alternating' }),
  exact: 'sin(2*x) * exp(-y) + x^2*y',
  boundary: { dirichlet: ['left', 'bottom'], neumann: ['right', 'top'] },
  discretization: custom({
    label: 'P1, load by the centroid rule',
    degree: 1,
    solve(level: LevelContext) {
      const sol = solveLagrange({ mesh: level.mesh, degree: 1, coefficients: level.coefficients, boundary: level.boundary, quadrature: { load: 1 }, solver: level.solver });
      return { field: sol.field, solver: sol.solver };
    },
  }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
});
