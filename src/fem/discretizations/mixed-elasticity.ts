import type { Mesh } from '../../mesh/types.ts';
import type { SolveStats } from '../../linalg/types.ts';
import { RungsInputError } from '../../errors.ts';
import { solveSaddlePoint } from '../../linalg/saddle/index.ts';
import type { AmgOptions } from '../../linalg/amg/types.ts';
import { reducedRigidBodyModes } from '../../linalg/amg/rigid-body-modes.ts';
import { singleField } from '../space/space.ts';
import type { MixedSpace } from '../space/types.ts';
import { assembleForm } from '../form/assemble.ts';
import { elasticityTerm } from '../form/terms/elasticity.ts';
import { pressureDivergenceTerms } from '../form/terms/divergence.ts';
import { massTerm } from '../form/terms/mass.ts';
import { boundaryLoadTerm, sourceTerm } from '../form/terms/loads.ts';
import type { NormalData, PointData } from '../form/terms/types.ts';
import type { Form } from '../form/types.ts';
import { NON_POLYNOMIAL_EXTRA, systemDegrees } from './quadrature-degrees.ts';
import { taylorHoodSpace, eliminateTaylorHood, expandTaylorHood } from './taylor-hood.ts';

export interface MixedElasticityInput {
  mesh: Mesh;
  /** Displacement degree k ≥ 2; the pressure has degree k − 1 (Taylor–Hood). */
  degree: number;
  lambda: PointData;
  mu: PointData;
  /** Momentum source f (dim components) and the source g of ∇·u + p/λ = g (zero for a consistent exact pair). */
  momentumSource: PointData;
  massSource: PointData;
  /** Displacement fixed on these tags. */
  dirichlet?: { tags: readonly string[]; value: PointData };
  /** Traction (2μ ε(u) − pI)n given on these tags. */
  traction?: { tags: readonly string[]; value: NormalData };
  /** Polynomial degrees of λ, μ (null: not polynomials) and of the sources, to choose the quadrature. */
  hints?: { coefficients?: number | null; source?: number | null };
  solver?: { relTol?: number; maxIter?: number; amg?: AmgOptions };
  /** The rigid-body modes as the multigrid's near-null space for the displacement block (default true). */
  rigidBodyModes?: boolean;
  /** Passed to the saddle-point solver (default true): the constant pressure treated apart in the preconditioner
   *  when only the (1/λ) M block sees it (displacement fixed on the whole boundary). */
  separateConstantPressure?: boolean;
}

export interface MixedElasticitySolution {
  space: MixedSpace;
  /** Interleaved displacement unknowns (node g, component i → g·dim + i). */
  displacement: Float64Array;
  pressure: Float64Array;
  solver: SolveStats;
  /** Whether the preconditioner treated the constant pressure apart. */
  constantPressureApart: boolean;
  seconds: { space: number; assemble: number; solve: number };
}

/** Quadrature degrees of the mixed form for displacement degree k: the elasticity term as in the displacement form,
 *  the pressure–divergence terms (k − 1) + (k − 1) = 2k − 2 exactly, taken 2k − 1 as for Stokes, and the pressure
 *  mass 2(k − 1) plus the degree of 1/λ (0 for a constant λ, else treated as not a polynomial). Cells with a
 *  multilinear map add one per variable. */
export function mixedElasticityDegrees(mesh: Mesh, k: number, hints?: MixedElasticityInput['hints']) {
  const d = systemDegrees(mesh.cellKind, k, hints?.coefficients ?? null, hints?.source ?? null);
  const quad = mesh.cellKind === 'quadrilateral' || mesh.cellKind === 'hexahedron' ? 2 : 0;
  const inverseLambda = hints?.coefficients === 0 ? 0 : k + NON_POLYNOMIAL_EXTRA;
  return { elasticity: d.gradGrad, divergence: 2 * k - 1 + quad, pressureMass: 2 * (k - 1) + inverseLambda + quad, source: d.source };
}

/** The weak form of the mixed (displacement–pressure) formulation, p = −λ ∇·u (Braess 2007, Finite Elements,
 *  ch. VI §3): find (u, p) with
 *      (2μ ε(u), ε(v)) − (p, ∇·v)              = (f, v) + ∫ t·v
 *      −(q, ∇·u)       − (1/λ)(p, q)            = −(g, q)
 *  for all (v, q). The first row is the elasticity term with λ = 0 (src/fem/form/terms/elasticity.ts) plus the
 *  pressure gradient; the second the divergence and the pressure mass scaled by −1/λ. The whole matrix is
 *  symmetric: [[A, Bᵀ], [B, −C]] with C = (1/λ) M positive definite. Field 0 is u, field 1 is p. */
