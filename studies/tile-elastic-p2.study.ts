// A ceramic tile held along two edges and loaded on the others: small displacements of a tile whose shear modulus
// grows across it (a graded glaze layer). Invented demo data, dimensionless.
import { defineStudy, rectangle, lagrange, linearElasticity } from 'rungs';

export default defineStudy({
  name: 'tile-elastic-p2',
  description: 'Vector quadratic triangles for linear elasticity, graded shear modulus, held left and bottom, traction right and top.',
  domain: rectangle([0, 1], [0, 1], { diagonal: 'alternating' }),
  pde: linearElasticity({ lambda: 2, mu: '1 + 0.5*x' }),
  exact: { u: ['0.1*sin(pi*x)*y^2 + 0.05*x', '0.05*x*cos(y) + 0.02*x*y'] },
  boundary: { dirichlet: { u: ['left', 'bottom'] }, neumann: { momentum: ['right', 'top'] } },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [4, 8, 16, 32, 64] },
  norms: ['L2_u', 'H1semi_u', 'energy'],
});
