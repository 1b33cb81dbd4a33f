// Flaw, in an external code: the Python tile solver with an off-by-one in its assembly loop (`for tri in
// tris[:-1]`), applied by test/corpus/helpers/tile_mutant.py: the last triangle, (1−h, 1−h), (1, 1), (1−h, 1), is never
// assembled. Its one free vertex (1−h, 1−h) loses the term ∫_T ∇u·∇φ ≈ −(h/2)·∂u/∂y(1, 1) ≠ 0 for this u, against
// stiffness entries of O(1). Ceramic tile, invented data.
import { defineStudy, rectangle, external } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

export const predicted: Predicted = {
  maxNodal: {
    verdict: 'below-order',
    why: 'the value at (1−h, 1−h) is off by O(h) (residual O(h) over diagonal O(1)): largest nodal error of order 1 ' +
      'instead of 2 (common practice, no source)',
  },
  L2: {
    verdict: 'on-order',
    why: 'an O(h) error on an O(h) patch at the corner adds O(h²) (common practice, no source); on this short ladder the ' +
      'O(h²) terms of the corner residual still count, so the L2 fit may sit near the band’s edge (not asserted)',
  },
  H1semi: { verdict: 'on-order', why: 'a gradient error O(1) on an area O(h²) adds O(h), the order of the method (common practice, no source)' },
};

export default defineStudy({
  name: 'corpus-flaw-py-skip-last-cell',
  description: 'Python P1 tile solver whose assembly loop skips the last triangle: must fall below order in the nodal error.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(x) * sin(2*y) + x*y',
  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },
  discretization: external({
    command: 'python3 test/corpus/helpers/tile_mutant.py skip-last-cell --n {n} --data {data} --out {out} --write vtk',
    output: 'vtk', degree: 1, timeoutSeconds: 120, label: 'tile_solver.py, last triangle skipped',
  }),
  ladder: { n: [16, 32, 64] },
  norms: ['L2', 'H1semi', 'maxNodal'],
  expect: { verdict: 'below-order', flaw: 'a skipped cell in assembly' },
});