export function mixedElasticityForm(space: MixedSpace, input: Omit<MixedElasticityInput, 'mesh' | 'solver'>): Form {
  const mesh = space.mesh, dim = mesh.dim, k = input.degree;
  const deg = mixedElasticityDegrees(mesh, k, input.hints);
  const zero: PointData = (_x, _y, _z, out) => { out[0] = 0; };
  const lambda = input.lambda;
  const negInverseLambda: PointData = (x, y, z, out) => { lambda(x, y, z, out); out[0] = -1 / out[0]; };
  const negMass: PointData = (x, y, z, out) => { input.massSource(x, y, z, out); out[0] = -out[0]; };
  return {
    matrix: [
      elasticityTerm(0, zero, input.mu, deg.elasticity),
      ...pressureDivergenceTerms(0, 1, deg.divergence),
      massTerm(1, 1, deg.pressureMass, negInverseLambda),
    ],
    vector: [sourceTerm(0, dim, input.momentumSource, deg.source), sourceTerm(1, 1, negMass, deg.source)],
    facetVector: input.traction && input.traction.tags.length ? [boundaryLoadTerm(0, dim, input.traction.tags, input.traction.value, deg.source)] : [],
  };
}

/** Taylor–Hood P_k–P_(k−1) for nearly incompressible linear elasticity in mixed form: uniformly stable in λ, so it
 *  does not lock (Braess 2007, ch. VI §3; Boffi, Brezzi & Fortin 2013, §8.12). Solved by MINRES with the block-
 *  diagonal preconditioner diag(AMG(A), (M_{1/(2μ)} + (1/λ) M)⁻¹): smoothed aggregation with the rigid-body modes
 *  on the displacement block, Chebyshev steps on the pressure mass matrix weighted by 1/(2μ) + 1/λ, spectrally
 *  equivalent to the Schur complement uniformly in λ (src/linalg/saddle/pressure-block.ts). */
export function solveMixedElasticity(input: MixedElasticityInput): MixedElasticitySolution {
  const { mesh, degree: k } = input;
  if (!(Number.isInteger(k) && k >= 2)) throw new RungsInputError(`Taylor–Hood needs a displacement degree of at least 2 (the pressure takes degree − 1), got ${k}`);
  const dim = mesh.dim;
  const t0 = performance.now();
  const { velocity: uScalar, pressure: pScalar, space } = taylorHoodSpace(mesh, k);
  const t1 = performance.now();
  const { A: K, b } = assembleForm(space, mixedElasticityForm(space, input));
  const { cons, sys, mu, A, B, trailing } = eliminateTaylorHood(space, K, b, input.dirichlet, { trailing: true });
  // The stored block is −C of [[A, Bᵀ], [B, −C]]; negated in its own copy.
  const C = trailing!;
  for (let i = 0; i < C.values.length; i++) C.values[i] = -C.values[i];
  // The pressure mass matrix weighted by 1/(2μ): with C = (1/λ) M the preconditioner's pressure block is
  // M_{1/(2μ)} + C = ∫ (1/(2μ) + 1/λ) q_i q_j (viscosity 1 in the solver's M/ν + C).
  const pSpace = singleField('p', pScalar);
  const muFn = input.mu;
  const halfInverseMu: PointData = (x, y, z, out) => { muFn(x, y, z, out); out[0] = 1 / (2 * out[0]); };
  const deg = mixedElasticityDegrees(mesh, k, input.hints);
  const { A: M } = assembleForm(pSpace, { matrix: [massTerm(0, 1, deg.pressureMass, halfInverseMu)], vector: [] }, { vector: false });
  const amg: AmgOptions = { ...input.solver?.amg };
  if (input.rigidBodyModes !== false) {
    Object.assign(amg, { blockSize: dim, ...reducedRigidBodyModes(uScalar.dofCoords, dim as 2 | 3, uScalar.nDofs, sys.free.subarray(0, mu)) });
  }
  const t2 = performance.now();
  const res = solveSaddlePoint({
    A, B, M, f: sys.b.slice(0, mu), g: sys.b.slice(mu),
    pressureBlock: C, viscosity: 1, separateConstantPressure: input.separateConstantPressure,
    relTol: input.solver?.relTol, maxIter: input.solver?.maxIter, amg,
  });
  const t3 = performance.now();
  const { velocity: displacement, pressure } = expandTaylorHood(space, cons, sys, mu, res.u, res.p);
  return {
    space, displacement, pressure, solver: res.stats,
    constantPressureApart: res.constantPressureApart === true,
    seconds: { space: (t1 - t0) / 1e3, assemble: (t2 - t1) / 1e3, solve: (t3 - t2) / 1e3 },
  };
}
