// An external level's output as a study level result: the errors the solver reported, or (for a VTK solution)
// the errors of its field integrated with src/norms like any rungs field, with those of its nodal interpolant.
import { errorNorms, type ErrorOptions } from '../norms/errors.ts';
import { interpolate, lagrangeField } from '../fem/field/lagrange-field.ts';
import type { ExactSolution, NormValues } from '../norms/types.ts';
import type { ExternalLevelRun } from '../external/index.ts';
import type { LevelResult } from './result.ts';

export interface ExternalResultOptions {
  /** 0-based level index and ladder parameter. */
  index: number;
  n: number | null;
  /** The exact solution; absent for a study that reports only quantities of interest. */
  exact?: ExactSolution;
  norms: readonly string[];
  /** Conductivity / reaction for the energy norm, and an optional quadrature degree. */
  errorOptions?: ErrorOptions;
  /** Also measure the nodal interpolant on the solver's nodes (VTK protocol; default true). */
  interpolation?: boolean;
  /** Symmetric problem: report ||u − u_h||_E / ||u − I_h u||_E (Céa's lemma bounds it by 1). */
  symmetric?: boolean;
}

/** A LevelResult row for an external level, and the quantities the solver reported. */
export function externalLevelResult(level: ExternalLevelRun, opts: ExternalResultOptions): { level: LevelResult; quantities: Record<string, number> } {
  const out = level.output;
  const pick = (v: Record<string, number>) => Object.fromEntries(opts.norms.map((nm) => [nm, v[nm]!]));
  const t = performance.now();
  let errors: Record<string, number>;
  let interpolationErrors: Record<string, number> | undefined;
  let quasiOptimality: number | null = null;
  let cells: number;
  if (out.kind === 'errors') {
    // The code's own errors, under the norm names the study declares (built-in names or its own).
    errors = pick(out.errors);
    cells = out.cells ?? Number.NaN;
  } else if (!opts.exact) {
    errors = {};
    cells = out.mesh.nCells;
  } else {
    const exact = opts.exact;
    const errs: NormValues = errorNorms(out.field, exact, opts.errorOptions);
    errors = pick(errs as unknown as Record<string, number>);
    cells = out.mesh.nCells;
    if (opts.interpolation ?? true) {
      const interp = errorNorms(lagrangeField(out.space, interpolate(out.space, exact.u)), exact, opts.errorOptions);
      interpolationErrors = pick(interp as unknown as Record<string, number>);
      if (opts.symmetric && interp.energy > 0) quasiOptimality = errs.energy / interp.energy;
    }
  }
  const tErrors = (performance.now() - t) / 1e3;
  return {
    level: {
      index: opts.index,
      n: opts.n,
      h: out.h,
      dofs: out.dofs,
      cells,
      errors,
      interpolationErrors,
      quasiOptimality,
      solver: null,
      seconds: { mesh: 0, assemble: 0, solve: level.seconds.solve, read: level.seconds.read, errors: tErrors, total: level.seconds.solve + level.seconds.read + tErrors },
    },
    quantities: { ...out.quantities },
  };
}
