import type { Mesh } from '../../mesh/types.ts';
import type { Csr } from '../../linalg/types.ts';
import { lagrangeSpace } from '../dofmap/dofmap.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { mixedSpace, vectorSpace } from '../space/space.ts';
import type { MixedSpace } from '../space/types.ts';
import { eliminate, fixBoundary, noConstraints, type Constraints, type ReducedSystem } from '../constraints/dirichlet.ts';
import type { PointData } from '../form/terms/types.ts';
import { splitTwoFields } from './blocks.ts';

/** The Taylor–Hood pair P_k–P_(k−1) on a mesh: a vector field u (dim components) then a scalar p, one numbering.
 *  Shared by Stokes flow and mixed elasticity. */
export function taylorHoodSpace(mesh: Mesh, k: number): { velocity: FunctionSpace; pressure: FunctionSpace; space: MixedSpace } {
  const velocity = lagrangeSpace(mesh, k);
  const pressure = lagrangeSpace(mesh, k - 1);
  const space = mixedSpace([{ name: 'u', space: vectorSpace(velocity, mesh.dim) }, { name: 'p', space: vectorSpace(pressure, 1) }]);
  return { velocity, pressure, space };
}

/** Dirichlet data on u eliminated from the assembled [[A, Bᵀ], [B, −C]] (in place: K is not needed afterwards), and
 *  the free unknowns split into the blocks: mu free velocity unknowns first, then every pressure unknown. */
export function eliminateTaylorHood(
  space: MixedSpace, K: Csr, b: Float64Array, dirichlet: { tags: readonly string[]; value: PointData } | undefined,
): { cons: Constraints; sys: ReducedSystem; mu: number; A: Csr; B: Csr; cNonzeros: number } {
  const cons = noConstraints(space.nDofs);
  if (dirichlet) fixBoundary(space, cons, 0, dirichlet.tags, dirichlet.value);
  // K is not needed after elimination: compacted in place (same bits, no second copy of the matrix).
  const sys = eliminate(K, b, cons, { inPlace: true });
  let mu = 0;
  for (let u = 0; u < space.fields[1].offset; u++) if (!cons.fixed[u]) mu++;
  const { A, B, cNonzeros } = splitTwoFields(sys.A, mu);
  return { cons, sys, mu, A, B, cNonzeros };
}

/** The whole velocity and pressure vectors from the solved free unknowns and the fixed values. */
export function expandTaylorHood(
  space: MixedSpace, cons: Constraints, sys: ReducedSystem, mu: number, u: Float64Array, p: Float64Array,
): { velocity: Float64Array; pressure: Float64Array } {
  const full = cons.values.slice();
  for (let r = 0; r < mu; r++) full[sys.free[r]] = u[r];
  for (let r = mu; r < sys.free.length; r++) full[sys.free[r]] = p[r - mu];
  const off = space.fields[1].offset;
  return { velocity: full.slice(0, off), pressure: full.slice(off) };
}
