// Heat in a square ceramic tile, solved by a small Python P1 code (examples/external/tile_solver.py) instead of
// rungs's own discretization: rungs runs it once per level, reads its VTK output and integrates the errors itself.
// The solver also reports two quantities of interest, verified by Richardson extrapolation and the GCI. Invented.
import { defineStudy, rectangle, external } from 'rungs';

export default defineStudy({
  name: 'tile-python-vtk',
  description: 'P1 triangles in plain Python; rungs integrates the errors of its VTK output.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * sinh(pi*y) / sinh(pi) + x*(1 - x)/2',
  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },
  discretization: external({
    command: 'python3 examples/external/tile_solver.py --n {n} --data {data} --out {out} --write vtk --quantities',
    output: 'vtk',
    degree: 1,
    timeoutSeconds: 60,
    label: 'tile_solver.py (P1, banded Cholesky)',
  }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
  quantities: ['mean_temperature', 'flux_top'],
});
