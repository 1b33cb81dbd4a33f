import { RungsInputError } from '../../errors.ts';
import type { Mesh } from '../../mesh/types.ts';
import type { PointData } from '../../fem/form/terms/types.ts';
import { solveMixedElasticity } from '../../fem/discretizations/mixed-elasticity.ts';
import { interpolate, lagrangeField } from '../../fem/field/lagrange-field.ts';
import { interpolateVector, vectorLagrangeField } from '../../fem/field/vector-field.ts';
import { mapReferencePoint } from '../../fem/geometry/map.ts';
import { fieldErrors } from '../../norms/field-errors.ts';
import type { DiscreteField, ExactField } from '../../norms/types.ts';
import type { LagrangeDiscretization } from '../declaration.ts';
import { seconds, type LevelDiscretization } from './types.ts';
import { systemData } from './system-data.ts';
import { firstComponent, pickNorms, refuseRobin, scalarOf } from './system-common.ts';
import { perCellArrays } from '../../norms/errors.ts';

/** MINRES stops at this relative (preconditioned) residual unless the study says otherwise, as for Stokes: well below
 *  the discretization error of the ladders rungs runs (the residual of an indefinite system is no error estimate). */
const MIXED_REL_TOL = 1e-10;

/** μ > 0 and λ > 0 at the mesh's vertices: the mixed form needs the pressure block (1/λ) M positive semidefinite and
 *  the shear term coercive (Korn). λ may be as large as the user likes (that is the point); λ = ∞ is Stokes. */
function checkLame(lambda: PointData, mu: PointData, mesh: Mesh, where: string, file: string): void {
  const l = new Float64Array(1), m = new Float64Array(1);
  const dim = mesh.dim;
  for (let v = 0; v < mesh.nVertices; v++) {
    const x = mesh.coords[v * dim], y = dim > 1 ? mesh.coords[v * dim + 1] : 0, z = dim > 2 ? mesh.coords[v * dim + 2] : 0;
    lambda(x, y, z, l); mu(x, y, z, m);
    const at = `(${[x, y, z].slice(0, dim).map((c) => c.toPrecision(4)).join(', ')})`;
    if (!(m[0] > 0 && Number.isFinite(m[0]))) throw new RungsInputError(`${where}: pde.coefficients.mu: the shear modulus μ is ${m[0]} at ${at}; the mixed form needs a finite μ > 0 everywhere`, file);
    if (!(l[0] > 0 && Number.isFinite(l[0]))) {
      throw new RungsInputError(`${where}: pde.coefficients.lambda: λ = ${l[0]} at ${at}; nearlyIncompressibleElasticity needs a finite λ > 0 everywhere (its pressure block is (1/λ)·M); for an incompressible material (λ = ∞) use stokes(...), for a compressible one with λ ≤ 0 linearElasticity(...)`, file);
    }
  }
}

/** A scalar field times √w(x): its L2 error against the exact field times √w is (∫ w e²)^(1/2). Gradients are
 *  written as zeros (only the L2 norm of the pair is used). Physical points come from the cell map per point. */
function weightedField(field: DiscreteField, sqrtWeight: (x: number, y: number, z: number) => number): DiscreteField {
  const x = new Float64Array(3);
  const mesh = field.mesh, dim = mesh.dim;
  return {
    mesh, nDofs: field.nDofs, degree: field.degree, components: 1,
    evaluate(c, refPoints, nPoints, values, grads) {
      field.evaluate(c, refPoints, nPoints, values, grads);
      for (let q = 0; q < nPoints; q++) {
        mapReferencePoint(mesh, c, refPoints, q * dim, x);
        values[q] *= sqrtWeight(x[0], dim > 1 ? x[1] : 0, dim > 2 ? x[2] : 0);
      }
      grads.fill(0, 0, nPoints * dim);
    },
  };
}

function weightedExact(exact: ExactField, sqrtWeight: (x: number, y: number, z: number) => number): ExactField {
  return {
    components: 1,
    value(x, y, z, out) { exact.value(x, y, z, out); out[0] *= sqrtWeight(x, y, z); },
    grad(_x, _y, _z, out) { out.fill(0); },
  };
}

/** (∫ (1/λ) (p − p_h)²)^(1/2) for each discrete pressure: the pressure part of the mixed energy norm. */
export function inverseLambdaPressureNorms(fields: DiscreteField[], exactP: ExactField, lambda: PointData, degree?: number): number[] {
  const lam = scalarOf(lambda);
  const sqrtInv = (x: number, y: number, z: number): number => 1 / Math.sqrt(lam(x, y, z));
  return fieldErrors(fields.map((f) => weightedField(f, sqrtInv)), weightedExact(exactP, sqrtInv), degree !== undefined ? { degree } : {}).map((e) => e.L2);
}

