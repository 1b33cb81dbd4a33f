// A ceramic tile warming in a kiln: the kiln air around it warms along a ramp while the tile's initial hot spot
// spreads. rungs's own linear triangles with Crank–Nicolson on a coupled path Δt = h/2: with p = q = 2 in L2 the
// two errors shrink together, and one fit in h shows order 2 in L2 and 1 in the H1 seminorm. Invented demo data.
import { defineStudy, rectangle, heat, lagrange } from 'rungs';

export default defineStudy({
  name: 'tile-heat-cn',
  description: 'Linear triangles on a tile warming in a kiln, Crank–Nicolson, coupled path Δt = h/2.',
  domain: rectangle([0, 1], [0, 1]),
  pde: heat({ k: 1 }),
  exact: 'exp(-t)*sin(pi*x)*sin(pi*y) + (x + y)*t/2',
  boundary: { dirichlet: ['left', 'right', 'bottom', 'top'] },
  discretization: lagrange({ degree: 1 }),
  time: { final: 0.5, stepper: 'crank-nicolson' },
  ladder: { n: [4, 8, 16, 32], coupled: { c: 0.5, exponent: 1 } },
  norms: ['L2', 'H1semi', 'L2_H1'],
});
