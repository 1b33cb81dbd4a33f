// Sound, in an external code: the Python tile solver (examples/external/tile_solver.py) with the solver as it is, run through the mutation wrapper with no mutation
// (test/corpus/helpers/tile_mutant.py, mutation none). Ceramic tile, invented data.
import { defineStudy, rectangle, external } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'conforming P1 Galerkin with an exactly integrated-enough load (degree-5 rule): O(h²) in L2 and O(h) in H1 (Brenner & Scott 2008, Thm 5.4.8)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-py-unchanged',
  description: 'Python P1 tile solver, the solver as it is, run through the mutation wrapper with no mutation: must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'cos(2*x) * exp(y) + x^2*y',
  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },
  discretization: external({
    command: 'python3 test/corpus/helpers/tile_mutant.py none --n {n} --data {data} --out {out} --write vtk',
    output: 'vtk', degree: 1, timeoutSeconds: 120, label: 'tile_solver.py, none',
  }),
  ladder: { n: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
