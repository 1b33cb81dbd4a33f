import { RungsInputError } from '../../errors.ts';
import { solveStokes } from '../../fem/discretizations/stokes.ts';
import { interpolate, lagrangeField } from '../../fem/field/lagrange-field.ts';
import { interpolateVector, vectorLagrangeField } from '../../fem/field/vector-field.ts';
import { fieldErrors } from '../../norms/field-errors.ts';
import type { LagrangeDiscretization } from '../declaration.ts';
import { seconds, type LevelDiscretization } from './types.ts';
import { systemData } from './system-data.ts';
import { firstComponent, pickNorms, refuseRobin, scalarOf } from './system-common.ts';
import { perCellArrays } from '../../norms/errors.ts';

/** MINRES stops at this relative residual unless the study says otherwise: well below the discretization error of
 *  the ladders rungs runs (the residual is not an error estimate for an indefinite system, so no tie as for CG). */
const STOKES_REL_TOL = 1e-10;

/** rungs's own Taylor–Hood P_k–P_(k−1) elements for Stokes flow (velocity degree k ≥ 2, given as the degree). */
export function builtInStokes(disc: LagrangeDiscretization): LevelDiscretization {
  return {
    label: `Taylor–Hood P${disc.degree}–P${disc.degree - 1} Stokes`,
    async run({ decl, file, problem, mesh, solver, norms }) {
      const derived = problem.derived;
      if (!derived) throw new RungsInputError(`${file} (study '${decl.name}'): Stokes needs the exact velocity and pressure as formulas`, file);
      if (disc.degree < 2) throw new RungsInputError(`${file} (study '${decl.name}'): discretization.degree: Taylor–Hood needs a velocity degree of at least 2 (the pressure takes degree − 1); got ${disc.degree}`, file);
      if (solver.method && solver.method !== 'auto') {
        throw new RungsInputError(`${file} (study '${decl.name}'): solver.method: '${solver.method}' cannot solve the saddle-point system of Stokes flow (symmetric but indefinite); leave the method to rungs (MINRES with a block preconditioner)`, file);
      }
      refuseRobin(problem, decl.name, file);
      const data = systemData(decl.name, derived);
      const dim = mesh.dim;
      const exactU = data.exact('u'), exactP = data.exact('p');
      const dTags = problem.byName.dirichlet.u ?? [];
      const nTags = problem.byName.neumann.momentum ?? [];
      const meanFree = problem.pde.meanFree?.includes('p') ?? false;
      const sol = solveStokes({
        mesh, degree: disc.degree, nu: data.point('coef_nu'),
        momentumSource: data.point('source_momentum'), massSource: data.point('source_mass'),
        dirichlet: dTags.length ? { tags: dTags, value: exactU.value } : undefined,
        traction: nTags.length ? { tags: nTags, value: data.normal('flux_momentum') } : undefined,
        pressureMeanFree: meanFree,
        solver: { relTol: solver.relTol ?? STOKES_REL_TOL, maxIter: solver.maxIter, amg: solver.amg },
      });
      const t = performance.now();
      const vs = sol.space.fields[0].space.scalar, ps = sol.space.fields[1].space.scalar;
      const pScalar = scalarOf(exactP.value);
      const perCell = perCellArrays(mesh.nCells);
      const uField = vectorLagrangeField(vs, dim, sol.velocity);
      const [eu, iu] = fieldErrors([uField, vectorLagrangeField(vs, dim, interpolateVector(vs, dim, exactU.value))], exactU, { divergence: true, perCell });
      const [ep, ip] = fieldErrors([lagrangeField(ps, sol.pressure), lagrangeField(ps, interpolate(ps, pScalar))], exactP, { meanFree });
      const named = (u: typeof eu, p: typeof ep) => ({ L2_u: u.L2, H1semi_u: u.H1semi, H1_u: u.H1, div_u: u.div!, maxNodal_u: u.maxNodal, L2_p: p.L2 });
      return {
        dofs: sol.space.nDofs,
        errors: pickNorms(named(eu, ep), norms),
        interpolationErrors: pickNorms(named(iu, ip), norms),
        quasiOptimality: null,
        solver: sol.solver,
        // Where the velocity error lives (src/study/where.ts); the files show its first component.
        errorCells: { perCell, field: uField, exact: firstComponent(exactU.value, dim), norms: { L2: 'L2_u', H1semi: 'H1semi_u' } },
        seconds: { assemble: sol.seconds.space + sol.seconds.assemble, solve: sol.seconds.solve, errors: seconds(t) },
      };
    },
  };
}
