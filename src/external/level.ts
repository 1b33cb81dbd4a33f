// One level of an external discretization: prepare the level folder, run the solver, read its output back
// (src/study/external-level.ts turns it into a level result, integrating the errors of a VTK solution).
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
  /** The study's generated manufactured data ({data}, RUNGS_DATA), when written. */
  data?: string;
  signal?: AbortSignal;
}

/** Runs the solver of one level and reads back what it wrote. */
export async function runExternalLevel(spec: ExternalDiscretization, level: ExternalLevelInput): Promise<ExternalLevelRun> {
  const ref: LevelRef = { study: level.study, index: level.index, n: level.n };
  prepareLevelFolder(level.outDir, ref);
  const values = { study: level.study, level: level.index + 1, n: level.n, h: level.h, degree: spec.degree, out: level.outDir, data: level.data };
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
