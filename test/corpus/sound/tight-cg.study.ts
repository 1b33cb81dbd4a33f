// Sound: the loose-CG flaw's custom solver with a tolerance that is small enough: unpreconditioned CG to relative
// residual 1e-10. Ceramic tile, invented data.
import { defineStudy, rectangle, custom, type LevelContext } from 'rungs';
import { handP1 } from '../helpers/hand-p1.ts';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'algebraic error ≤ κ·1e-10 relative with κ = O(h⁻²) ≈ 1e4 here: far below the discretization error ' +
  '(Golub & Van Loan 2013, §2.6), so the Galerkin orders show (Brenner & Scott 2008, Thm 5.4.8)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-tight-cg',
  description: 'Hand-written P1 whose own CG stops at relative residual 1e-10: must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * sin(pi*y) + x*y',
  discretization: custom({
    label: 'hand P1, CG without preconditioner to relative residual 1e-10',
    degree: 1,
    solve: (level: LevelContext) => handP1(level, { solver: { method: 'cg', preconditioner: 'none', relTol: 1e-10 } }),
  }),
  ladder: { n: [8, 16, 32, 64, 128] },
  norms: ['L2', 'H1semi'],
});
