// A tile whose conductivity rises with temperature and which loses heat in proportion to its cube (a crude
// radiation term): steady, nonlinear, solved by Newton's method. Invented demo data, dimensionless.
import { defineStudy, rectangle, lagrange, nonlinearDiffusion } from 'rungs';

export default defineStudy({
  name: 'tile-nonlinear-p2',
  description: 'Quadratic triangles, conductivity 1 + u², reaction u³, Newton; one edge with its heat flux given.',
  domain: rectangle([0, 1], [0, 1]),
  pde: nonlinearDiffusion({ conductivity: '1 + u^2', reaction: 'u^3' }),
  exact: 'sin(pi*x)*cos(0.5*y) + 0.5*x*y',
  boundary: { dirichlet: ['left', 'right', 'bottom'], neumann: ['top'] },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
