import { accessSync, closeSync, constants, fsyncSync, mkdirSync, openSync, readdirSync, renameSync, rmSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { writeFileAtomic, writeFileAtomicFrom, removeStaleTempFiles } from '../files/atomic-write.ts';

export { writeFileAtomic, writeFileAtomicFrom, removeStaleTempFiles };
import type { StudyResult } from '../study/result.ts';
import { levelsCsv, quantitiesCsv, summaryCsv } from './csv.ts';
import { htmlReport, type HtmlMeta } from './html.ts';
import type { InputProblem } from './input-problem.ts';
import { resultForJson } from './json.ts';
import { junitXml } from './junit.ts';
import { fileStem } from './series.ts';
import { svgPlot, type PlotOptions } from './svg.ts';
import { latexTable, markdownTable } from './tables.ts';

/** Per study: csv, json, md, tex, svg; across studies: summary (summary.csv), html (index.html), junit (junit.xml). */
export type ReportFormat = 'csv' | 'json' | 'md' | 'tex' | 'svg' | 'summary' | 'html' | 'junit';
export const DEFAULT_FORMATS: readonly ReportFormat[] = ['csv', 'json', 'md', 'tex', 'svg', 'summary', 'html'];

export interface WriteOptions {
  formats?: readonly ReportFormat[];
  /** Studies whose reports hold only part of their ladder (a run stopped by a signal): their JSON says
   *  `"complete": false`. Every other study's says `"complete": true`. */
  incomplete?: ReadonlySet<string>;
  /** Set when the run was stopped before its end: the HTML report opens with this text as a banner. */
  interrupted?: string;
  inputProblems?: readonly InputProblem[];
  meta?: Omit<HtmlMeta, 'inputProblems'>;
  plot?: PlotOptions;
  /** Name of the JUnit test suite (default "rungs"). */
  suiteName?: string;
}

export interface WriteFailure {
  path: string;
  message: string;
}

export interface WriteOutcome {
  written: string[];
  failed: WriteFailure[];
}

/** A study's result as the JSON report: `complete` first (false while its levels are still coming in, or when the
 *  run was stopped before its ladder was done), then the whole result. */
export function studyJson(result: StudyResult, complete: boolean): string {
  return JSON.stringify({ complete, ...resultForJson(result) }, null, 2) + '\n';
}

/** Every file name a study's reports use (see writeReportFiles). */
export function studyReportNames(stem: string): string[] {
  return ['csv', 'json', 'md', 'tex', 'svg'].map((ext) => `${stem}.${ext}`).concat(`${stem}-quantities.csv`);
}

/** The run's own report files (summary.csv, index.html). */
export const RUN_REPORT_NAMES: readonly string[] = ['summary.csv', 'index.html', 'index.pdf'];

/**
 * Before a run: removes the previous run's summary and index and the reports of the studies this run will write, so
 * that nothing left from before looks like this run's result (a run that stops early leaves only what it wrote).
 * Returns the paths removed; a file that cannot be removed is left for the final write to report.
 */
export function removePreviousReports(outDir: string, studyStems: readonly string[]): string[] {
  const removed: string[] = [];
  for (const name of [...RUN_REPORT_NAMES, ...studyStems.flatMap(studyReportNames)]) {
    const path = join(outDir, name);
    try { unlinkSync(path); removed.push(path); } catch { /* absent, or a folder: nothing to do */ }
  }
  return removed;
}

/** Unique file stems per study, in order ("tile-p2", "tile-p2-2" if two names map to the same stem). */
function stems(results: readonly StudyResult[]): string[] {
  const seen = new Map<string, number>();
  return results.map((r) => {
    const stem = fileStem(r.study);
    const count = (seen.get(stem) ?? 0) + 1;
    seen.set(stem, count);
    return count === 1 ? stem : `${stem}-${count}`;
  });
}

/** Creates the folder and checks that it is writable; the error names the path and what would be valid. */
function prepareFolder(outDir: string): void {
  try {
    mkdirSync(outDir, { recursive: true });
    accessSync(outDir, constants.W_OK);
  } catch (err) {
    throw new RungsInputError(`cannot write reports to ${outDir}: ${(err as Error).message}; give a writable output folder`, outDir);
  }
}

/**
 * Writes every requested report into outDir. Each file is produced and written on its own, so a failure (a report
 * that throws, a file that cannot be written) is recorded and the other files are still written.
 * Throws RungsInputError only when the folder itself cannot be created or written.
 */
export function writeReportFiles(
  outDir: string,
  results: readonly StudyResult[],
  formatsOrOptions: readonly ReportFormat[] | WriteOptions = {},
): WriteOutcome {
  const options: WriteOptions = Array.isArray(formatsOrOptions)
    ? { formats: formatsOrOptions as readonly ReportFormat[] }
    : (formatsOrOptions as WriteOptions);
  const formats = new Set(options.formats ?? DEFAULT_FORMATS);
  prepareFolder(outDir);
  const outcome: WriteOutcome = { written: [], failed: [] };
  const emit = (name: string, make: () => string) => {
    const path = join(outDir, name);
    try {
      writeFileAtomic(path, make());
      outcome.written.push(path);
    } catch (err) {
      outcome.failed.push({ path, message: (err as Error).message });
    }
  };
  const names = stems(results);
  results.forEach((r, i) => {
    const stem = names[i];
    if (formats.has('csv')) emit(`${stem}.csv`, () => levelsCsv(r));
    if (formats.has('csv') && r.quantities?.length) emit(`${stem}-quantities.csv`, () => quantitiesCsv(r));
    if (formats.has('json')) emit(`${stem}.json`, () => studyJson(r, !options.incomplete?.has(r.study)));
    if (formats.has('md')) emit(`${stem}.md`, () => markdownTable(r));
    if (formats.has('tex')) emit(`${stem}.tex`, () => latexTable(r));
    if (formats.has('svg')) emit(`${stem}.svg`, () => `<?xml version="1.0" encoding="UTF-8"?>\n${svgPlot(r, options.plot)}\n`);
  });
  if (formats.has('summary')) emit('summary.csv', () => summaryCsv(results));
  if (formats.has('html')) {
    emit('index.html', () => htmlReport(results, { ...options.meta, plot: options.plot, inputProblems: options.inputProblems, interrupted: options.interrupted }));
  }
  if (formats.has('junit')) {
    emit('junit.xml', () => junitXml(results, { suiteName: options.suiteName ?? 'rungs', inputErrors: options.inputProblems }));
  }
  return outcome;
}

/** Same as writeReportFiles, returning one line per file that could not be written ("path: reason"). */
export function writeReports(
  outDir: string,
  results: readonly StudyResult[],
  formatsOrOptions: readonly ReportFormat[] | WriteOptions = {},
): string[] {
  return writeReportFiles(outDir, results, formatsOrOptions).failed.map((f) => `cannot write ${f.path}: ${f.message}`);
}
