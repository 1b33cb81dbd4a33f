// Steady heat in a kiln brick: quadratic tetrahedra on a box, conductivity rising towards the hot face, heat flux
// given on the hot face. Invented demo data.
import { defineStudy, box, lagrange } from 'rungs';

export default defineStudy({
  name: 'kiln-brick-p2',
  description: 'Quadratic tetrahedra in a 2×1×1 brick (Kuhn cut of each cube), variable conductivity, Neumann hot face.',
  domain: box([0, 2], [0, 1], [0, 1]),
  exact: 'exp(-0.5*x) * sin(2*y) * cos(z) + x*z',
  coefficients: { k: '1 + 0.5*z' },
  boundary: { dirichlet: ['left', 'right', 'bottom', 'top', 'front'], neumann: ['back'] },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [2, 3, 4, 6, 8] },
  norms: ['L2', 'H1semi', 'energy'],
});
