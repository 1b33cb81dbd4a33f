import { isAbsolute, resolve } from 'node:path';
import type { ExternalDiscretization } from './types.ts';
import { splitCommandWords } from './words.ts';

/** Whether a command word is a path written relative to the study file: it starts with ./ or ../ (as a relative path
 *  in a tsconfig or an import does). Bare words ("python3", "solver.py", "--n") keep their meaning: a program looked up
 *  on PATH, an argument the solver reads from its working folder. */
export function isStudyRelative(word: string): boolean {
  return word.startsWith('./') || word.startsWith('../') || word === '.' || word === '..';
}

function resolveWords(command: string | string[], studyDir: string, where: string): string | string[] {
  const words = typeof command === 'string' ? splitCommandWords(command, where) : command;
  if (!words.some(isStudyRelative)) return command;
  return words.map((w) => (isStudyRelative(w) ? resolve(studyDir, w) : w));
}

/**
 * The external discretization with the paths it names made independent of the folder rungs runs in: every word of
 * `command` and `preflight` that starts with ./ or ../ is resolved against the study file's folder, and so is a
 * relative `cwd`. A study and its solver can then sit together anywhere and run from any folder.
 */
export function resolveStudyPaths(disc: ExternalDiscretization, studyDir: string, where = 'discretization'): ExternalDiscretization {
  const out: ExternalDiscretization = { ...disc, command: resolveWords(disc.command, studyDir, `${where}.command`) };
  if (disc.preflight !== undefined) out.preflight = resolveWords(disc.preflight, studyDir, `${where}.preflight`);
  if (disc.cwd !== undefined && !isAbsolute(disc.cwd)) out.cwd = resolve(studyDir, disc.cwd);
  return out;
}
