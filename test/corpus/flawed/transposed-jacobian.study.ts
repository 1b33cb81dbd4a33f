// Flaw: a hand-written P1 assembly maps the reference gradients with J⁻¹ instead of J⁻ᵀ. On a perturbed mesh (and
// already on the structured one, whose cells have non-symmetric J) the computed gradients are wrong by O(1) on
// every cell: the stiffness matrix is that of another operator and the error does not go to zero.
// Ceramic tile, invented data.
import { defineStudy, rectangle, custom, type LevelContext } from 'rungs';
import { handP1 } from '../helpers/hand-p1.ts';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'the stiffness matrix is that of a different (cell-wise anisotropic) operator, so u_h converges to another ' +
  'function or not at all: no consistency, no convergence (Strang 1972, first lemma: the consistency term is O(1))';
export const predicted: Predicted = {
  L2: { verdict: 'below-order', why },
  H1semi: { verdict: 'below-order', why },
};

export default defineStudy({
  name: 'corpus-flaw-transposed-jacobian',
  description: 'Hand-written P1 with the inverse Jacobian transposed, on a perturbed mesh: must fall below order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(pi*x) * cos(y) + x^2',
  coefficients: { k: '1 + 0.5*x' },
  discretization: custom({
    label: 'hand P1, J⁻¹ in place of J⁻ᵀ',
    degree: 1,
    solve: (level: LevelContext) => handP1(level, { transposeJacobian: true }),
  }),
  ladder: { n: [8, 16, 32, 64], perturb: { fraction: 0.25, seed: 11 } },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'inverse Jacobian transposed in the gradient map' },
});
