// `--study <patterns...>`: run (list, check, hand data for) only some of the studies found under the paths.
import { basename } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { loadStudy } from '../study/load.ts';

/** A study file's own name: "tile-p1" for studies/tile-p1.study.ts (also .study.js / .study.mjs). */
export function fileStudyName(file: string): string {
  return basename(file).replace(/\.study\.(ts|js|mjs)$/, '');
}

/** A shell-style pattern as a whole-string test: * any run of characters, ? one character, all else literal. */
function patternTest(pattern: string): RegExp {
  const body = pattern.replace(/[.+^${}()|[\]\\]/g, '\\$&').replace(/\*/g, '.*').replace(/\?/g, '.');
  return new RegExp(`^${body}$`);
}

/** What --study selects: a study whose name (its `name` field) or file name (without .study.ts) matches any of the
 *  patterns. No patterns: every study. */
export interface StudySelection {
  readonly all: boolean;
  /** Matched by its file name alone (decidable before the file is loaded). */
  byFile(file: string): boolean;
  /** Matched by its file name or its declared name. */
  matches(file: string, name: string): boolean;
  /** The patterns as the user gave them, for messages. */
  readonly text: string;
}

export function studySelection(patterns: readonly string[] | undefined): StudySelection {
  const tests = (patterns ?? []).flatMap((p) => p.split(',')).map((p) => p.trim()).filter(Boolean).map(patternTest);
  const any = (s: string) => tests.some((t) => t.test(s));
  return {
    all: tests.length === 0,
    byFile: (file) => tests.length === 0 || any(fileStudyName(file)),
    matches: (file, name) => tests.length === 0 || any(fileStudyName(file)) || any(name),
    text: (patterns ?? []).join(', '),
  };
}

/** The study files --study selects: by file name, else by the name each declares (a file that cannot be loaded is
 *  kept when its file name matches, so that its error is reported; otherwise it was not asked for). */
export async function selectStudyFiles(files: string[], patterns: readonly string[] | undefined, paths: string[]): Promise<string[]> {
  const selection = studySelection(patterns);
  if (selection.all) return files;
  const kept: string[] = [];
  for (const file of files) {
    if (selection.byFile(file)) { kept.push(file); continue; }
    try { if (selection.matches(file, (await loadStudy(file)).declaration.name)) kept.push(file); } catch { /* not asked for */ }
  }
  if (!kept.length) {
    throw new RungsInputError(`--study ${selection.text}: no study under ${paths.join(', ')} has a name or file name that matches; rungs list ${paths.join(' ')} shows them`, '--study');
  }
  return kept;
}
