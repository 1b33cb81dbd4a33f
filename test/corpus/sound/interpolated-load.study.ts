// Sound: P1 with the load f replaced by its P1 interpolant I_h f, integrated exactly against φ_i (the mass matrix
// times the nodal values of f). Ceramic tile, invented data.
import { defineStudy, rectangle, custom, type LevelContext } from 'rungs';
import { handP1 } from '../helpers/hand-p1.ts';
import type { Predicted } from '../helpers/predicted.ts';

const why = '‖f − I_h f‖ = O(h²) in L2, hence in H⁻¹, so the solution moves by O(h²) in H1: below both ' +
  'discretization errors (Strang 1972, first lemma; interpolation estimate: Brenner & Scott 2008, Thm 4.4.20)';
export const predicted: Predicted = {
  L2: { verdict: 'on-order', why },
  H1semi: { verdict: 'on-order', why },
};

export default defineStudy({
  name: 'corpus-sound-interpolated-load',
  description: 'Hand-written P1 with the load interpolated into P1 and integrated exactly: must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'sin(3*x) * exp(y) + y^2',
  coefficients: { c: 1 },
  discretization: custom({ label: 'hand P1, interpolated load', degree: 1, solve: (level: LevelContext) => handP1(level, { load: 'interpolated' }) }),
  ladder: { n: [8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
});
