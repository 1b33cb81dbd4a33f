// A long floor tile warmed from below, insulated top edge given as a heat flux. Invented demo data.
import { defineStudy, rectangle, lagrange } from 'rungs';

export default defineStudy({
  name: 'tile-p2',
  description: 'Quadratic triangles on a 2×1 tile, variable conductivity, Neumann top edge.',
  domain: rectangle([0, 2], [0, 1]),
  exact: 'exp(-x) * sin(3*y) + x*y',
  coefficients: { k: '1 + 0.25*x*y' },
  boundary: { dirichlet: ['left', 'right', 'bottom'], neumann: ['top'] },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [4, 8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
});
