// Sound: the same hand-written P1 assembly as the transposed-Jacobian flaw, with the gradients mapped by J⁻ᵀ as
// they should be, on the same kind of perturbed mesh and another exact solution. Ceramic tile, invented data.
import { defineStudy, rectangle, custom, type LevelContext } from 'rungs';
import { handP1 } from '../helpers/hand-p1.ts';
import type { Predicted } from '../helpers/predicted.ts';

export const predicted: Predicted = {
  L2: { verdict: 'on-order', why: 'conforming P1 Galerkin on shape-regular meshes: O(h²) (Brenner & Scott 2008, Thm 5.4.8)' },
  H1semi: { verdict: 'on-order', why: 'Céa’s lemma with interpolation estimates: O(h) (Brenner & Scott 2008, Thm 5.4.8)' },
};

export default defineStudy({
  name: 'corpus-sound-hand-p1-perturbed',
  description: 'Hand-written P1 with J⁻ᵀ on a perturbed mesh: must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'cos(x) * sinh(y) + x^3*y',
  coefficients: { k: '1 + 0.5*x' },
  discretization: custom({ label: 'hand P1', degree: 1, solve: (level: LevelContext) => handP1(level) }),
  ladder: { n: [8, 16, 32, 64], perturb: { fraction: 0.25, seed: 11 } },
  norms: ['L2', 'H1semi'],
});
