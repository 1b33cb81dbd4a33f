import { mkdirSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { findStudyFiles, loadStudy, type LoadedStudy } from '../study/load.ts';
import { addLevel, completeStudy, preflightStudy, prepareStudy, type PreparedStudy } from '../study/runner.ts';
import { runLevel } from '../study/level.ts';
import type { StudyResult } from '../study/result.ts';
import { levelsCsv } from '../report/csv.ts';
import { resultJson } from '../report/json.ts';
import { fileStem } from '../report/series.ts';
import { makeLevelPool } from '../parallel/pool.ts';
import { makeProgress, type Progress } from './progress.ts';

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
  /** Worker threads for levels (1: run in this thread). Results are identical either way. */
  jobs?: number;
  /** Smallest largest-level size (unknowns) for which worker threads are used (default PARALLEL_MIN_DOFS); they are
   *  also used only when the other levels hold at least as many unknowns as the largest (see workersPay); 0 uses
   *  them whatever the sizes. */
  parallelMinDofs?: number;
  /** Called when a study finishes, in the order of the study files. */
  onResult?: (r: StudyResult) => void;
  onProblem?: (p: InputProblem) => void;
}

/** Loads and runs every study under the paths. A bad study is recorded and skipped; the others still run, and
 *  each finished level is written to <out>/<study>.csv and .json as soon as it is known. */
export async function executeStudies(paths: string[], opts: ExecuteOptions): Promise<Execution> {
  const problems: InputProblem[] = [];
  const problem = (p: InputProblem) => { problems.push(p); opts.onProblem?.(p); };
  const asProblem = (err: unknown, study: string, file: string): InputProblem => {
    if (err instanceof RungsInputError || err instanceof RungsNumericalError) return { study, file, message: err.message };
    const e = err as Error;
    return { study, file, message: `unexpected failure: ${e.stack ?? e.message}` };
  };
  let files: string[];
  try {
    files = findStudyFiles(paths);
  } catch (err) {
    if (err instanceof RungsInputError) { problem({ study: '', file: err.where ?? '', message: err.message }); return { results: [], problems }; }
    throw err;
  }
  if (files.length === 0) problem({ study: '', file: paths.join(' '), message: `no study files (*.study.ts) found in ${paths.join(', ')}` });
  let outOk = true;
  try { mkdirSync(opts.out, { recursive: true }); } catch (err) {
    outOk = false;
    problem({ study: '', file: opts.out, message: `cannot create the output folder ${opts.out}: ${(err as Error).message}; give a writable --out folder` });
  }

  // Load and validate every study first: bad input is reported before any level runs.
  const loadedStudies: LoadedStudy[] = [];
  for (const file of files) {
    const shown = relative(process.cwd(), file) || file;
    try { loadedStudies.push(await loadStudy(file)); } catch (err) { problem(asProblem(err, '', shown)); }
  }
  // One name in two files would write the same report files and baseline entry: neither runs, the others do.
  const clashes = nameClashes(loadedStudies);
  const prepared: PreparedStudy[] = [];
  for (const loaded of loadedStudies) {
    const decl = loaded.declaration;
    const clash = clashes.get(loaded);
    if (clash) { problem({ study: decl.name, file: loaded.file, message: clash }); continue; }
    try {
      const levels = opts.quick ? Math.min(decl.ladder.quick ?? 3, decl.ladder.n.length) : opts.levels;
      const p = prepareStudy(loaded, { levels, out: opts.out });
      await preflightStudy(p);
      prepared.push(p);
    } catch (err) {
      problem(asProblem(err, decl.name, loaded.file));
    }
  }
  const progress = makeProgress(process.stderr, !!opts.quiet);
  const onLevel = (p: PreparedStudy) => { if (outOk) writePartial(opts.out, p.result); };
  const broken = new Set<PreparedStudy>();
  const jobs = Math.max(1, opts.jobs ?? 1);
  const totalLevels = prepared.reduce((s, p) => s + p.total, 0);
  if (jobs === 1 || totalLevels <= 1 || !workersPay(prepared, opts.parallelMinDofs ?? PARALLEL_MIN_DOFS)) await runSerial(prepared, progress, onLevel, (p, err) => { broken.add(p); problem(asProblem(err, p.result.study, p.loaded.file)); });
  else await runParallel(prepared, Math.min(jobs, totalLevels), progress, onLevel, (p, err) => { broken.add(p); problem(asProblem(err, p.result.study, p.loaded.file)); });
  progress.clear();

  const results: StudyResult[] = [];
  for (const p of prepared) {
    if (broken.has(p)) continue;
    try {
      const r = completeStudy(p);
      results.push(r);
      opts.onResult?.(r);
    } catch (err) {
      problem(asProblem(err, p.result.study, p.loaded.file));
    }
  }
  return { results, problems };
}

/** The message for each study whose name another file of the run also declares (names equal up to case count too:
 *  they write the same report files on case-insensitive file systems). */
