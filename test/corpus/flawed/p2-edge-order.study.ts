// Flaw: a P2 dof map that writes each cell's edge dofs into the wrong local slots (edge 0–1's dof where edge 1–2's
// belongs, and so on round the triangle). Neighbouring cells then disagree about which global unknown sits on
// their shared edge: the "space" is not continuous and not P2. Kiln rod cross-section, invented data.
import { defineStudy, rectangle, custom, lagrangeSpace, assembleSystem, expandSolution, solveSystem, lagrangeField, type LevelContext } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

const why = 'the assembled space is discontinuous across edges and its local functions are mislabelled: a ' +
  'nonconforming method that fails the patch test, O(1) consistency error (Strang 1972; Irons & Razzaque 1972)';
export const predicted: Predicted = {
  L2: { verdict: 'below-order', why },
  H1semi: { verdict: 'below-order', why },
};

function solve(level: LevelContext) {
  const space = lagrangeSpace(level.mesh, 2);
  const n = space.element.nDofs; // 6: three vertices, then the edges [0,1], [1,2], [2,0]
  const cellDofs = space.cellDofs.slice();
  for (let c = 0; c < level.mesh.nCells; c++) {
    const o = c * n;
    const e = [space.cellDofs[o + 3], space.cellDofs[o + 4], space.cellDofs[o + 5]];
    cellDofs[o + 3] = e[1]; cellDofs[o + 4] = e[2]; cellDofs[o + 5] = e[0]; // the mistake: rotated by one edge
  }
  const wrong = { ...space, cellDofs };
  const system = assembleSystem(wrong, level.coefficients, level.boundary);
  const { x, stats } = solveSystem(system.A, system.b, { ...level.solver, symmetric: system.symmetric });
  return { field: lagrangeField(wrong, expandSolution(system, x)), solver: stats };
}

export default defineStudy({
  name: 'corpus-flaw-p2-edge-order',
  description: 'P2 with the edge dofs written into the wrong local slots: must fall below order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'cos(2*x) * exp(y) + x*y^2',
  discretization: custom({ label: 'P2, edge dofs rotated', degree: 2, solve }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
  expect: { verdict: 'below-order', flaw: 'P2 edge dof ordering mistake' },
});
