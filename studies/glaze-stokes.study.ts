// Molten glaze creeping in a square cell of a kiln tray: Stokes flow with walls all round, the pressure fixed by
// its mean. Invented demo data, dimensionless.
import { defineStudy, rectangle, lagrange, stokes } from 'rungs';

export default defineStudy({
  name: 'glaze-stokes',
  description: 'Taylor–Hood P2–P1 on triangles, divergence-free velocity from a stream function, mean-free pressure.',
  domain: rectangle([0, 1], [0, 1]),
  pde: stokes({ nu: 1 }),
  exact: {
    u: ['pi*sin(pi*x)^2*sin(2*pi*y)', '-pi*sin(2*pi*x)*sin(pi*y)^2'],
    // The pressure scale is chosen so that its own best-approximation error in P1 (O(h²)) dominates early: with a
    // pressure ten times smaller, the part of the discrete pressure error driven by the velocity (which falls
    // faster) dominates the coarse levels and the rates come down to 2 only below h = 1/64 (measured: 3.6, 3.4,
    // 2.6, 2.1 over n = 4…64).
    p: '10*cos(pi*x)*cos(pi*y)',
  },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2_u', 'H1semi_u', 'L2_p'],
});
