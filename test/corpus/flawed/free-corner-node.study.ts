// Flaw: the Dirichlet vertex at the tile's corner (1, 1) is left as an unknown (not eliminated), so its row is the
// Galerkin equation of a natural boundary condition with zero flux. Its residual is the dropped boundary flux
// ∫ k∂u/∂n φ ds ≈ h·(∂u/∂x + ∂u/∂y)(1, 1)/2 ≠ 0 for this u, against stiffness entries of O(1): the corner value is
// off by O(h). Ceramic tile, invented data.
import { defineStudy, rectangle, custom, type LevelContext } from 'rungs';
import { handP1 } from '../helpers/hand-p1.ts';
import type { Predicted } from '../helpers/predicted.ts';

export const predicted: Predicted = {
  maxNodal: {
    verdict: 'below-order',
    why: 'the corner value is off by O(h) (residual O(h) over diagonal O(1)): largest nodal error of order 1 instead ' +
      'of 2 (common practice, no source)',
  },
  L2: {
    verdict: 'on-order',
    why: 'the O(h) error lives on the O(h) patch of one corner node and decays into the corner: adds O(h)·O(h) = O(h²) ' +
      '(common practice, no source)',
  },
  H1semi: { verdict: 'on-order', why: 'a gradient error O(1) on an area O(h²) adds O(h), the order of the method (common practice, no source)' },
};

export default defineStudy({
  name: 'corpus-flaw-free-corner-node',
  description: 'Hand-written P1 with the Dirichlet node at (1, 1) not eliminated: must fall below order in the nodal error.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(x) * sin(2*y) + x*y',
  discretization: custom({
    label: 'hand P1, corner node left free',
    degree: 1,
    solve: (level: LevelContext) => handP1(level, { freeVertex: (x, y) => x === 1 && y === 1 }),
  }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi', 'maxNodal'],
  expect: { verdict: 'below-order', flaw: 'a Dirichlet node not eliminated' },
});
