// The same Python tile solver, this time measuring its own errors and writing them to errors.json: rungs only
// fits and judges them. This is the protocol for any code that can compute its own error norms. Invented scenario.
import { defineStudy, rectangle, external } from 'rungs';

export default defineStudy({
  name: 'tile-python-errors',
  description: 'P1 triangles in plain Python, errors measured by the solver itself (errors.json protocol).',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * sinh(pi*y) / sinh(pi) + x*(1 - x)/2',
  discretization: external({
    command: 'python3 examples/external/tile_solver.py --n {n} --data {data} --out {out} --write errors',
    output: 'errors',
    degree: 1,
    timeoutSeconds: 60,
  }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
