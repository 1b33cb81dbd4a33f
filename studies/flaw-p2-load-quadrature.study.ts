// Demonstration of a flaw: the tile's quadratic elements with the load integrated by the one-point (centroid)
// rule. The consistency error of the load caps the L2 order at 2 instead of 3 (Ciarlet 1978, §4.1).
import { defineStudy, rectangle, lagrange } from 'rungs';

export default defineStudy({
  name: 'flaw-p2-load-quadrature',
  description: 'P2 with a one-point quadrature for the load vector: must fall below order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * sin(pi*y) * exp(x)',
  discretization: lagrange({ degree: 2, quadrature: { load: 1 }, label: 'P2, load by the centroid rule' }),
  ladder: { n: [4, 8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'P2 with a one-point load quadrature' },
});
