import { solveLagrange } from '../../fem/discretizations/lagrange.ts';
import { lagrangeSpace } from '../../fem/dofmap/dofmap.ts';
import type { FunctionSpace } from '../../fem/dofmap/types.ts';
import { interpolate, lagrangeField } from '../../fem/field/lagrange-field.ts';
import { errorNormsOf } from '../../norms/errors.ts';
import type { DiscreteField, NormValues } from '../../norms/types.ts';
import type { Mesh } from '../../mesh/types.ts';
import type { LagrangeDiscretization } from '../declaration.ts';
import type { LevelContext } from '../context.ts';
import { algebraicTie, DEFAULT_ERROR_FRACTION, type AlgebraicTie } from '../algebraic.ts';
import { seconds, type LevelDiscretization } from './types.ts';
import { measureField } from './measure-scalar.ts';

/** Cells sampled for the interpolation-error estimate that sets the solver target (every cell below this). */
const TARGET_SAMPLE_CELLS = 50_000;

/** rungs's own continuous Lagrange elements for the steady scalar diffusion–convection–reaction equation; the
 *  solver stops once its algebraic error is a small fraction of the interpolation error (algebraic.ts). */
export function scalarLagrange(disc: LagrangeDiscretization): LevelDiscretization {
  return {
    label: `P${disc.degree} Lagrange`,
    async run({ decl, problem, mesh, solver, norms }) {
      const { exact, coefficients, boundary } = problem;
      const errOpts = { k: coefficients.k, c: coefficients.c };
      const tSpace0 = performance.now();
      const space = lagrangeSpace(mesh, disc.degree);
      const tSpace = seconds(tSpace0);
      const fraction = decl.solver?.errorFraction ?? DEFAULT_ERROR_FRACTION;
      let stopWhen: LevelContext['solver']['stopWhen'];
      let interp: NormValues | null = null;
      let tie: AlgebraicTie | null = null;
      let tInterp = 0;
      let interpolant: DiscreteField | null = null;
      if (problem.symmetric) {
        let estimate: NormValues | null = null;
        if (fraction > 0) {
          // Estimate I_h u's errors first (on a sample of cells on large meshes: a tolerance needs no more); they set
          // how small the algebraic error must be. The reported interpolation errors are integrated in full later.
          const t0 = performance.now();
          const stride = Math.max(1, Math.floor(mesh.nCells / TARGET_SAMPLE_CELLS));
          interpolant = lagrangeField(space, interpolate(space, exact!.u));
          [estimate] = errorNormsOf([interpolant], exact!, { ...errOpts, cellStride: stride });
          if (stride === 1) interp = estimate;
          tInterp = seconds(t0);
        }
        tie = algebraicTie(estimate, fraction, mesh, space.dofCoords, coefficients.k);
        const target = tie.target;
        if (target > 0) stopWhen = ({ energyErrorEstimate }) => energyErrorEstimate !== undefined && energyErrorEstimate <= target;
      }
      // Only the field, the statistics and the times are kept: the assembled system (the matrix, about a quarter of
      // a level's memory) is left for collection before the errors are integrated (their arrays are allocated then).
      const { field, space: solSpace, solver: stats, seconds: solSeconds } = solveLagrange({ mesh, degree: disc.degree, coefficients, boundary, quadrature: disc.quadrature, space, solver: { ...solver, stopWhen } });
      const m = measureField(field, disc.degree, mesh, problem, norms, interp, interpolant ?? undefined, solSpace);
      return {
        dofs: field.nDofs,
        ...m.output,
        solver: stats,
        algebraic: tie && stats?.energyErrorEstimate !== undefined && Number.isFinite(stats.energyErrorEstimate)
          ? { estimate: stats.energyErrorEstimate, target: tie.target, fraction: tie.fraction, floors: tie.floors(stats.energyErrorEstimate) }
          : null,
        seconds: { assemble: tSpace + solSeconds.assemble, solve: solSeconds.solve, errors: m.seconds + tInterp },
      };
    },
  };
}

/** I_h u on the discrete solution's own space when it is a Lagrange field of that degree, else on a new one. */
export function interpolantField(mesh: Mesh, degree: number, u: (x: number, y: number, z: number) => number, space: FunctionSpace | null): DiscreteField {
  const sp = space ?? lagrangeSpace(mesh, degree);
  return lagrangeField(sp, interpolate(sp, u));
}
