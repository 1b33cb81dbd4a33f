// `rungs fit` writes its reports next to whatever --out names, which may be the folder of the table it reads. These
// checks keep every input file out of the list of files the report writers will replace.
import { realpathSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { fileStem } from '../study/names.ts';
import { RUN_REPORT_NAMES, studyReportNames } from '../report/write.ts';

// One list of report file names: the writers' own (src/report/write.ts).
const studyReportFiles = studyReportNames;
const RUN_REPORT_FILES = RUN_REPORT_NAMES;

/** Device and inode of a path (so a symbolic or hard link, or another spelling of the path, still matches), or
 *  null when it does not exist. */
function identity(path: string): string | null {
  try {
    const st = statSync(path);
    return `${st.dev}:${st.ino}`;
  } catch {
    return null;
  }
}

function canonical(path: string): string {
  try { return realpathSync(path); } catch { return resolve(path); }
}

/** The input among `inputs` that `outDir/name` would overwrite, or null. */
function overwrites(outDir: string, name: string, inputs: ReadonlyMap<string, string | null>): string | null {
  const target = join(outDir, name);
  const id = identity(target);
  const path = canonical(target);
  for (const [input, inputId] of inputs) {
    if ((id !== null && id === inputId) || path === canonical(input)) return input;
  }
  return null;
}

export interface ReportNaming {
  /** The study name to write under: the given one, or one with "-fit" (and a number) added. */
  study: string;
  /** A sentence saying why the name was changed, or null when it was not. */
  renamed: string | null;
}

/**
 * The study name under which `rungs fit` may write into `outDir` without replacing any of `inputs`. A study file name
 * that would overwrite an input gets "-fit" (then "-fit-2", …); a run-wide report name (summary.csv, index.html) that
 * would overwrite an input is refused as bad input, naming the file and what to do.
 */
export function reportNamesAvoiding(outDir: string, study: string, inputs: readonly string[]): ReportNaming {
  const ids = new Map(inputs.map((p) => [p, identity(p)] as const));
  for (const name of RUN_REPORT_FILES) {
    const hit = overwrites(outDir, name, ids);
    if (hit !== null) {
      throw new RungsInputError(
        `--out ${outDir}: the fit would write ${name} over its input table ${hit}; give another --out folder ` +
        `(or rename the table) — rungs fit never writes over its inputs`, '--out');
    }
  }
  const clash = (name: string) => studyReportFiles(fileStem(name)).map((f) => overwrites(outDir, f, ids)).find((h) => h !== null) ?? null;
  const first = clash(study);
  if (first === null) return { study, renamed: null };
  for (let k = 1; k < 1000; k++) {
    const candidate = k === 1 ? `${study}-fit` : `${study}-fit-${k}`;
    if (clash(candidate) === null) {
      return {
        study: candidate,
        renamed: `the reports of '${study}' in ${outDir} would overwrite the input table ${first}, so they are named '${candidate}' ` +
          `(${studyReportFiles(fileStem(candidate)).slice(0, 5).join(', ')}); rungs fit never writes over its inputs`,
      };
    }
  }
  throw new RungsInputError(`--out ${outDir}: no report name avoids the input ${first}; give another --out folder`, '--out');
}
