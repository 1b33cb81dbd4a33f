import { RungsInputError } from '../../errors.ts';
import { solveNonlinearDiffusion } from '../../fem/discretizations/nonlinear-diffusion.ts';
import { interpolate, lagrangeField } from '../../fem/field/lagrange-field.ts';
import { errorNormsOf, perCellArrays } from '../../norms/errors.ts';
import type { LagrangeDiscretization } from '../declaration.ts';
import { DEFAULT_ERROR_FRACTION } from '../algebraic.ts';
import { seconds, type LevelDiscretization } from './types.ts';
import { solutionDependent, systemData } from './system-data.ts';
import { pickNorms, refuseRobin } from './system-common.ts';
import { solutionOf } from '../../equation/manufactured.ts';
import { lagrangeSpace } from '../../fem/dofmap/dofmap.ts';

/** rungs's own Lagrange elements for −∇·(κ(u)∇u) + r(u) = f by Newton's method. Newton stops once its last update
 *  (the nonlinear error it may leave) is a fraction of the interpolation error in the H1 seminorm, as the linear
 *  solver does for the scalar equation; that update is recorded as the level's algebraic floor. */
export function builtInNonlinearDiffusion(disc: LagrangeDiscretization): LevelDiscretization {
  return {
    label: `P${disc.degree} Lagrange, Newton`,
    async run({ decl, file, problem, mesh, solver, norms }) {
      const derived = problem.derived;
      const args = problem.pde.preset?.args as { conductivity: string; reaction?: string } | undefined;
      if (!derived || !args) throw new RungsInputError(`${file} (study '${decl.name}'): nonlinear diffusion needs the exact solution as a formula`, file);
      refuseRobin(problem, decl.name, file);
      const data = systemData(decl.name, derived);
      // u and ∇u of the derivation (its k and flux are not this equation's: only u and ∇u are used, for the errors).
      const exact = solutionOf(derived);
      const dTags = problem.byName.dirichlet.u ?? [];
      const nTags = problem.byName.neumann.balance ?? [];
      const t0 = performance.now();
      const space = lagrangeSpace(mesh, disc.degree);
      const interp = lagrangeField(space, interpolate(space, exact.u));
      const [ie] = errorNormsOf([interp], exact);
      const fraction = decl.solver?.errorFraction ?? DEFAULT_ERROR_FRACTION;
      const target = fraction > 0 && ie.H1semi > 0 ? fraction * ie.H1semi : undefined;
      const tInterp = seconds(t0);
      const sol = solveNonlinearDiffusion({
        mesh, degree: disc.degree,
        conductivity: solutionDependent(args.conductivity, 'pde.conductivity'),
        reaction: args.reaction ? solutionDependent(args.reaction, 'pde.reaction') : undefined,
        source: data.point('source_balance'),
        dirichlet: dTags.length ? { tags: dTags, value: (x, y, z, out) => { out[0] = exact.u(x, y, z); } } : undefined,
        neumann: nTags.length ? { tags: nTags, value: data.normal('flux_balance') } : undefined,
        stopAt: target,
        solver,
      });
      const t = performance.now();
      const perCell = perCellArrays(mesh.nCells);
      const field = lagrangeField(sol.space.fields[0].space.scalar, sol.coefficients);
      const [e] = errorNormsOf([field], exact, { perCell });
      const all = (v: typeof e) => ({ L2: v.L2, H1semi: v.H1semi, H1: v.H1, maxNodal: v.maxNodal });
      const last = sol.steps[sol.steps.length - 1];
      return {
        dofs: sol.space.nDofs,
        errors: pickNorms(all(e), norms),
        interpolationErrors: pickNorms(all(ie), norms),
        quasiOptimality: null,
        solver: { ...last.linear, iterations: sol.steps.reduce((s, st) => s + st.linear.iterations, 0), message: `Newton: ${sol.steps.length} steps, updates ${sol.steps.map((s) => s.update.toExponential(1)).join(' → ')}` },
        algebraic: target !== undefined ? { estimate: sol.nonlinearError, target, fraction, floors: { H1semi: sol.nonlinearError } } : null,
        // Where the error lives (src/study/where.ts).
        errorCells: { perCell, field, exact: exact.u, norms: { L2: 'L2', H1semi: 'H1semi' } },
        seconds: { assemble: sol.seconds.space + sol.seconds.assemble, solve: sol.seconds.solve, errors: seconds(t) + tInterp },
      };
    },
  };
}
