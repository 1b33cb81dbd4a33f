// `rungs data`: a study's manufactured data handed to the user's solver — generated code in the languages asked
// for (with self-tests) and problem.json, or the values at the solver's own points.
import { readFileSync } from 'node:fs';
import { writeFileAtomic } from '../report/write.ts';
import { join, relative } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { checkLanguage, formulaText, LANGUAGES, type Language } from '../codegen/index.ts';
import { parseCsvTable } from '../csv/read.ts';
import { findStudyFiles, loadStudy } from '../study/load.ts';
import { buildProblem } from '../study/problem.ts';
import { studyBundle, writeStudyData } from '../study/data-files.ts';
import { fileStem } from '../study/names.ts';
import { valuesAtPoints } from '../study/values-at.ts';
import { problemLine } from './output.ts';
import { selectStudyFiles } from './select.ts';

export interface DataOptions {
  lang?: string;
  out: string;
  at?: string;
  values?: string;
  quiet?: boolean;
  /** --study: only studies whose name or file name matches one of these patterns. */
  study?: string[];
}

/** The languages of --lang (comma-separated; default all). */
export function parseLanguages(text: string | undefined): Language[] {
  if (text === undefined) return [...LANGUAGES];
  return text.split(',').map((s) => s.trim()).filter(Boolean).map((s) => checkLanguage(s, '--lang'));
}

export async function dataCommand(paths: string[], o: DataOptions): Promise<number> {
  let status = 0;
  const fail = (file: string, message: string) => { process.stderr.write(problemLine(file, message) + '\n'); status = 2; };
  let languages: Language[];
  let files: string[];
  try {
    languages = parseLanguages(o.lang);
    files = findStudyFiles(paths);
    if (o.study?.length) files = await selectStudyFiles(files, o.study, paths);
  } catch (err) {
    if (err instanceof RungsInputError) { fail('', err.message); return status; }
    throw err;
  }
  if (o.at !== undefined && files.length !== 1) {
    fail('', `--at: values at points are for one study; ${files.length} study files were given (${paths.join(', ')})`);
    return status;
  }
  for (const file of files) {
    const shown = relative(process.cwd(), file) || file;
    try {
      const { declaration: decl } = await loadStudy(file);
      const problem = buildProblem(decl, shown);
      if (o.at !== undefined) {
        const bundle = studyBundle(decl, problem);
        if (!bundle) throw new RungsInputError(`${shown} (study '${decl.name}'): exact: values can be given only for a study whose exact solution is formulas`, shown);
        let text: string;
        try { text = readFileSync(o.at, 'utf8'); } catch (err) {
          throw new RungsInputError(`--at: cannot read ${o.at} (${(err as Error).message}); give a CSV file of points with columns x, y, z, t, nx, ny, nz`, o.at);
        }
        const table = valuesAtPoints(bundle, parseCsvTable(text, o.at), o.at);
        const csv = [table.header.join(','), ...table.rows.map((r) => r.map((v) => String(v)).join(','))].join('\n') + '\n';
        if (o.values) writeFileAtomic(o.values, csv); else process.stdout.write(csv);
        continue;
      }
      const dir = writeStudyData(join(o.out, fileStem(decl.name), 'data'), decl, problem, languages);
      if (!o.quiet) {
        const bundle = studyBundle(decl, problem)!;
        process.stdout.write(`${decl.name}  (${shown}) → ${relative(process.cwd(), dir) || dir}\n`);
        for (const f of bundle.functions) {
          f.outputs.forEach((node, i) => process.stdout.write(`  ${f.outputNames[i]} = ${formulaText(node, 'starstar')}\n`.replace(/^ {2}(\S+) =/, (_m, n: string) => `  ${f.outputs.length === 1 ? f.name : `${f.name}[${i}]`}${n === f.name ? '' : ` (${n})`} =`)));
        }
      }
    } catch (err) {
      if (!(err instanceof RungsInputError)) throw err;
      fail(shown, err.message);
    }
  }
  return status;
}

