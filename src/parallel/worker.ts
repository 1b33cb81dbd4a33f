// A worker thread of the level pool: loads a study file (once per thread), derives its PDE data, runs one level.
import { loadStudy, type LoadedStudy } from '../study/load.ts';
import { buildProblem, type StudyProblem } from '../study/problem.ts';
import { runLevel } from '../study/level.ts';
import { settleBackgroundWrites } from '../files/background-write.ts';
import { sweepMember } from '../study/sweep.ts';
import { solverSettings } from '../study/runner.ts';
import type { NormName } from '../study/declaration.ts';
import type { LevelResult } from '../study/result.ts';
import { RungsInputError, RungsNumericalError } from '../errors.ts';

export interface LevelTask {
  file: string;
  index: number;
  out: string;
  /** The norms the main thread settled for the study (built-in, or an external code's own). */
  norms: string[];
  /** The study's generated manufactured data folder, when written by the main thread. */
  data?: string;
  /** For a study that sweeps a coefficient: which value (src/study/sweep.ts). */
  member?: number;
  /** The study's level count and whether to write error files (src/study/where.ts). */
  total?: number;
  errorFiles?: boolean;
}

export type LevelReply =
  | { ok: true; level: LevelResult }
  | { ok: false; error: { kind: 'input' | 'numerical' | 'other'; message: string; where?: string } };

const cache = new Map<string, Promise<{ loaded: LoadedStudy; problem: StudyProblem }>>();

function prepared(file: string, member: number | undefined) {
  const key = member === undefined ? file : `${file}\u0000${member}`;
  let hit = cache.get(key);
  if (!hit) {
    hit = loadStudy(file).then((loaded) => {
      const decl = member === undefined ? loaded.declaration : sweepMember(loaded.declaration, member);
      return { loaded: { file: loaded.file, declaration: decl }, problem: buildProblem(decl, loaded.file) };
    });
    cache.set(key, hit);
  }
  return hit;
}

export default async function runLevelTask(task: LevelTask): Promise<LevelReply> {
  try {
    const { loaded, problem } = await prepared(task.file, task.member);
    const decl = loaded.declaration;
    const level = await runLevel(decl, loaded.file, problem, task.index, task.norms as NormName[], solverSettings(decl), { out: task.out, data: task.data, total: task.total, errorFiles: task.errorFiles });
    // The level's files are written once it is reported done (the other thread may read them at once).
    await settleBackgroundWrites();
    return { ok: true, level };
  } catch (err) {
    const e = err as Error;
    const kind = err instanceof RungsInputError ? 'input' : err instanceof RungsNumericalError ? 'numerical' : 'other';
    return { ok: false, error: { kind, message: kind === 'other' ? (e.stack ?? e.message) : e.message, where: (err as RungsInputError).where } };
  }
}