function nameClashes(loaded: readonly LoadedStudy[]): Map<LoadedStudy, string> {
  const byName = new Map<string, LoadedStudy[]>();
  for (const l of loaded) {
    const key = l.declaration.name.toLowerCase();
    byName.set(key, [...(byName.get(key) ?? []), l]);
  }
  const out = new Map<LoadedStudy, string>();
  for (const group of byName.values()) {
    if (group.length < 2) continue;
    for (const l of group) {
      const others = group.filter((o) => o !== l).map((o) => `${o.file} (study '${o.declaration.name}')`).join(' and ');
      out.set(l, `${l.file} (study '${l.declaration.name}'): name: also declared by ${others}; study names must be unique in a run ` +
        '(they name the report files and the baseline entry, whatever their case): rename one; neither runs until then');
    }
  }
  return out;
}

type Fail = (p: PreparedStudy, err: unknown) => void;

/** Below this many unknowns on the largest level, starting worker threads (each loads the study files and derives
 *  the source terms again) costs more than it saves, so the run stays in this thread (measured: the bundled
 *  studies take 7.7 s serial and 10.6 s on 2 workers). */
export const PARALLEL_MIN_DOFS = 100_000;

/** Estimated unknowns of every level: (n · degree)^dim cells' worth of nodes. */
function levelDofs(prepared: PreparedStudy[]): number[] {
  return prepared.flatMap((p) => {
    const d = p.loaded.declaration;
    const side = Math.max(1, ...d.domain.bbox.map(([a, b]) => b - a));
    return d.ladder.n.slice(0, p.total).map((n) => (n * (d.discretization.degree ?? 1) * side) ** d.domain.dim);
  });
}

/** Worker threads pay only when the largest level is large and there is as much work again to run beside it: a
 *  single ladder costs about its finest level (the others hold a third of its unknowns in 2D), which no worker can
 *  shorten. Measured on 2 shared cores: one seven-level P1 ladder up to 1M unknowns 12.4 s serial vs 13.5 s on 2
 *  workers; two such ladders 21.1 vs 20.8 s (memory bandwidth, not cores, bounds them there). */
function workersPay(prepared: PreparedStudy[], minDofs: number): boolean {
  if (minDofs <= 0) return true; // asked for whatever the sizes (the tests of the parallel path do)
  const dofs = levelDofs(prepared);
  const largest = Math.max(0, ...dofs);
  const rest = dofs.reduce((a, b) => a + b, 0) - largest;
  return largest >= minDofs && rest >= largest;
}

async function runSerial(prepared: PreparedStudy[], progress: Progress, onLevel: (p: PreparedStudy) => void, fail: Fail): Promise<void> {
  for (const p of prepared) {
    const decl = p.loaded.declaration;
    try {
      for (let i = 0; i < p.total; i++) {
        progress.levelStart(decl.name, i, p.total);
        const level = await runLevel(decl, p.loaded.file, p.problem, i, p.norms, p.solver, p.env);
        addLevel(p, level);
        progress.levelDone(decl.name, level, p.total);
        onLevel(p);
      }
    } catch (err) {
      progress.clear();
      fail(p, err);
    }
  }
}

/** Levels of all studies on a worker pool, the costliest first (cost ~ n^dim · degree²) so the pool stays busy. */
async function runParallel(prepared: PreparedStudy[], jobs: number, progress: Progress, onLevel: (p: PreparedStudy) => void, fail: Fail): Promise<void> {
  const pool = makeLevelPool(jobs);
  const tasks = prepared.flatMap((p) => Array.from({ length: p.total }, (_, index) => {
    const d = p.loaded.declaration;
    const cost = d.ladder.n[index] ** d.domain.dim * (d.discretization.degree ?? 1) ** 2;
    return { p, index, cost };
  }));
  tasks.sort((a, b) => b.cost - a.cost);
  try {
    await Promise.all(tasks.map(async ({ p, index }) => {
      try {
        const level = await pool.run({ file: p.loaded.file, index, out: p.env.out, norms: p.norms, data: p.env.data });
        if (failed(p)) return;
        addLevel(p, level);
        progress.levelDone(p.result.study, level, p.total);
        onLevel(p);
      } catch (err) {
        if (!failed(p)) { markFailed(p); fail(p, err); }
      }
    }));
  } finally {
    await pool.close();
  }
}

const failedMark = new WeakSet<PreparedStudy>();
const failed = (p: PreparedStudy) => failedMark.has(p);
const markFailed = (p: PreparedStudy) => failedMark.add(p);

function writePartial(out: string, partial: StudyResult): void {
  const stem = fileStem(partial.study);
  try {
    writeFileSync(join(out, `${stem}.csv`), levelsCsv(partial));
    writeFileSync(join(out, `${stem}.json`), resultJson(partial));
  } catch {
    // Reported once by the final write of the run.
  }
}
