import type { Mesh } from '../../mesh/types.ts';
import type { SolveStats } from '../../linalg/types.ts';
import { RungsInputError } from '../../errors.ts';
import { solveSaddlePoint } from '../../linalg/saddle/index.ts';
import type { AmgOptions } from '../../linalg/amg/types.ts';
import { singleField } from '../space/space.ts';
import type { MixedSpace } from '../space/types.ts';
import { assembleForm } from '../form/assemble.ts';
import { viscousTerm } from '../form/terms/viscous.ts';
import { pressureDivergenceTerms } from '../form/terms/divergence.ts';
import { massTerm } from '../form/terms/mass.ts';
import { boundaryLoadTerm, sourceTerm } from '../form/terms/loads.ts';
import type { NormalData, PointData } from '../form/terms/types.ts';
import { NON_POLYNOMIAL_EXTRA, systemDegrees } from './quadrature-degrees.ts';
import { taylorHoodSpace, eliminateTaylorHood, expandTaylorHood } from './taylor-hood.ts';

export interface StokesInput {
  mesh: Mesh;
  /** Velocity degree k ≥ 2; the pressure has degree k − 1 (Taylor–Hood; Taylor & Hood 1973). */
  degree: number;
  nu: PointData;
  /** Momentum source (dim components) and mass source g of ∇·u = g. */
  momentumSource: PointData;
  massSource: PointData;
  /** Velocity fixed on these tags. */
  dirichlet?: { tags: readonly string[]; value: PointData };
  /** (ν∇u − pI)n given on these tags (an outflow boundary: then the pressure is determined). */
  traction?: { tags: readonly string[]; value: NormalData };
  /** The pressure is fixed only up to a constant: solve for the one with mean zero (a constraint, not a pinned
   *  node). */
  pressureMeanFree: boolean;
  hints?: { coefficients?: number | null; source?: number | null };
  solver?: { relTol?: number; maxIter?: number; amg?: AmgOptions };
  /** A constant ν for the Schur complement approximation M/ν. Absent (the default): the pressure mass matrix weighted
   *  by 1/ν, M_{1/ν} = ∫ q_i q_j / ν, which stays spectrally equivalent to the Schur complement when ν varies
   *  (see solveStokes). */
  viscosityScale?: number;
}

export interface StokesSolution {
  space: MixedSpace;
  /** Interleaved velocity unknowns (node g, component i → g·dim + i), then pressure unknowns. */
  velocity: Float64Array;
  pressure: Float64Array;
  solver: SolveStats;
  seconds: { space: number; assemble: number; solve: number };
}

/** Taylor–Hood P_k–P_(k−1) Stokes flow, −∇·(ν∇u − pI) = f, ∇·u = g: MINRES with the block-diagonal preconditioner
 *  (multigrid on the velocity block, the pressure mass matrix / ν for the Schur complement; Elman, Silvester &
 *  Wathen 2014, ch. 4, for constant ν). For a variable ν the pressure block is the mass matrix weighted by 1/ν,
 *  ∫ q_i q_j / ν: the Schur complement of a variable-viscosity Stokes system is spectrally equivalent to it with
 *  constants that do not depend on the range of ν the way those of M/ν̄ do (Grinevich & Olshanskii 2009, SIAM J.
 *  Sci. Comput. 31, 1569–1592, from memory). For a constant ν it is M/ν up to the rounding of the scaling. */
export function solveStokes(input: StokesInput): StokesSolution {
  const { mesh, degree: k } = input;
  if (!(Number.isInteger(k) && k >= 2)) throw new RungsInputError(`Taylor–Hood needs a velocity degree of at least 2 (the pressure takes degree − 1), got ${k}`);
  const dim = mesh.dim;
  const t0 = performance.now();
  const { pressure: pressureScalar, space } = taylorHoodSpace(mesh, k);
  const t1 = performance.now();
  const d = systemDegrees(mesh.cellKind, k, input.hints?.coefficients ?? null, input.hints?.source ?? null);
  const negMass: PointData = (x, y, z, out) => { input.massSource(x, y, z, out); out[0] = -out[0]; };
  const { A: K, b } = assembleForm(space, {
    matrix: [viscousTerm(0, dim, input.nu, d.gradGrad), ...pressureDivergenceTerms(0, 1, 2 * k - 1 + (mesh.cellKind === 'quadrilateral' || mesh.cellKind === 'hexahedron' ? 2 : 0))],
    // −(q, ∇·u) = −(q, g): the mass row carries −g.
    vector: [sourceTerm(0, dim, input.momentumSource, d.source), sourceTerm(1, 1, negMass, d.source)],
    facetVector: input.traction && input.traction.tags.length ? [boundaryLoadTerm(0, dim, input.traction.tags, input.traction.value, d.source)] : [],
  });
  const { cons, sys, mu, A, B, cNonzeros } = eliminateTaylorHood(space, K, b, input.dirichlet);
  if (cNonzeros > 0) throw new Error('internal: the pressure–pressure block of Taylor–Hood Stokes is not empty');
  // Pressure mass matrix and the integrals of the pressure basis (the mean constraint).
  const pSpace = singleField('p', pressureScalar);
  const one: PointData = (_x, _y, _z, out) => { out[0] = 1; };
  // With no constant scale given, the mass matrix weighted by 1/ν (quadrature: as for the weighted pressure mass of
  // mixed elasticity, exact for a constant ν hinted as degree 0).
  const weighted = input.viscosityScale === undefined;
  const nuFn = input.nu;
  const inverseNu: PointData = (x, y, z, out) => { nuFn(x, y, z, out); out[0] = 1 / out[0]; };
  const quad = mesh.cellKind === 'quadrilateral' || mesh.cellKind === 'hexahedron' ? 2 : 0;
  const massDegree = weighted ? 2 * (k - 1) + (input.hints?.coefficients === 0 ? 0 : k + NON_POLYNOMIAL_EXTRA) + quad : 2 * (k - 1);
  const { A: M, b: w } = assembleForm(pSpace, {
    matrix: [weighted ? massTerm(0, 1, massDegree, inverseNu) : massTerm(0, 1, massDegree)],
    vector: [sourceTerm(0, 1, one, k - 1)],
  });
  const f = sys.b.subarray(0, mu), g = sys.b.subarray(mu);
  const nuScale = input.viscosityScale ?? 1;
  const t2 = performance.now();
  const res = solveSaddlePoint({
    A, B, M, f: f.slice(), g: g.slice(),
    viscosity: nuScale,
    meanConstraint: input.pressureMeanFree ? w : undefined,
    pressureDeterminedUpToConstant: input.pressureMeanFree,
    relTol: input.solver?.relTol, maxIter: input.solver?.maxIter, amg: input.solver?.amg,
  });
  const t3 = performance.now();
  const { velocity, pressure } = expandTaylorHood(space, cons, sys, mu, res.u, res.p);
  return {
    space, velocity, pressure, solver: res.stats,
    seconds: { space: (t1 - t0) / 1e3, assemble: (t2 - t1) / 1e3, solve: (t3 - t2) / 1e3 },
  };
}
