// Flaw, in an external code: the Python tile solver adds the Dirichlet lifting K_ab·g_b to the right-hand side
// instead of subtracting it (test/corpus/helpers/tile_mutant.py, mutation lift-sign). Ceramic tile, invented data.
import { defineStudy, rectangle, external } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'the interior equations see boundary data of the wrong sign near the boundary: an O(1) error in the ' +
  'discrete problem that no refinement removes, observed order 0 (Strang 1972, first lemma)';
export const predicted: Predicted = {
  L2: { verdict: 'below-order', why },
  H1semi: { verdict: 'below-order', why },
};

export default defineStudy({
  name: 'corpus-flaw-py-lift-sign',
  description: 'Python P1 tile solver with the Dirichlet lifting of the wrong sign: must fall below order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'cos(2*x) * exp(y) + x^2*y',
  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },
  discretization: external({
    command: 'python3 test/corpus/helpers/tile_mutant.py lift-sign --n {n} --data {data} --out {out} --write vtk',
    output: 'vtk', degree: 1, timeoutSeconds: 120, label: 'tile_solver.py, lifting added',
  }),
  ladder: { n: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'Dirichlet lifting with the wrong sign' },
});
