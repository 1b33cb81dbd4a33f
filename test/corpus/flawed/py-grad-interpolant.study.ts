// Flaw, in an external code's own error routine: the Python tile solver reports (errors.json) an H1 error measured
// against the gradient of the interpolant of u instead of ∇u (test/corpus/helpers/tile_mutant.py, mutation
// grad-interpolant). Its solution is right; its H1 number is ‖∇(I_h u − u_h)‖. Ceramic tile, invented data.
import { defineStudy, rectangle, external } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

export const predicted: Predicted = {
  H1semi: {
    verdict: 'above-order',
    why: 'P1 Galerkin solution and interpolant are superclose on this uniform three-direction mesh: ‖∇(u_h − I_h u)‖ = ' +
      'O(h²) instead of O(h) (Zlámal 1977; Wahlbin 1995, LNM 1605 — recalled from memory)',
  },
  L2: { verdict: 'on-order', why: 'measured against u itself: O(h²) by Aubin–Nitsche (Brenner & Scott 2008, Thm 5.4.8)' },
};

export default defineStudy({
  name: 'corpus-flaw-py-grad-interpolant',
  description: 'Python P1 tile solver measuring its H1 error against ∇(I_h u): must look superconvergent in H1.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(x) * sin(2*y) + x*y',
  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },
  discretization: external({
    command: 'python3 test/corpus/helpers/tile_mutant.py grad-interpolant --n {n} --data {data} --out {out} --write errors',
    output: 'errors', degree: 1, timeoutSeconds: 120, label: 'tile_solver.py, H1 error against ∇(I_h u)',
  }),
  ladder: { n: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'above-order', flaw: 'H1 error measured against the interpolant’s gradient (external code)' },
});
