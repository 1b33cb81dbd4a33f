import type { Mesh } from '../../mesh/types.ts';
import type { SolveStats } from '../../linalg/types.ts';
import { solveSystem, AUTO_DIRECT_MAX_N, type SolveSystemOptions } from '../../linalg/index.ts';
import { lagrangeSpace } from '../dofmap/dofmap.ts';
import { singleField } from '../space/space.ts';
import type { MixedSpace } from '../space/types.ts';
import { assembleForm } from '../form/assemble.ts';
import { elasticityTerm } from '../form/terms/elasticity.ts';
import { boundaryLoadTerm, sourceTerm } from '../form/terms/loads.ts';
import type { NormalData, PointData } from '../form/terms/types.ts';
import { eliminate, expand, fixBoundary, noConstraints, type ReducedSystem } from '../constraints/dirichlet.ts';
import type { Form } from '../form/types.ts';
import { systemDegrees } from './quadrature-degrees.ts';
import { reducedRigidBodyModes } from '../../linalg/amg/rigid-body-modes.ts';
import { dropNegligibleInPlace } from '../../linalg/amg/negligible-entries.ts';
import type { AmgOptions } from '../../linalg/amg/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { vertexSubspace } from '../space/vertex-subspace.ts';

export interface ElasticityInput {
  mesh: Mesh;
  degree: number;
  lambda: PointData;
  mu: PointData;
  /** Body force f (dim components). */
  source: PointData;
  /** Displacement fixed on these tags to the values of `value` (all components). */
  dirichlet?: { tags: readonly string[]; value: PointData };
  /** Traction σn given on these tags. */
  traction?: { tags: readonly string[]; value: NormalData };
  /** Polynomial degrees of λ, μ (null: not polynomials) and of f, to choose the quadrature. */
  hints?: { coefficients?: number | null; source?: number | null };
  solver?: Omit<SolveSystemOptions, 'symmetric'>;
  /** Use the rigid-body modes as the multigrid's near-null space (default true; false only to show why they
   *  matter). */
  rigidBodyModes?: boolean;
  /** With the rigid-body modes and degree k > 1: coarsen first to degree 1 on the same mesh, then aggregate (default
   *  true; see elasticityMultigrid). */
  pMultigrid?: boolean;
}

export interface ElasticitySolution {
  space: MixedSpace;
  system: ReducedSystem;
  /** Interleaved displacement unknowns: component i at node g is coefficients[g·dim + i]. */
  coefficients: Float64Array;
  solver: SolveStats;
  seconds: { space: number; assemble: number; solve: number };
}

/** The weak form of −∇·σ(u) = f with traction data: (σ(u), ε(v)) = (f, v) + ∫ t·v. */
export function elasticityForm(space: MixedSpace, input: Omit<ElasticityInput, 'mesh' | 'degree' | 'solver'>, degree: number): Form {
  const dim = space.mesh.dim;
  const d = systemDegrees(space.mesh.cellKind, degree, input.hints?.coefficients ?? null, input.hints?.source ?? null);
  return {
    matrix: [elasticityTerm(0, input.lambda, input.mu, d.gradGrad)],
    vector: [sourceTerm(0, dim, input.source, d.source)],
    facetVector: input.traction && input.traction.tags.length ? [boundaryLoadTerm(0, dim, input.traction.tags, input.traction.value, d.source)] : [],
  };
}

/** The reduced matrix as the multigrid solve takes it: without the entries that are exact zeros or the round-off
 *  of cancelling element contributions (P2 elasticity on right triangles: 9 % of the stored entries; see
 *  negligible-entries.ts), dropped in place. solveElasticity drops them during the elimination
 *  (EliminateOptions.dropNegligible, the same entries); this is the step on its own. The multigrid smooths with that
 *  matrix anyway; when CG solves with it too, the cycle's last sweep hands CG the product A z, so CG needs neither
 *  a copy of A in the multigrid's arena nor a product of its own per iteration (measured at 1M unknowns, with the
 *  whole-array copy of finestOperator: setup 2.6 → 2.0 s, solve 3.3 → 2.6 s, test/bench/systems.bench.ts). The system solved differs from the assembled one by entries of at most
 *  1e-13·√(a_ii a_jj), zero in exact arithmetic: the solution moves by round-off (test/fem/elasticity-negligible.test.ts
 *  bounds it by perturbation theory). */
