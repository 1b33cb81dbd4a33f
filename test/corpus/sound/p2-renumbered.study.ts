// Sound: P2 with every global dof renumbered by a fixed permutation (edge dofs first, in reverse), applied to the
// cell map and the dof coordinates alike. The counterpart of the edge-ordering flaw: a different numbering, but
// every cell still agrees with its neighbours. Kiln rod cross-section, invented data.
import { defineStudy, rectangle, custom, lagrangeSpace, assembleSystem, expandSolution, solveSystem, lagrangeField, type LevelContext } from 'rungs';
import type { Predicted } from '../helpers/predicted.ts';

export const predicted: Predicted = {
  L2: { verdict: 'on-order', why: 'the same P2 space under another numbering: O(h³) (Brenner & Scott 2008, Thm 5.4.8)' },
  H1semi: { verdict: 'on-order', why: 'the same P2 space under another numbering: O(h²) (Brenner & Scott 2008, Thm 5.4.8)' },
};

function solve(level: LevelContext) {
  const space = lagrangeSpace(level.mesh, 2);
  const nd = space.nDofs, dim = level.mesh.dim, nv = level.mesh.nVertices;
  const perm = new Int32Array(nd); // perm[old] = new
  for (let g = 0; g < nd; g++) perm[g] = g >= nv ? nd - 1 - g : nd - nv + g;
  const cellDofs = space.cellDofs.map((g) => perm[g]);
  const dofCoords = new Float64Array(nd * dim);
  for (let g = 0; g < nd; g++) for (let d = 0; d < dim; d++) dofCoords[perm[g] * dim + d] = space.dofCoords[g * dim + d];
  const renumbered = { ...space, cellDofs, dofCoords };
  const system = assembleSystem(renumbered, level.coefficients, level.boundary);
  const { x, stats } = solveSystem(system.A, system.b, { ...level.solver, symmetric: system.symmetric });
  return { field: lagrangeField(renumbered, expandSolution(system, x)), solver: stats };
}

export default defineStudy({
  name: 'corpus-sound-p2-renumbered',
  description: 'P2 with a consistent global renumbering of the dofs: must be on order.',
  domain: rectangle([0, 1], [0, 1]),
  exact: 'cos(2*x) * exp(y) + x*y^2',
  discretization: custom({ label: 'P2, dofs renumbered', degree: 2, solve }),
  ladder: { n: [4, 8, 16, 32] },
  norms: ['L2', 'H1semi'],
});
