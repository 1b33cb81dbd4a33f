// Flaw: a custom solver stops unpreconditioned CG at relative residual 1e-3, whatever the mesh. The algebraic
// error it leaves does not shrink with h while the discretization error does. Ceramic tile, invented data.
import { defineStudy, rectangle, custom, type LevelContext } from 'rungs';
import { handP1 } from '../helpers/hand-p1.ts';
import type { Predicted } from '../helpers/predicted.ts';

export const predicted: Predicted = {
  L2: {
    verdict: 'below-order',
    why: 'relative residual 1e-3 bounds the relative algebraic error only by κ·1e-3 with κ = O(h⁻²) for the P1 ' +
      'stiffness matrix (Golub & Van Loan 2013, §2.6 perturbation bound; Brenner & Scott 2008, §9.6 conditioning): an ' +
      'error that does not fall with h swamps the O(h²) discretization error from the first levels on',
  },
  // H1semi is measured but not predicted: the same bound (√κ·1e-3 = O(h⁻¹·1e-3) relative, in energy) is of the size
  // of the O(h) discretization error on this ladder, so theory does not say which one dominates.
};

export default defineStudy({
  name: 'corpus-flaw-loose-cg',
  description: 'Hand-written P1 whose own CG stops at relative residual 1e-3: must fall below order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * sin(pi*y) + x*y',
  discretization: custom({
    label: 'hand P1, CG without preconditioner to relative residual 1e-3',
    degree: 1,
    solve: (level: LevelContext) => handP1(level, { solver: { method: 'cg', preconditioner: 'none', relTol: 1e-3 } }),
  }),
  ladder: { n: [8, 16, 32, 64, 128] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'custom solver stopping at relative residual 1e-3' },
});
