// The gasket pad of flaw-locking-p1 (rubber-like, λ/μ = 1e4, clamped between two kiln tiles, sides free) in mixed
// form: displacement u and pressure p = −λ∇·u on Taylor–Hood P2–P1 triangles, which are stable uniformly in λ and do
// not lock (Braess 2007, Finite Elements, ch. VI §3). Same displacement, same mesh; the exact pressure is written
// out from it by hand, so the derived source of the constraint equation ∇·u + p/λ vanishes. Invented demo data,
// dimensionless.
import { defineStudy, rectangle, lagrange, nearlyIncompressibleElasticity } from 'rungs';

export default defineStudy({
  name: 'pad-mixed-p2',
  description: 'Taylor–Hood P2–P1 mixed displacement–pressure elasticity at λ/μ = 1e4: locking-free, on order.',
  domain: rectangle([0, 1], [0, 1], { diagonal: 'right' }),
  pde: nearlyIncompressibleElasticity({ lambda: 1e4, mu: 1 }),
  exact: {
    u: ['0.1*pi*sin(pi*x)*cos(pi*y) + 0.001*x*exp(y)', '-0.1*pi*cos(pi*x)*sin(pi*y) + 0.001*y*exp(x)'],
    // −λ∇·u = −1e4 · 0.001 (eʸ + eˣ). A pressure ten times smaller lets the part of the pressure error driven by the
    // displacement dominate the coarse levels and L2_p comes down to order 2 from above only past n = 32 (measured
    // pairwise rates 2.80, 2.34, 2.10 over n = 4…32).
    p: '-10*(exp(x) + exp(y))',
  },
  boundary: { dirichlet: { u: ['bottom', 'top'] }, neumann: { momentum: ['left', 'right'] } },
  discretization: lagrange({ degree: 2 }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2_u', 'H1semi_u', 'L2_p', 'energy'],
  // λ/μ = 1e2 and 1e6, either side of the pad's 1e4, toward the incompressible limit: the error constant stays bounded
  // (away from λ = 1e4 the constraint equation gets a derived source ∇·u + p/λ ≠ 0, which the solver is handed like
  // any other datum).
  sweep: { coefficient: 'lambda', values: [1e2, 1e6] },
});
