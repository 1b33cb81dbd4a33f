import { mkdirSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { findStudyFiles, loadStudy, type LoadedStudy } from '../study/load.ts';
import { runStudy } from '../study/runner.ts';
import type { StudyResult } from '../study/result.ts';
import { levelsCsv } from '../report/csv.ts';
import { resultJson } from '../report/json.ts';
import { fileStem } from '../report/series.ts';
import { makeProgress } from './progress.ts';

export interface InputProblem {
  study: string;
  file: string;
  message: string;
}

export interface Execution {
  results: StudyResult[];
  problems: InputProblem[];
}

export interface ExecuteOptions {
  out: string;
  levels?: number;
  quick?: boolean;
  quiet?: boolean;
  /** Called when a study finishes. */
  onResult?: (r: StudyResult) => void;
  onProblem?: (p: InputProblem) => void;
}

/** Loads and runs every study under the paths. A bad study is recorded and skipped; the others still run, and
 *  each finished level is written to <out>/<study>.csv and .json as soon as it is known. */
export async function executeStudies(paths: string[], opts: ExecuteOptions): Promise<Execution> {
  const results: StudyResult[] = [];
  const problems: InputProblem[] = [];
  const problem = (p: InputProblem) => { problems.push(p); opts.onProblem?.(p); };
  let files: string[];
  try {
    files = findStudyFiles(paths);
  } catch (err) {
    if (err instanceof RungsInputError) { problem({ study: '', file: err.where ?? '', message: err.message }); return { results, problems }; }
    throw err;
  }
  if (files.length === 0) problem({ study: '', file: paths.join(' '), message: `no study files (*.study.ts) found in ${paths.join(', ')}` });
  const progress = makeProgress(process.stderr, !!opts.quiet);
  let outOk = true;
  try { mkdirSync(opts.out, { recursive: true }); } catch (err) {
    outOk = false;
    problem({ study: '', file: opts.out, message: `cannot create the output folder ${opts.out}: ${(err as Error).message}; give a writable --out folder` });
  }
  for (const file of files) {
    let loaded: LoadedStudy | null = null;
    try {
      loaded = await loadStudy(file);
      const decl = loaded.declaration;
      const levels = opts.quick ? Math.min(decl.ladder.quick ?? 3, decl.ladder.n.length) : opts.levels;
      const result = await runStudy(loaded, {
        levels,
        onLevelStart: (s, i, total) => progress.levelStart(s, i, total),
        onLevel: (partial, level) => {
          progress.levelDone(partial.study, level, levels ?? decl.ladder.n.length);
          if (outOk) writePartial(opts.out, partial);
        },
      });
      progress.clear();
      results.push(result);
      opts.onResult?.(result);
    } catch (err) {
      progress.clear();
      if (err instanceof RungsInputError || err instanceof RungsNumericalError) {
        problem({ study: loaded?.declaration.name ?? '', file: loaded?.file ?? relative(process.cwd(), file), message: err.message });
      } else {
        const e = err as Error;
        problem({ study: loaded?.declaration.name ?? '', file: loaded?.file ?? relative(process.cwd(), file), message: `unexpected failure: ${e.stack ?? e.message}` });
      }
    }
  }
  return { results, problems };
}

function writePartial(out: string, partial: StudyResult): void {
  const stem = fileStem(partial.study);
  try {
    writeFileSync(join(out, `${stem}.csv`), levelsCsv(partial));
    writeFileSync(join(out, `${stem}.json`), resultJson(partial));
  } catch {
    // Reported once by the final write of the run.
  }
}
