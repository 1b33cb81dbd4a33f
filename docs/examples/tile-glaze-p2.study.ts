// Route 1 of docs/verify-your-discretization.md: rungs's own elements. A glazed ceramic tile, 2 × 1, heated from
// below; its conductivity rises towards the glazed corner and the top edge loses heat through a given flux.
// Invented data.
import { defineStudy, rectangle, lagrange } from 'rungs';

export default defineStudy({
  name: 'guide-tile-glaze-p2',
  description: 'Quadratic triangles on a glazed tile, variable conductivity, flux on the top edge.',
  domain: rectangle([0, 2], [0, 1]),
  exact: 'exp(-x/2) * cos(2*y) + x*y/4',
  coefficients: { k: '1 + 0.5*x*y' },
  boundary: { dirichlet: ['left', 'right', 'bottom'], neumann: ['top'] },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
