// Flaw, in an external code: the Python tile solver (examples/external/tile_solver.py) with its source evaluated
// half a cell (h/2 = 0.5/n) to the right of each quadrature point, applied by test/corpus/helpers/tile_mutant.py.
// The load is then f + (h/2)∂f/∂x + O(h²): a consistency error of O(h). Ceramic tile, invented data.
import { defineStudy, rectangle, external } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

export const predicted: Predicted = {
  L2: {
    verdict: 'below-order',
    why: 'u_h − u ≈ (h/2)·w with −Δw = ∂f/∂x, w = 0 on the boundary (w ≠ 0 here): O(h) instead of O(h²) (Strang 1972, ' +
      'first lemma: the load perturbation is O(h) in H⁻¹)',
  },
  H1semi: { verdict: 'on-order', why: 'the same O(h) perturbation is of the order of the P1 gradient error (common practice, no source)' },
};

export default defineStudy({
  name: 'corpus-flaw-py-source-half-cell',
  description: 'Python P1 tile solver with the source shifted by half a cell: must fall below order in L2.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(x) * sin(2*y) + x*y',
  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },
  discretization: external({
    command: 'python3 test/corpus/helpers/tile_mutant.py source-half-cell --n {n} --data {data} --out {out} --write vtk',
    output: 'vtk', degree: 1, timeoutSeconds: 120, label: 'tile_solver.py, source at x + h/2',
  }),
  ladder: { n: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'source shifted by half a cell' },
});
