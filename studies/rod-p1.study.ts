// Heat along a ceramic kiln rod: steady conduction, ends held at the profile's values. Invented demo data.
import { defineStudy, interval, lagrange } from 'rungs';

export default defineStudy({
  name: 'rod-p1',
  description: 'Linear elements along a kiln rod, smooth temperature profile, both ends fixed.',
  domain: interval(0, 1),
  exact: 'exp(-x) * sin(3*x) + x',
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [8, 16, 32, 64, 128, 256] },
  norms: ['L2', 'H1semi', 'maxNodal'],
  // In 1D the P1 Galerkin solution is nodally exact for −u″ = f (Strang & Fix 1973, §1.2): the nodal error
  // sits at quadrature and round-off level, far above order 2.
  expected: { maxNodal: 2 },
  // Those nodal errors fall faster than order 2 and reach round-off after two levels; the study means both.
  allow: {
    aboveOrder: { maxNodal: '1D P1 Galerkin is nodally exact for −u″ = f up to quadrature (Strang & Fix 1973, §1.2)' },
    fewLevels: { maxNodal: 'the nodal error reaches round-off from level 3, so only levels 1–2 carry an order' },
  },
});
