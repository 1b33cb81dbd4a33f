// Route 3 of docs/verify-your-discretization.md: an external code in any language, run once per level. The solver,
// kiln_rod_solver.py, sits next to this file: "./kiln_rod_solver.py" is resolved against this file's folder, so the
// study runs from any folder. rungs reads its VTK output and integrates the errors itself. Invented data.
import { defineStudy, interval, external } from 'rungs';

export default defineStudy({
  name: 'guide-kiln-rod-python',
  description: 'Linear elements along a kiln rod in plain Python; rungs measures its VTK output.',
  domain: interval(0, 1),
  exact: 'exp(-x) * sin(3*x) + x',
  coefficients: { k: '1 + x/2' },
  discretization: external({
    command: 'python3 ./kiln_rod_solver.py --n {n} --data {data} --out {out}',
    output: 'vtk',
    degree: 1,
    timeoutSeconds: 120,
    label: 'kiln_rod_solver.py (P1, Thomas algorithm)',
  }),
  ladder: { n: [8, 16, 32, 64, 128] },
  norms: ['L2', 'H1semi'],
});
