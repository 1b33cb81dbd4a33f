// Flaw: the H1 error is measured against the gradient of the nodal interpolant I_h u instead of ∇u. The field
// below reports u_h's values but a gradient ∇u − ∇(u_h − I_h u), so the harness integrates |∇u_h − ∇I_h u|²:
// exactly the number a code prints when its error routine takes ∇(I_h u) as the "exact" gradient.
// Kiln rod cross-section, invented data.
import { defineStudy, rectangle, custom, solveLagrange, interpolate, lagrangeField, type DiscreteField, type LevelContext } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

export const predicted: Predicted = {
  H1semi: {
    verdict: 'above-order',
    why: 'P1 Galerkin solution and interpolant are superclose on uniform three-direction meshes: ‖∇(u_h − I_h u)‖ = O(h²) ' +
      'instead of the O(h) of ‖∇(u − u_h)‖ (Zlámal 1977; Wahlbin 1995, LNM 1605 — recalled from memory)',
  },
  L2: { verdict: 'on-order', why: 'values are u_h itself: O(h²) by Aubin–Nitsche (Brenner & Scott 2008, Thm 5.4.8)' },
};

function againstInterpolant(level: LevelContext): DiscreteField {
  const sol = solveLagrange({ mesh: level.mesh, degree: 1, coefficients: level.coefficients, boundary: level.boundary, solver: level.solver });
  const ih = lagrangeField(sol.space, interpolate(sol.space, level.exact.u));
  const { mesh } = level;
  let tmpV = new Float64Array(0), tmpG = new Float64Array(0);
  const g = new Float64Array(3);
  return {
    mesh, nDofs: sol.field.nDofs, degree: 1, nodes: sol.field.nodes,
    evaluate(c, pts, n, values, grads) {
      if (tmpV.length < n) { tmpV = new Float64Array(n); tmpG = new Float64Array(2 * n); }
      sol.field.evaluate(c, pts, n, values, grads);
      ih.evaluate(c, pts, n, tmpV, tmpG);
      const v0 = mesh.cells[3 * c], v1 = mesh.cells[3 * c + 1], v2 = mesh.cells[3 * c + 2];
      const X = mesh.coords;
      for (let p = 0; p < n; p++) {
        const xi = pts[2 * p], eta = pts[2 * p + 1];
        const x = X[2 * v0] + xi * (X[2 * v1] - X[2 * v0]) + eta * (X[2 * v2] - X[2 * v0]);
        const y = X[2 * v0 + 1] + xi * (X[2 * v1 + 1] - X[2 * v0 + 1]) + eta * (X[2 * v2 + 1] - X[2 * v0 + 1]);
        level.exact.grad(x, y, 0, g);
        for (let d = 0; d < 2; d++) grads[2 * p + d] = g[d] - (grads[2 * p + d] - tmpG[2 * p + d]);
      }
    },
  };
}

export default defineStudy({
  name: 'corpus-flaw-interpolant-gradient',
  description: 'P1, H1 error taken against the interpolant’s gradient: must look superconvergent in H1.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(x) * sin(2*y) + x*y',
  discretization: custom({
    label: 'P1, H1 error against ∇(I_h u)',
    degree: 1,
    solve: (level: LevelContext) => ({ field: againstInterpolant(level) }),
  }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'above-order', flaw: 'H1 error measured against the interpolant’s gradient' },
});
