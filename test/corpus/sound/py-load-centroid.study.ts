// Sound, in an external code: the Python tile solver (examples/external/tile_solver.py) with the load integrated by the one-point centroid rule
// (test/corpus/helpers/tile_mutant.py, mutation load-centroid). Ceramic tile, invented data.
import { defineStudy, rectangle, external } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'the centroid rule is exact for degree 1 = 2k − 1 (Ciarlet & Raviart 1972; Ciarlet 1978, Thm 4.1.6): O(h²) in L2 and O(h) in H1 (Brenner & Scott 2008, Thm 5.4.8)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-py-load-centroid',
  description: 'Python P1 tile solver, the load integrated by the one-point centroid rule: must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(x) * sin(2*y) + x*y',
  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },
  discretization: external({
    command: 'python3 test/corpus/helpers/tile_mutant.py load-centroid --n {n} --data {data} --out {out} --write vtk',
    output: 'vtk', degree: 1, timeoutSeconds: 120, label: 'tile_solver.py, load-centroid',
  }),
  ladder: { n: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
