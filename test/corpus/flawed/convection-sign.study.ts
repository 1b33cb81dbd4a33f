// Flaw: the convection term assembled with −b instead of b (a sign lost when moving b·∇u to the left-hand side).
// The discrete problem approximates −∇·(k∇w) − b·∇w = f, whose solution w is not u. Kiln rod, invented data.
import { defineStudy, rectangle, custom, solveLagrange, type LevelContext } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'u_h converges to the solution of another PDE, so the error tends to ‖u − w‖ > 0: observed order 0 ' +
  '(consistency is necessary for convergence; Strang 1972, first lemma)';
export const predicted: Predicted = {
  L2: { verdict: 'below-order', why },
  H1semi: { verdict: 'below-order', why },
};

export default defineStudy({
  name: 'corpus-flaw-convection-sign',
  description: 'P1 with the convection velocity negated: must fall below order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * exp(y) + y^2',
  coefficients: { b: [2, 1] },
  discretization: custom({
    label: 'P1, convection with −b',
    degree: 1,
    solve(level: LevelContext) {
      const b = level.coefficients.b!;
      const minus = (x: number, y: number, z: number, out: Float64Array) => { b(x, y, z, out); for (let d = 0; d < 2; d++) out[d] = -out[d]; };
      const sol = solveLagrange({ mesh: level.mesh, degree: 1, coefficients: { ...level.coefficients, b: minus }, boundary: level.boundary, solver: level.solver });
      return { field: sol.field, solver: sol.solver };
    },
  }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'convection term with the wrong sign' },
});
