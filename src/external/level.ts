// One level of an external discretization: the solver runs in a private folder of its own, which is moved into place
// as the level folder once it is done; then rungs reads back what it wrote (src/study/external-level.ts turns it into
// a level result, integrating the errors of a VTK solution).
import { randomBytes } from 'node:crypto';
import { existsSync, renameSync, rmSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { runLevelCommand, showArgv, SolversStopped, type CommandRun } from './command.ts';
import { prepareLevelFolder, readLevelOutput } from './output.ts';
import { tailNote } from './tail.ts';
import type { LevelValues } from './placeholders.ts';
import type { ExternalDiscretization, ExternalLevelRun, ExternalOutput } from './types.ts';
import type { VtkFieldRequest } from './vtk/to-field.ts';
import { levelLabel, type LevelRef } from './where.ts';

export interface ExternalLevelInput {
  study: string;
  /** 0-based level index. */
  index: number;
  n: number;
  /** The level's mesh size as rungs sees it ({h}; used when the solver reports none). */
  h: number;
  /** The level folder (see levelFolder). The solver's {out} is a private folder beside it, moved here when done. */
  outDir: string;
  /** Error names the study measures; the errors protocol must report each. */
  norms?: readonly string[];
  /** Quantities the study analyses; the solver must report each. */
  quantities?: readonly string[];
  /** The study's generated manufactured data ({data}, RUNGS_DATA), when written. */
  data?: string;
  /** Studies with time: the final time and the level's steps ({T}, {steps}, {dt}). */
  time?: { T: number; steps: number; dt: number };
  /** The fields of a system to read from the solver's VTK file (the study builds them from its pde and `fields`). */
  fields?: readonly VtkFieldRequest[];
  signal?: AbortSignal;
}

/** Runs a level somewhere else than in a child process of rungs (src/scheduler/: as a job), in a folder of its own. */
export interface LevelRunner {
  /** The solver's {out}, instead of a private folder. */
  folder: string;
  /** Create the folder and clear stale protocol files before running (false: the job already ran there). */
  prepare: boolean;
  /** Move the folder into place as the level folder once read (false: leave it where it is). */
  move: boolean;
  /** The protocol to read back (default: the study's output). */
  output?: ExternalOutput;
  /** Runs the solver of the level; resolves when it exited with status 0. */
  run(values: LevelValues): Promise<CommandRun>;
  /** Errors after which the folder is left as it is (a job that runs on after rungs stopped waiting). */
  leave?(err: unknown): boolean;
}

/** Prefix of the private folders beside a level folder: `.level-3.run-<pid>-<random>` for `level-3`. */
const PRIVATE = /^\.(.+)\.run-(\d+)-[0-9a-f]+(?:\.old)?$/;

/** A fresh private folder name beside the level folder `dir`, unique to this process and level run. */
export function privateLevelFolder(dir: string): string {
  return join(dirname(dir), `.${basename(dir)}.run-${process.pid}-${randomBytes(4).toString('hex')}`);
}

/** Whether a name in a study's folder is a private level folder, and of which process. */
export function privateFolderOwner(name: string): number | null {
  const m = PRIVATE.exec(name);
  return m ? Number(m[2]) : null;
}

/** Replaces the level folder `dir` by `work` (rename, so readers of `dir` see the old folder or the new one). */
export function moveLevelIntoPlace(work: string, dir: string, level?: LevelRef): void {
  const old = `${work}.old`;
  try {
    if (existsSync(dir)) renameSync(dir, old);
    renameSync(work, dir);
    rmSync(old, { recursive: true, force: true });
  } catch (err) {
    throw new RungsInputError(`${levelLabel(level)}: cannot move the solver's output folder ${work} to ${dir} (${(err as Error).message}); give a writable output folder`, dir);
  }
}

/** Runs the solver of one level in a private folder, reads back what it wrote there and moves the folder into place as
 *  `level.outDir` (also when the level fails, so that its output can be looked at; not when the run was stopped). A
 *  `runner` runs it elsewhere (a job), in its own folder. */
export async function runExternalLevel(spec: ExternalDiscretization, level: ExternalLevelInput, runner?: LevelRunner): Promise<ExternalLevelRun> {
  const ref: LevelRef = { study: level.study, index: level.index, n: level.n };
  const work = runner?.folder ?? privateLevelFolder(level.outDir);
  const move = runner?.move ?? true;
  if (runner?.prepare ?? true) prepareLevelFolder(work, ref);
  // Messages name the level folder the user will find, not the private one.
  const placed = (err: unknown): unknown => {
    if (err instanceof RungsInputError) return new RungsInputError(err.message.split(work).join(level.outDir), err.where?.split(work).join(level.outDir));
    return err;
  };
  const values = {
    study: level.study, level: level.index + 1, n: level.n, h: level.h, degree: spec.degree, out: work, data: level.data,
    ...(level.time ? { steps: level.time.steps, dt: level.time.dt, T: level.time.T } : {}),
  };
  try {
    const run = runner ? await runner.run(values) : await runLevelCommand({ command: spec.command, timeoutSeconds: spec.timeoutSeconds, cwd: spec.cwd, env: spec.env }, values, {
      level: ref, signal: level.signal,
    });
    const t = performance.now();
    const output = readLevelOutput(runner?.output ?? spec.output, work, {
      level: ref, h: level.h, norms: level.norms, quantities: level.quantities, degree: spec.degree, field: spec.field,
      fields: level.fields, maxOutputBytes: spec.maxOutputBytes, steps: level.time?.steps,
      context: `; command: ${showArgv(run.argv)}${tailNote(run.stderr, run.stdout)}`,
    });
    if (!move) return { output, run, seconds: { solve: run.seconds, read: (performance.now() - t) / 1e3 } };
    moveLevelIntoPlace(work, level.outDir, ref);
    output.file = join(level.outDir, basename(output.file));
    output.warnings = output.warnings.map((w) => w.split(work).join(level.outDir));
    return { output, run, seconds: { solve: run.seconds, read: (performance.now() - t) / 1e3 } };
  } catch (err) {
    if (!move || runner?.leave?.(err)) throw move ? placed(err) : err;
    if (err instanceof SolversStopped || level.signal?.aborted) rmSync(work, { recursive: true, force: true });
    else if (existsSync(work)) try { moveLevelIntoPlace(work, level.outDir, ref); } catch { rmSync(work, { recursive: true, force: true }); }
    throw placed(err);
  }
}
