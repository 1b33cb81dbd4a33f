// A linear-in-each-direction temperature that the quadratic space contains: every error must sit at round-off.
import { defineStudy, rectangle, lagrange } from 'rungs';

export default defineStudy({
  name: 'tile-exact',
  description: 'Quadratic triangles reproduce a quadratic temperature exactly (verdict exact).',
  domain: rectangle([0, 1], [0, 2]),
  exact: '20 + 3*x - 2*y + x*y + 0.5*x^2',
  coefficients: { k: 1.5 },
  boundary: { dirichlet: ['left', 'right', 'bottom'], neumann: ['top'] },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [2, 4, 8, 16] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'exact' },
});
