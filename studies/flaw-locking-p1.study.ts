// Demonstration of a flaw: a rubber-like gasket pad clamped between two kiln tiles (top and bottom edges held, the
// sides free), nearly incompressible (λ/μ = 1e4, Poisson's ratio 0.49995), solved with vector linear triangles in
// displacement form. The displacement elements lock: the discrete divergence-free fields are too few to follow the
// nearly divergence-free displacement, the error constant grows with λ (Babuška & Suri 1992, Numer. Math. 62), and
// on these meshes the displacement errors hardly fall (measured L2_u 0.100 → 0.061 from n = 4 to 64, 560 times its
// interpolation error at n = 64). The rates come back only for h well below √(μ/λ) = 0.01 (measured: pairwise L2_u
// rates 0.86, 1.19, 1.55 from n = 64 to 512). The energy norm (∫ 2μ ε:ε + λ (∇·e)²)^(1/2) keeps its order and its
// Céa ratio (0.79–0.85): Galerkin is optimal in it, and the interpolant's own energy error already carries the
// factor √λ. Invented demo data, dimensionless. pad-mixed-p2 solves the same pad without locking.
import { defineStudy, rectangle, lagrange, linearElasticity } from 'rungs';

export default defineStudy({
  name: 'flaw-locking-p1',
  description: 'Vector P1 displacement elasticity at λ/μ = 1e4 (gasket pad between tiles): locks, must fall below order.',
  domain: rectangle([0, 1], [0, 1], { diagonal: 'right' }),
  pde: linearElasticity({ lambda: 1e4, mu: 1 }),
  // A divergence-free shear (the curl of 0.1 sin(πx) sin(πy)) plus a compressible part of size 10/λ, so that the
  // pressure −λ∇·u = −10 (eˣ + eʸ) stays of order one as in a squeezed rubber pad.
  exact: { u: ['0.1*pi*sin(pi*x)*cos(pi*y) + 0.001*x*exp(y)', '-0.1*pi*cos(pi*x)*sin(pi*y) + 0.001*y*exp(x)'] },
  boundary: { dirichlet: { u: ['bottom', 'top'] }, neumann: { momentum: ['left', 'right'] } },
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [4, 8, 16, 32, 64] },
  norms: ['L2_u', 'H1semi_u', 'energy'],
  expect: { verdict: 'below-order', flaw: 'P1 displacement elements lock when the material is nearly incompressible' },
  // The same ladder at λ/μ = 1 and 1e4 (Poisson's ratio 0.25 and 0.49995): the error constant must grow toward the
  // incompressible limit, and it does.
  sweep: { coefficient: 'lambda', values: [1, 1e4], expect: 'not-robust' },
});
