// Heat in a ceramic tile solved by a small C code (examples/external/c/tile_p1.c), compiled per level against the
// rungs_data.h that rungs generates for this study: the source, the Neumann flux and the conductivity are never typed
// by hand. rungs integrates the errors of the solver's VTK output itself. Invented data.
import { defineStudy, rectangle, external } from 'rungs';

export default defineStudy({
  name: 'tile-c',
  description: 'P1 triangles in C99, built against the generated header; rungs integrates the errors of its VTK output.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(-x)*sin(3*y) + x*y',
  coefficients: { k: '1 + 0.25*x*y' },
  boundary: { dirichlet: ['left', 'right', 'bottom'], neumann: ['top'] },
  discretization: external({
    command: 'sh examples/external/c/run.sh {data} {n} {out} left right bottom',
    output: 'vtk',
    degree: 1,
    timeoutSeconds: 120,
    label: 'tile_p1.c (P1, Jacobi-preconditioned CG)',
  }),
  ladder: { n: [4, 8, 16, 32, 64] },
  norms: ['L2', 'H1semi', 'energy'],
});
