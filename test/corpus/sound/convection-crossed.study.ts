// Sound: the convection-sign flaw's custom solve with b as it should be, on crossed (four triangles per square)
// meshes and another exact solution. Kiln rod, invented data.
import { defineStudy, rectangle, custom, solveLagrange, type LevelContext } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'a moderate convection (|b| = O(1), no layers) keeps the Galerkin method quasi-optimal by Gårding’s ' +
  'inequality and Aubin–Nitsche (Brenner & Scott 2008, §5.7 and Thm 5.4.8)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-convection-crossed',
  description: 'P1 with convection of the right sign on crossed meshes: must be on order.',
  domain: rectangle([0, 1], [0, 1], { diagonal: 'crossed' }),
  exact: 'exp(x) * cos(pi*y) + x*y',
  coefficients: { b: [2, 1], k: '1 + x*y' },
  discretization: custom({
    label: 'P1 with convection',
    degree: 1,
    solve(level: LevelContext) {
      const sol = solveLagrange({ mesh: level.mesh, degree: 1, coefficients: level.coefficients, boundary: level.boundary, solver: level.solver });
      return { field: sol.field, solver: sol.solver };
    },
  }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
});
