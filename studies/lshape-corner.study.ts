// A tile with a notch: heat flowing round the re-entrant corner of an L-shaped plate. The exact temperature
// u = r^(2/3) sin(2θ/3) is harmonic but its gradient is singular at the corner, so u lies only in H^(1+2/3−ε):
// uniform refinement caps the H1 order at 2/3 and the L2 order at 4/3 for any element degree (Strang & Fix 1973,
// §8.1; Grisvard 1985). The study declares those orders: a correct code must reproduce the cap, not order 1 and 2.
import { defineStudy, lShape, lagrange } from 'rungs';

const theta = (x: number, y: number) => { const t = Math.atan2(y, x); return t < 0 ? t + 2 * Math.PI : t; };

export default defineStudy({
  name: 'lshape-corner',
  description: 'P1 on the L-shape, corner singularity r^(2/3) sin(2θ/3): orders capped at 2/3 (H1) and 4/3 (L2).',
  domain: lShape(),
  exact: {
    u: (x, y) => Math.cbrt(x * x + y * y) * Math.sin((2 / 3) * theta(x, y)),
    // ∇u = (2/3) r^(−1/3) (−sin(θ/3), cos(θ/3)), from u_r and u_θ / r in polar coordinates.
    grad: (x, y, _z, out) => {
      const s = (2 / 3) / Math.cbrt(Math.sqrt(x * x + y * y)), t = theta(x, y) / 3;
      out[0] = -s * Math.sin(t);
      out[1] = s * Math.cos(t);
    },
    f: () => 0,
  },
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [4, 8, 16, 32, 64] },
  norms: ['L2', 'H1semi'],
  expected: { L2: 4 / 3, H1semi: 2 / 3 },
});
