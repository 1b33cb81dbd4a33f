// A kiln rod heating up, run over a two-axis design: every pair of four meshes and four time steps, so that one
// joint fit e = C_h h^p + C_t Δt^q shows both orders of linear elements with BDF2 (started by one Crank–Nicolson
// step). Invented demo data, dimensionless.
import { defineStudy, interval, heat, lagrange } from 'rungs';

export default defineStudy({
  name: 'kiln-rod-bdf2',
  description: 'Linear elements along a kiln rod heating up, BDF2, every (h, Δt) pair of a 4 × 4 design fitted jointly.',
  domain: interval(0, 1),
  pde: heat({ k: '1 + x/2' }),
  exact: 'sin(pi*x)*cos(2*t) + (1 + x)*(1 - exp(-t))',
  boundary: { dirichlet: ['left', 'right'] },
  discretization: lagrange({ degree: 1 }),
  time: { final: 1, stepper: 'bdf2' },
  ladder: { n: [8, 16, 32, 64], steps: [8, 16, 32, 64], grid: true },
  norms: ['L2'],
});