export function multigridMatrix(A: ReducedSystem['A']): ReducedSystem['A'] {
  return dropNegligibleInPlace(A).A;
}

/** The multigrid's knowledge of a vector Lagrange space with `dim` interleaved components reduced to the unknowns
 *  `free`: the rigid-body modes as near-null space with nodes of dim unknowns (Vaněk, Mandel & Brezina 1996), and
 *  for degree k > 1 (with pMultigrid) first the degree-1 space on the same mesh as a coarse level given to it
 *  (fem/space/vertex-subspace.ts), whose P1 operator is then aggregated with the modes at the vertices. 2D P2 at
 *  1.0M unknowns, λ = 2, μ = 1 + x/2 (test/bench/systems.bench.ts, alternating runs on an idle two-core machine):
 *  setup 2.5–3.7 → 1.26–1.32 s, CG iterations to the round-off floor 50 → 28, solve 2.70–2.77 → 1.69–1.81 s. */
export function elasticityMultigrid(
  scalar: FunctionSpace, dim: 2 | 3, free: Int32Array, pMultigrid: boolean,
): Pick<AmgOptions, 'blockSize' | 'nearNullSpace' | 'nodeOf' | 'firstCoarseSpace'> {
  if (!pMultigrid || scalar.element.degree === 1) {
    return { blockSize: dim, ...reducedRigidBodyModes(scalar.dofCoords, dim, scalar.nDofs, free) };
  }
  const { mesh } = scalar;
  const coarse = vertexSubspace(scalar, dim, free);
  return { firstCoarseSpace: { P: coarse.P, blockSize: dim, ...reducedRigidBodyModes(mesh.coords, dim, mesh.nVertices, coarse.coarseKept) } };
}

/** Vector Lagrange elements of degree k for linear elasticity in displacement form; CG with smoothed aggregation
 *  that knows the rigid-body modes (Vaněk, Mandel & Brezina 1996). Not locking-free: as λ/μ grows, the error
 *  constant grows (Babuška & Suri 1992). */
export function solveElasticity(input: ElasticityInput): ElasticitySolution {
  const t0 = performance.now();
  const { mesh } = input;
  const dim = mesh.dim;
  const scalar = lagrangeSpace(mesh, input.degree);
  const space = singleField('u', scalar, dim);
  const t1 = performance.now();
  const { A, b } = assembleForm(space, elasticityForm(space, input, input.degree));
  const cons = noConstraints(space.nDofs);
  if (input.dirichlet) fixBoundary(space, cons, 0, input.dirichlet.tags, input.dirichlet.value);
  let nFree = 0;
  for (let u = 0; u < space.nDofs; u++) if (!cons.fixed[u]) nFree++;
  // Multigrid from a few hundred unknowns on: the incomplete factorisations that 'auto' takes for mid-sized scalar
  // systems need 3–4 times the iterations on elasticity (measured: 95 against 23 CG iterations at 2178 unknowns).
  const preconditioner = input.solver?.preconditioner ?? (nFree > AUTO_DIRECT_MAX_N ? 'amg' : undefined);
  // For the multigrid, the reduced matrix without its negligible entries (see multigridMatrix), in the same pass.
  const system = eliminate(A, b, cons, { inPlace: true, dropNegligible: preconditioner === 'amg' });
  const t2 = performance.now();
  const amg = { ...input.solver?.amg };
  if (input.rigidBodyModes !== false) {
    Object.assign(amg, elasticityMultigrid(scalar, dim as 2 | 3, system.free, preconditioner === 'amg' && input.pMultigrid !== false));
  }
  // (σ(u), ε(v)) is symmetric: the matrix needs no O(nnz) check of that before CG.
  const { x, stats } = solveSystem(system.A, system.b, { ...input.solver, preconditioner, amg, symmetric: true, symmetricByConstruction: true });
  const t3 = performance.now();
  return {
    space, system, coefficients: expand(system, x), solver: stats,
    seconds: { space: (t1 - t0) / 1e3, assemble: (t2 - t1) / 1e3, solve: (t3 - t2) / 1e3 },
  };
}
