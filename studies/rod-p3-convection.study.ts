// A rod carried through a tunnel kiln: conduction, transport along the rod and heat loss to the air. Invented.
import { defineStudy, interval, lagrange } from 'rungs';

export default defineStudy({
  name: 'rod-p3-convection',
  description: 'Cubic elements, convection–reaction term, Dirichlet at the inlet and a flux condition at the outlet.',
  domain: interval(0, 2),
  exact: 'cos(2*x) * exp(x/2)',
  coefficients: { k: '1 + x/4', b: [0.8], c: 1.5 },
  boundary: { dirichlet: ['left'], neumann: ['right'] },
  discretization: lagrange({ degree: 3 }),
  ladder: { n: [2, 4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
