// Sound: P1 with the reaction term c·u lumped (vertex quadrature ∫ c φ_i φ_j ≈ (|T|/3) c(x_i) δ_ij), and Neumann data
// on two sides. Kiln rod cross-section, invented data.
import { defineStudy, rectangle, custom, type LevelContext } from 'rungs';
import { handP1 } from '../helpers/hand-p1.ts';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'the vertex rule is exact for degree 1 = 2k − 1, so the quadrature error of the reaction term keeps both ' +
  'orders (Ciarlet & Raviart 1972; Ciarlet 1978, Thm 4.1.6; lumped mass: Thomée 2006, ch. 15)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-lumped-reaction',
  description: 'Hand-written P1 with a lumped reaction term: must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'exp(-x) * cos(2*y) + x*y',
  coefficients: { c: '3 + x*y' },
  boundary: { dirichlet: ['left', 'bottom'], neumann: ['right', 'top'] },
  discretization: custom({ label: 'hand P1, lumped reaction', degree: 1, solve: (level: LevelContext) => handP1(level, { reaction: 'lumped' }) }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
});
