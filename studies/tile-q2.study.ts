// A square tile meshed in quadrilaterals, with a glaze layer losing heat by a Robin condition. Invented demo data.
import { defineStudy, rectangle, lagrange } from 'rungs';

export default defineStudy({
  name: 'tile-q2',
  description: 'Biquadratic quadrilaterals, reaction term, Robin condition on the top edge.',
  domain: rectangle([0, 1], [0, 1], { cells: 'quadrilaterals' }),
  exact: 'cos(x) * sin(2*y) + 1',
  coefficients: { c: 0.5 },
  boundary: { dirichlet: ['left', 'right', 'bottom'], robin: { tags: ['top'], alpha: 2 } },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [4, 8, 16, 32, 64] },
  norms: ['L2', 'H1semi', 'H1'],
});
