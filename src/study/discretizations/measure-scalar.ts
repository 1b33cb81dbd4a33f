import type { FunctionSpace } from '../../fem/dofmap/types.ts';
import { errorNormsOf, perCellArrays } from '../../norms/errors.ts';
import type { DiscreteField, NormValues } from '../../norms/types.ts';
import type { Mesh } from '../../mesh/types.ts';
import type { StudyProblem } from '../problem.ts';
import { seconds } from './types.ts';
import type { LevelErrorCells } from '../where.ts';
import { interpolantField } from './scalar-lagrange.ts';
import { lagrangeFieldData } from '../../fem/field/lagrange-field.ts';

/** The errors of a scalar discrete field and, in the same pass, of the nodal interpolant I_h u of that degree
 *  (the best-approximation reference of Céa's lemma), with the Céa ratio for symmetric problems. */
export function measureField(
  field: DiscreteField, degree: number | undefined, mesh: Mesh, problem: StudyProblem, norms: readonly string[],
  interpKnown: NormValues | null = null, interpolant?: DiscreteField, space?: FunctionSpace,
): { output: { errors: Record<string, number>; interpolationErrors?: Record<string, number>; quasiOptimality: number | null; errorCells: LevelErrorCells }; seconds: number } {
  const t = performance.now();
  const exact = problem.exact!;
  const errOpts = { k: problem.coefficients.k, c: problem.coefficients.c };
  let interp = interpKnown;
  const withInterp = !interp && degree !== undefined && degree > 0;
  const interpField = withInterp ? (interpolant ?? interpolantField(mesh, degree, exact.u, space ?? null)) : null;
  // The errors per cell of the solution, in the same pass (src/study/where.ts; the totals are the same bits).
  const perCell = perCellArrays(mesh.nCells);
  const [errs, interpErrs] = errorNormsOf(interpField ? [field, interpField] : [field], exact, { ...errOpts, perCell });
  if (interpErrs) interp = interpErrs;
  const pick = (v: NormValues) => Object.fromEntries(norms.map((nm) => [nm, (v as unknown as Record<string, number>)[nm]]));
  const quasi = problem.symmetric && interp && interp.energy > 0 ? errs.energy / interp.energy : null;
  return {
    output: {
      errors: pick(errs), interpolationErrors: interp ? pick(interp) : undefined, quasiOptimality: quasi,
      errorCells: { perCell, field, exact: exact.u, norms: { L2: 'L2', H1semi: 'H1semi' }, ...vertexValuesOf(interpField, mesh) },
    },
    seconds: seconds(t),
  };
}

/** u at the vertices from a P1 interpolant (its coefficients: u at its nodes, which are the mesh's own coordinates,
 *  src/fem/dofmap/dofmap.ts), for the error file (where.ts); nothing for other interpolants, whose vertex nodes are
 *  mapped from the reference cell and may lie an ulp away. */
function vertexValuesOf(interp: DiscreteField | null, mesh: Mesh): { exactAtVertices?: Float64Array } {
  const data = interp ? lagrangeFieldData(interp) : null;
  if (!data || data.space.mesh !== mesh || data.space.dofCoords !== mesh.coords) return {};
  return { exactAtVertices: data.coeffs.subarray(0, mesh.nVertices) };
}
