// Heat spreading in a glazed ceramic tile whose conductivity rises towards one corner. Invented demo data.
import { defineStudy, rectangle, lagrange } from 'rungs';

export default defineStudy({
  name: 'tile-p1',
  description: 'Linear triangles, variable conductivity, mixed Dirichlet and Neumann edges.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * cosh(y) + x*y',
  coefficients: { k: '1 + 0.5*x*y' },
  boundary: { dirichlet: ['left', 'bottom', 'right'], neumann: ['top'] },
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [8, 16, 32, 64, 128] },
  norms: ['L2', 'H1semi', 'energy'],
});