/** The shear-only coefficients of the elasticity energy: (∫ 2μ ε(e):ε(e))^(1/2) through fieldErrors with λ = 0. */
export function shearEnergyOptions(mu: PointData) {
  return { lambda: () => 0, mu: scalarOf(mu) };
}

/** rungs's own Taylor–Hood P_k–P_(k−1) elements for nearly incompressible elasticity (displacement degree k ≥ 2).
 *  Norms: L2_u, H1semi_u, H1_u, div_u of the displacement, L2_p of the pressure (not mean-free: (1/λ) M fixes the
 *  constant), and energy = (∫ 2μ ε(e_u):ε(e_u) + (1/λ) e_p²)^(1/2), the displacement energy norm with λ(∇·e)²
 *  written through the pressure: for the exact pair λ(∇·u)² = p²/λ, and unlike λ‖∇·(u − u_h)‖² it stays bounded as
 *  λ → ∞ for a locking-free method (see system-norms.ts). No Céa ratio: the system is indefinite. */
export function builtInMixedElasticity(disc: LagrangeDiscretization): LevelDiscretization {
  return {
    label: `Taylor–Hood P${disc.degree}–P${disc.degree - 1} nearly incompressible elasticity`,
    async run({ decl, file, problem, mesh, solver, norms }) {
      const where = `${file} (study '${decl.name}')`;
      const derived = problem.derived;
      if (!derived) throw new RungsInputError(`${where}: nearly incompressible elasticity needs the exact displacement and pressure as formulas`, file);
      if (disc.degree < 2) throw new RungsInputError(`${where}: discretization.degree: Taylor–Hood needs a displacement degree of at least 2 (the pressure takes degree − 1); got ${disc.degree}`, file);
      if (solver.method && solver.method !== 'auto') {
        throw new RungsInputError(`${where}: solver.method: '${solver.method}' cannot solve the saddle-point system of the mixed formulation (symmetric but indefinite); leave the method to rungs (MINRES with a block preconditioner)`, file);
      }
      refuseRobin(problem, decl.name, file);
      const data = systemData(decl.name, derived);
      const dim = mesh.dim;
      const lambda = data.point('coef_lambda'), mu = data.point('coef_mu');
      checkLame(lambda, mu, mesh, where, file);
      const exactU = data.exact('u'), exactP = data.exact('p');
      const dTags = problem.byName.dirichlet.u ?? [];
      const nTags = problem.byName.neumann.momentum ?? [];
      const sol = solveMixedElasticity({
        mesh, degree: disc.degree, lambda, mu,
        momentumSource: data.point('source_momentum'), massSource: data.point('source_mass'),
        dirichlet: dTags.length ? { tags: dTags, value: exactU.value } : undefined,
        traction: nTags.length ? { tags: nTags, value: data.normal('flux_momentum') } : undefined,
        solver: { relTol: solver.relTol ?? MIXED_REL_TOL, maxIter: solver.maxIter, amg: solver.amg },
      });
      const t = performance.now();
      const us = sol.space.fields[0].space.scalar, ps = sol.space.fields[1].space.scalar;
      const pScalar = scalarOf(exactP.value);
      const uFields = [vectorLagrangeField(us, dim, sol.displacement), vectorLagrangeField(us, dim, interpolateVector(us, dim, exactU.value))];
      const pFields = [lagrangeField(ps, sol.pressure), lagrangeField(ps, interpolate(ps, pScalar))];
      const perCell = perCellArrays(mesh.nCells);
      const uField = uFields[0]!;
      const [eu, iu] = fieldErrors(uFields, exactU, { divergence: true, elasticity: shearEnergyOptions(mu), perCell });
      const [ep, ip] = fieldErrors(pFields, exactP);
      const wantEnergy = norms.includes('energy');
      const [epw, ipw] = wantEnergy ? inverseLambdaPressureNorms(pFields, exactP, lambda) : [Number.NaN, Number.NaN];
      const energy = (shear: number, pressure: number) => Math.sqrt(shear * shear + pressure * pressure);
      const named = (u: typeof eu, p: typeof ep, pw: number) => ({
        L2_u: u.L2, H1semi_u: u.H1semi, H1_u: u.H1, div_u: u.div!, maxNodal_u: u.maxNodal, L2_p: p.L2, energy: energy(u.energy!, pw),
      });
      return {
        dofs: sol.space.nDofs,
        errors: pickNorms(named(eu, ep, epw), norms),
        interpolationErrors: pickNorms(named(iu, ip, ipw), norms),
        quasiOptimality: null,
        solver: sol.solver,
        // Where the displacement error lives (src/study/where.ts); the files show its first component.
        errorCells: { perCell, field: uField, exact: firstComponent(exactU.value, dim), norms: { L2: 'L2_u', H1semi: 'H1semi_u' } },
        seconds: { assemble: sol.seconds.space + sol.seconds.assemble, solve: sol.seconds.solve, errors: seconds(t) },
      };
    },
  };
}
