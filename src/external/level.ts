// One level of an external discretization, end to end: prepare the level folder, run the solver, read its output
// back, and (for a VTK solution) integrate the errors with src/norms like any rungs field.
import { errorNorms, type ErrorOptions } from '../norms/errors.ts';
import { interpolate, lagrangeField } from '../fem/field/lagrange-field.ts';
import type { ExactSolution, NormValues } from '../norms/types.ts';
import type { LevelResult } from '../study/result.ts';
import { runLevelCommand, showArgv } from './command.ts';
import { prepareLevelFolder, readLevelOutput } from './output.ts';
import { tailNote } from './tail.ts';
import type { ExternalDiscretization, ExternalLevelRun } from './types.ts';
import type { LevelRef } from './where.ts';

export interface ExternalLevelInput {
  study: string;
  /** 0-based level index. */
  index: number;
  n: number;
  /** The level's mesh size as rungs sees it ({h}; used when the solver reports none). */
  h: number;
  /** The level folder {out} (see levelFolder). */
  outDir: string;
  /** Error names the study measures; the errors protocol must report each. */
  norms?: readonly string[];
  /** Quantities the study analyses; the solver must report each. */
  quantities?: readonly string[];
  signal?: AbortSignal;
}

/** Runs the solver of one level and reads back what it wrote. */
export async function runExternalLevel(spec: ExternalDiscretization, level: ExternalLevelInput): Promise<ExternalLevelRun> {
  const ref: LevelRef = { study: level.study, index: level.index, n: level.n };
  prepareLevelFolder(level.outDir, ref);
  const values = { study: level.study, level: level.index + 1, n: level.n, h: level.h, degree: spec.degree, out: level.outDir };
  const run = await runLevelCommand({ command: spec.command, timeoutSeconds: spec.timeoutSeconds, cwd: spec.cwd, env: spec.env }, values, {
    level: ref, signal: level.signal,
  });
  const t = performance.now();
  const output = readLevelOutput(spec.output, level.outDir, {
    level: ref, h: level.h, norms: level.norms, quantities: level.quantities, degree: spec.degree, field: spec.field,
    context: `; command: ${showArgv(run.argv)}${tailNote(run.stderr, run.stdout)}`,
  });
  return { output, run, seconds: { solve: run.seconds, read: (performance.now() - t) / 1e3 } };
}

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
  if (!opts.exact) {
    errors = {};
    cells = out.kind === 'errors' ? out.cells ?? Number.NaN : out.mesh.nCells;
  } else if (out.kind === 'errors') {
    errors = pick(out.errors);
    cells = out.cells ?? Number.NaN;
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
