// Sound: P1 with the Dirichlet data imposed by a boundary penalty α ∫ (u − g) v ds, α = 1e4/h², instead of
// elimination. Ceramic tile, invented data.
import { defineStudy, rectangle, custom, type LevelContext } from 'rungs';
import { handP1 } from '../helpers/hand-p1.ts';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'the penalty solves the Robin problem ∂u/∂n + α(u − g) = 0, whose solution differs from u by O(1/α) = ' +
  'O(10⁻⁴h²) in H1: below both discretization errors (Babuška 1973, Math. Comp. 27 — recalled from memory)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-penalty-dirichlet',
  description: 'Hand-written P1 with penalty Dirichlet conditions (α = 1e4/h²): must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * cos(y) + x^2',
  discretization: custom({
    label: 'hand P1, penalty Dirichlet',
    degree: 1,
    solve: (level: LevelContext) => handP1(level, { penalty: 1e4 }),
  }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
});
