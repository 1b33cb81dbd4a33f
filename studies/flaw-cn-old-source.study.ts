// Demonstration of a flaw: a kiln-rod heat code in plain Python (examples/external/rod_heat.py) whose Crank–Nicolson
// step takes the source at the old time level only, Δt·F(t_n) instead of Δt·(F(t_n) + F(t_(n+1)))/2, a slip that
// leaves a steady study untouched. rungs hands it Δt through {steps} and {T} and the source with t in the generated
// data, reads its temperature at the final time from VTK and finds order 1 in Δt instead of 2. Invented data.
import { defineStudy, interval, heat, external } from 'rungs';

export default defineStudy({
  name: 'flaw-cn-old-source',
  description: 'Crank–Nicolson with the source at the old time level (a Python code): first order in time, must be caught.',
  domain: interval(0, 1),
  pde: heat({ k: '1 + x/2' }),
  exact: 'sin(pi*x)*(1 + t*t) + x*t',
  boundary: { dirichlet: ['left', 'right'] },
  discretization: external({
    command: 'python3 examples/external/rod_heat.py --method cn --flaw old-time-source --degree 2 --n {n} --steps {steps} --T {T} --data {data} --out {out}',
    output: 'vtk',
    field: 'temperature',
    degree: 2,
    timeoutSeconds: 60,
    label: 'rod_heat.py (P2, Crank–Nicolson, source at the old time level)',
  }),
  time: { final: 1, order: 2 },
  ladder: { n: [64], steps: [8, 16, 32] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'Crank–Nicolson source evaluated at the old time level' },
});
