// Sound, in an external code: the Python tile solver (examples/external/tile_solver.py) with the source evaluated h²/2 to the right (an O(h²) load perturbation)
// (test/corpus/helpers/tile_mutant.py, mutation source-shift-h2). Ceramic tile, invented data.
import { defineStudy, rectangle, external } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'the load moves by O(h²) in L2, hence the solution by O(h²) in H1 (Strang 1972, first lemma): O(h²) in L2 and O(h) in H1 (Brenner & Scott 2008, Thm 5.4.8)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-py-source-shift-h2',
  description: 'Python P1 tile solver, the source evaluated h²/2 to the right (an O(h²) load perturbation): must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(x) * sin(2*y) + x*y',
  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },
  discretization: external({
    command: 'python3 test/corpus/helpers/tile_mutant.py source-shift-h2 --n {n} --data {data} --out {out} --write vtk',
    output: 'vtk', degree: 1, timeoutSeconds: 120, label: 'tile_solver.py, source-shift-h2',
  }),
  ladder: { n: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
