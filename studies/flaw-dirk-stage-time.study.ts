// Demonstration of a flaw: the same Python kiln-rod code advancing with Alexander's three-stage DIRK, but every stage
// takes the source at the start of the step, F(t_n), instead of at its own stage time t_n + c_i Δt. Only a source
// that changes in time can reveal it: a time-dependent manufactured solution does. Order 1 in Δt instead of 3.
// Invented data.
import { defineStudy, interval, heat, external } from 'rungs';

export default defineStudy({
  name: 'flaw-dirk-stage-time',
  description: 'A DIRK whose stage sources ignore the stage time (a Python code): loses its order in time, must be caught.',
  domain: interval(0, 1),
  pde: heat({ k: 0.25 }),
  exact: 'sin(pi*x)*(cos(2*t) + 1 - exp(-2*t))',
  boundary: { dirichlet: ['left', 'right'] },
  discretization: external({
    command: 'python3 examples/external/rod_heat.py --method dirk3 --flaw stage-time --degree 2 --n {n} --steps {steps} --T {T} --data {data} --out {out}',
    output: 'vtk',
    field: 'temperature',
    degree: 2,
    timeoutSeconds: 60,
    label: 'rod_heat.py (P2, DIRK3, stage sources at the step start)',
  }),
  time: { final: 1, order: 3 },
  ladder: { n: [64], steps: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'DIRK stage source ignores the stage time' },
});
