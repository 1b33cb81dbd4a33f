import { RungsInputError } from '../../errors.ts';
import type { Mesh } from '../../mesh/types.ts';
import type { PointData } from '../../fem/form/terms/types.ts';
import { solveElasticity } from '../../fem/discretizations/elasticity.ts';
import { interpolateVector, vectorLagrangeField } from '../../fem/field/vector-field.ts';
import { lagrangeSpace } from '../../fem/dofmap/dofmap.ts';
import { fieldErrors } from '../../norms/field-errors.ts';
import type { LagrangeDiscretization } from '../declaration.ts';
import type { LevelContext } from '../context.ts';
import { DEFAULT_ERROR_FRACTION } from '../algebraic.ts';
import { seconds, type LevelDiscretization } from './types.ts';
import { systemData } from './system-data.ts';
import { firstComponent, scalarOf, pickNorms, refuseRobin } from './system-common.ts';
import { perCellArrays } from '../../norms/errors.ts';

/** The displacement form is coercive when μ > 0 and the bulk modulus λ + 2μ/d > 0 (Braess 2007, ch. VI §1; Korn's
 *  inequality). In terms of Poisson's ratio ν = λ / (2(λ + μ)) that is −1 < ν < 1/2: at ν = 1/2 (λ = ∞) the
 *  material is incompressible and the displacement form has no solution; near it the P_k displacement elements lock.
 *  Checked at the mesh's vertices before solving. */
function checkLame(lambda: PointData, mu: PointData, mesh: Mesh, where: string, file: string): void {
  const l = new Float64Array(1), m = new Float64Array(1);
  const dim = mesh.dim;
  for (let v = 0; v < mesh.nVertices; v++) {
    const x = mesh.coords[v * dim], y = dim > 1 ? mesh.coords[v * dim + 1] : 0, z = dim > 2 ? mesh.coords[v * dim + 2] : 0;
    lambda(x, y, z, l); mu(x, y, z, m);
    const at = `(${[x, y, z].slice(0, dim).map((c) => c.toPrecision(4)).join(', ')})`;
    if (!(m[0] > 0)) throw new RungsInputError(`${where}: pde.coefficients.mu: the shear modulus μ is ${m[0]} at ${at}; the displacement form needs μ > 0 everywhere`, file);
    if (!(dim * l[0] + 2 * m[0] > 0) || !Number.isFinite(l[0])) {
      const nu = l[0] / (2 * (l[0] + m[0]));
      throw new RungsInputError(`${where}: pde.coefficients.lambda: λ = ${l[0]} with μ = ${m[0]} at ${at} (Poisson's ratio ν = ${Number.isFinite(nu) ? nu.toPrecision(4) : 'undefined'}) leaves the bulk modulus λ + 2μ/${dim} ≤ 0 or infinite: a displacement-only formulation needs −1 < ν < 1/2 (λ finite, λ + 2μ/${dim} > 0); an incompressible material (ν = 1/2) needs a mixed formulation, e.g. stokes(...) for its displacement and pressure`, file);
    }
  }
}

/** Cells sampled for the interpolation-error estimate that sets the solver target. */
const TARGET_SAMPLE_CELLS = 50_000;

/** rungs's own vector P_k elements for linear elasticity in displacement form: Dirichlet data on the displacement,
 *  traction (σn) on Neumann parts, CG with smoothed aggregation that knows the rigid-body modes. */
export function builtInElasticity(disc: LagrangeDiscretization): LevelDiscretization {
  return {
    label: `vector P${disc.degree} elasticity`,
    async run({ decl, file, problem, mesh, solver, norms }) {
      const derived = problem.derived;
      if (!derived) throw new RungsInputError(`${file} (study '${decl.name}'): elasticity needs the exact displacement as formulas`, file);
      refuseRobin(problem, decl.name, file);
      const data = systemData(decl.name, derived);
      const dim = mesh.dim;
      const lambda = data.point('coef_lambda'), mu = data.point('coef_mu');
      checkLame(lambda, mu, mesh, `${file} (study '${decl.name}')`, file);
      const exact = data.exact('u');
      const dTags = problem.byName.dirichlet.u ?? [];
      const nTags = problem.byName.neumann.momentum ?? [];
      const errOpts = { divergence: true, elasticity: { lambda: scalarOf(lambda), mu: scalarOf(mu) } };
      // The solver stops once its algebraic error (CG's estimate in the energy norm) is a fraction of the
      // interpolation error in that norm (the same tie as the scalar equation, src/study/algebraic.ts).
      const t0 = performance.now();
      const scalar = lagrangeSpace(mesh, disc.degree);
      const interp = vectorLagrangeField(scalar, dim, interpolateVector(scalar, dim, exact.value));
      const fraction = decl.solver?.errorFraction ?? DEFAULT_ERROR_FRACTION;
      const stride = Math.max(1, Math.floor(mesh.nCells / TARGET_SAMPLE_CELLS));
      const [estimate] = fieldErrors([interp], exact, { ...errOpts, cellStride: stride });
      const target = fraction > 0 && (estimate.energy ?? 0) > 0 ? fraction * estimate.energy! : 0;
      const stopWhen: LevelContext['solver']['stopWhen'] | undefined = target > 0
        ? ({ energyErrorEstimate }) => energyErrorEstimate !== undefined && energyErrorEstimate <= target : undefined;
      const tEstimate = seconds(t0);
      const sol = solveElasticity({
        mesh, degree: disc.degree, lambda, mu, source: data.point('source_momentum'),
        dirichlet: dTags.length ? { tags: dTags, value: exact.value } : undefined,
        traction: nTags.length ? { tags: nTags, value: data.normal('flux_momentum') } : undefined,
        solver: { ...solver, stopWhen },
      });
      const t = performance.now();
      const field = vectorLagrangeField(scalar, dim, sol.coefficients);
      const perCell = perCellArrays(mesh.nCells);
      const [e, i] = fieldErrors([field, interp], exact, { ...errOpts, perCell });
      const named = (v: typeof e) => ({ L2_u: v.L2, H1semi_u: v.H1semi, H1_u: v.H1, energy: v.energy!, div_u: v.div!, maxNodal_u: v.maxNodal });
      const est = sol.solver.energyErrorEstimate;
      return {
        dofs: sol.space.nDofs,
        errors: pickNorms(named(e), norms),
        interpolationErrors: pickNorms(named(i), norms),
        quasiOptimality: i.energy! > 0 ? e.energy! / i.energy! : null,
        solver: sol.solver,
        algebraic: target > 0 && est !== undefined && Number.isFinite(est) ? { estimate: est, target, fraction, floors: { energy: est } } : null,
        // Where the displacement error lives (src/study/where.ts); the files show its first component u_x.
        errorCells: { perCell, field, exact: firstComponent(exact.value, dim), norms: { L2: 'L2_u', H1semi: 'H1semi_u' } },
        seconds: { assemble: sol.seconds.space + sol.seconds.assemble, solve: sol.seconds.solve, errors: seconds(t) + tEstimate },
      };
    },
  };
}

