// The tile again, on jittered meshes, so that no structured-mesh superconvergence flatters the orders. Invented.
import { defineStudy, rectangle, lagrange } from 'rungs';

export default defineStudy({
  name: 'tile-p3-perturbed',
  description: 'Cubic triangles on randomly perturbed meshes (interior nodes moved by up to 0.2 h).',
  domain: rectangle([0, 1], [0, 1], { diagonal: 'alternating' }),
  exact: 'sin(2*x + 1) * exp(y)',
  coefficients: { k: 2 },
  discretization: lagrange({ degree: 3 }),
  ladder: { n: [2, 4, 8, 16, 32], perturb: { fraction: 0.2, seed: 7 } },
  norms: ['L2', 'H1semi'],
});
