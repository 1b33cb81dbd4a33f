import { solverTeam } from '../fem/team/team.ts';
import { ladderRungs, quickLevels } from '../study/time-ladder.ts';
import { mkdirSync, readdirSync, rmSync } from 'node:fs';
import { join, relative } from 'node:path';
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { findStudyFiles, loadStudy, type LoadedStudy } from '../study/load.ts';
import { expandSweeps, judgeSweeps, type SweepVerdict } from '../study/sweep.ts';
import { addLevel, completeStudy, levelStarting, preflightStudy, prepareStudy, type PreparedStudy } from '../study/runner.ts';
import { runLevel } from '../study/level.ts';
import { settleBackgroundWrites } from '../files/background-write.ts';
import type { StudyResult } from '../study/result.ts';
import type { LevelResult } from '../study/result.ts';
import { levelsCsv } from '../report/csv.ts';
import { fileStem } from '../report/series.ts';
import { removePreviousReports, removeStaleTempFiles, studyJson, writeFileAtomic } from '../report/write.ts';
import { makeLevelPool } from '../parallel/pool.ts';
import { acquireOutputLock, type OutputLock } from '../parallel/lock.ts';
import { allowSolvers, reapSolvers, solverGroups, SolversStopped, stopSolvers } from '../external/command.ts';
import { privateFolderOwner } from '../external/level.ts';
import { makeProgress, type Progress } from './progress.ts';
import { studySelection } from './select.ts';
import { levelKey, readLevelRecord, writeLevelRecord, type LevelRecordEntry } from './resume.ts';
import { runScheduledStudies, schedulerSettings, type SchedulerFlags } from './jobs-lane.ts';

export interface InputProblem {
  study: string;
  file: string;
  message: string;
}

export interface Execution {
  results: StudyResult[];
  problems: InputProblem[];
  /** The signal that stopped the run before its end, if one did. */
  interrupted: NodeJS.Signals | null;
  /** Studies among the results whose ladder was not run to its end (the run was stopped). */
  incomplete: Set<string>;
  /** Studies that were to run but had not finished a single level when the run was stopped. */
  notRun: string[];
  /** Levels reused from an earlier run (--resume), per study. */
  reused: Map<string, number[]>;
  /** The robustness verdict of each study that swept a coefficient (its members are among the results). */
  sweeps: SweepVerdict[];
}

/** Exit status of a run stopped by a signal: 128 + its number (SIGINT 130, SIGTERM 143), as shells report it. */
export function interruptStatus(signal: NodeJS.Signals): number {
  return signal === 'SIGTERM' ? 143 : 130;
}

/**
 * A run of `rungs run` or `rungs check` in progress: it holds the output folder's lock and hears SIGINT and SIGTERM.
 * The first signal stops the running external solvers' process groups and lets the run write the reports of what
 * finished (marked incomplete); a second one stops everything at once (SIGKILL to the solvers, exit).
 */
export interface ActiveRun {
  readonly out: string;
  /** The signal that stopped the run, once one arrived. */
  readonly interrupted: NodeJS.Signals | null;
  /** Resolves when a signal arrives. */
  readonly stopped: Promise<NodeJS.Signals>;
  /** After a signal: resolves once the solvers it stopped are gone. */
  solversStopped(): Promise<void>;
  /** Lines to show the user (a stale lock taken over). */
  readonly notes: string[];
  /** Ends the run: stops listening for signals, makes sure no solver's process is left, gives the lock back. */
  end(): Promise<void>;
}

export type RunStart = { ok: true; run: ActiveRun } | { ok: false; message: string };

/**
 * Starts a run into `out`: creates the folder, takes its lock (refused while another live run holds it: the message
 * names its pid and start time) and listens for SIGINT / SIGTERM. A folder that cannot be created or locked for any
 * other reason is left to the run to report (as it reports a folder it cannot write).
 */
export function beginRun(out: string, command: string, quiet = false): RunStart {
  let lock: OutputLock | null = null;
  const notes: string[] = [];
  try {
    mkdirSync(out, { recursive: true });
    const taken = acquireOutputLock(out, command);
    if (!taken.ok) return { ok: false, message: taken.message };
    lock = taken.lock;
    notes.push(...taken.notes);
  } catch {
    // Not writable: the run says so when it first writes there.
  }
  allowSolvers();
  let interrupted: NodeJS.Signals | null = null;
  let stopping: Promise<void> | null = null;
  let onStop!: (s: NodeJS.Signals) => void;
  const stopped = new Promise<NodeJS.Signals>((r) => { onStop = r; });
  const handler = (signal: NodeJS.Signals): void => {
    if (interrupted) {
      // Second signal: no more waiting.
      for (const g of solverGroups()) try { process.kill(-g, 'SIGKILL'); } catch { /* gone */ }
      lock?.release();
      process.stderr.write(`
${signal} again: stopped at once; the reports may be missing
`);
      process.exit(interruptStatus(signal));
    }
    interrupted = signal;
    if (!quiet) {
      process.stderr.write(`
${signal}: stopping the running solvers and writing the reports of the finished levels ` +
        `(marked incomplete); ${signal === 'SIGINT' ? 'press Ctrl-C again' : 'send it again'} to stop at once
`);
    }
    stopping = stopSolvers(new SolversStopped(`the run was stopped by ${signal}`));
    onStop(signal);
  };
  process.on('SIGINT', handler);
  process.on('SIGTERM', handler);
  let ended = false;
  return {
    ok: true,
    run: {
      out, stopped, notes,
      get interrupted() { return interrupted; },
      solversStopped: () => stopping ?? Promise.resolve(),
      async end() {
        if (ended) return;
        ended = true;
        process.removeListener('SIGINT', handler);
        process.removeListener('SIGTERM', handler);
        if (stopping) await stopping;
        await reapSolvers();
        lock?.release();
      },
    },
  };
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
  /** Reuse the finished levels of an earlier run into the same folder whose inputs are unchanged (see resume.ts). */
  resume?: boolean;
  /** --study: only the studies whose name or file name matches one of these patterns (select.ts); none: all. */
  only?: string[];
  /** The run this execution belongs to (its signals stop the execution early); none: nothing stops it. */
  run?: ActiveRun;
  /** --scheduler, --partition, --cancel-jobs: external studies' levels as jobs (jobs-lane.ts). */
  schedulerFlags?: SchedulerFlags;
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
  const run = opts.run;
  const stopped = () => run?.interrupted != null;
  const empty = (): Execution => ({ results: [], problems, interrupted: run?.interrupted ?? null, incomplete: new Set(), notRun: [], reused: new Map(), sweeps: [] });
  let files: string[];
  try {
    files = findStudyFiles(paths);
  } catch (err) {
    if (err instanceof RungsInputError) { problem({ study: '', file: err.where ?? '', message: err.message }); return empty(); }
    throw err;
  }
  if (files.length === 0) problem({ study: '', file: paths.join(' '), message: `no study files (*.study.ts) found in ${paths.join(', ')}` });
  const selection = studySelection(opts.only);
  let outOk = true;
  try { mkdirSync(opts.out, { recursive: true }); } catch (err) {
    outOk = false;
    problem({ study: '', file: opts.out, message: `cannot create the output folder ${opts.out}: ${(err as Error).message}; give a writable --out folder` });
  }

  // Load and validate every study first: bad input is reported before any level runs.
  const loadedStudies: LoadedStudy[] = [];
  for (const file of files) {
    const shown = relative(process.cwd(), file) || file;
    try {
      const loaded = await loadStudy(file);
      if (selection.matches(file, loaded.declaration.name)) loadedStudies.push(loaded);
    } catch (err) {
      // With --study, a file that cannot be loaded is reported only when its file name was asked for.
      if (selection.byFile(file)) problem(asProblem(err, '', shown));
    }
  }
  if (!selection.all && files.length > 0 && loadedStudies.length === 0 && problems.length === 0) {
    problem({ study: '', file: paths.join(' '), message: `--study ${selection.text}: no study under ${paths.join(', ')} has a name or file name that matches; rungs list ${paths.join(' ')} shows them` });
  }
  // A study that sweeps a coefficient runs as one study per value (src/study/sweep.ts).
  const expandedStudies = expandSweeps(loadedStudies);
  loadedStudies.length = 0;
  loadedStudies.push(...expandedStudies);
  // One name in two files would write the same report files and baseline entry: neither runs, the others do.
  const clashes = nameClashes(loadedStudies);
  // Nothing the previous run wrote may pass for this run's result: its summary and index go, and so do the reports of
  // the studies this run runs (each is written again as its levels finish). Leftovers of killed runs go too.
  if (outOk) {
    removePreviousReports(opts.out, loadedStudies.filter((l) => !clashes.has(l)).map((l) => fileStem(l.declaration.name)));
    removeStaleTempFiles(opts.out);
    for (const l of loadedStudies) removeStalePrivateFolders(join(opts.out, fileStem(l.declaration.name)));
  }
  const prepared: PreparedStudy[] = [];
  for (const loaded of loadedStudies) {
    if (stopped()) break;
    const decl = loaded.declaration;
    const clash = clashes.get(loaded);
    if (clash) { problem({ study: decl.name, file: loaded.file, message: clash }); continue; }
    try {
      const levels = opts.quick ? quickLevels(decl) : opts.levels;
      const p = prepareStudy(loaded, { levels, out: opts.out, errorFiles: true });
      await preflightStudy(p);
      prepared.push(p);
    } catch (err) {
      problem(asProblem(err, decl.name, loaded.file));
    }
  }
  const progress = makeProgress(process.stderr, !!opts.quiet);
  // Every finished level is recorded (for a later --resume) and written at once; with --resume, the levels of the
  // record whose key is unchanged are taken instead of being computed.
  const records = new Map<PreparedStudy, LevelRecordEntry[]>();
  const keys = new Map<PreparedStudy, string[]>();
  const reusable = new Map<PreparedStudy, Map<number, LevelResult>>();
  const reused = new Map<string, number[]>();
  for (const p of prepared) {
    const decl = p.loaded.declaration;
    const k = Array.from({ length: p.total }, (_, i) => levelKey(decl, i, p.norms));
    keys.set(p, k);
    const kept: LevelRecordEntry[] = [];
    const take = new Map<number, LevelResult>();
    if (opts.resume) {
      for (const [index, entry] of readLevelRecord(opts.out, decl.name)) {
        if (index < p.total && entry.key === k[index]) { kept.push(entry); take.set(index, entry.level); }
      }
    }
    records.set(p, kept);
    reusable.set(p, take);
    if (take.size) {
      const shown = [...take.keys()].sort((a, b) => a - b);
      reused.set(decl.name, shown);
      if (!opts.quiet) process.stderr.write(`${decl.name}: reusing level${shown.length > 1 ? 's' : ''} ${shown.map((i) => i + 1).join(', ')} of ${p.total} (inputs unchanged)\n`);
    }
  }
  const onLevel = (p: PreparedStudy, level: LevelResult, fresh: boolean) => {
    if (!outOk) return;
    if (fresh) {
      const entries = records.get(p)!.filter((e) => e.level.index !== level.index);
      entries.push({ key: keys.get(p)![level.index]!, level });
      records.set(p, entries);
      writeLevelRecord(opts.out, p.result.study, entries);
    }
    writePartial(opts.out, p.result);
  };
  const broken = new Set<PreparedStudy>();
  const fail: Fail = (p, err) => {
    // A level cut short by the signal is not a failure of the study: the study is reported as incomplete.
    if (err instanceof SolversStopped || stopped()) return;
    broken.add(p);
    problem(asProblem(err, p.result.study, p.loaded.file));
  };
  const jobs = Math.max(1, opts.jobs ?? 1);
  const totalLevels = prepared.reduce((s, p) => s + p.total - reusable.get(p)!.size, 0);
  const ctx: RunContext = { progress, onLevel, fail, reusable, stopped, stop: run?.stopped, solversStopped: run?.solversStopped };
  // External studies whose levels run as jobs of a scheduler go their own way, beside the others.
  const flags = opts.schedulerFlags ?? {};
  const scheduled = prepared.filter((p) => schedulerSettings(p, flags) !== null);
  const here = prepared.filter((p) => !scheduled.includes(p));
  const jobsDone = runScheduledStudies(scheduled, {
    out: opts.out, resume: !!opts.resume, quiet: !!opts.quiet, flags, progress, onLevel, fail, reusable, keys, stopped, stop: run?.stopped,
  });
  if (jobs === 1 || totalLevels <= 1 || !workersPay(here, opts.parallelMinDofs ?? PARALLEL_MIN_DOFS)) await runSerial(here, ctx);
  else await runParallel(here, Math.min(jobs, totalLevels), ctx);
  await jobsDone;
  progress.clear();

  const results: StudyResult[] = [];
  const incomplete = new Set<string>();
  const notRun: string[] = [];
  for (const p of prepared) {
    // The study's error maps were written in the background (src/study/where.ts): settled after its local orders,
    // which they overlap, and before it counts as done; a failed write fails the study, naming the file.
    const files = p.env.errorFiles ? join(p.env.out, fileStem(p.loaded.declaration.name)) : null;
    if (broken.has(p)) { if (files) await settleBackgroundWrites(files).catch(() => undefined); continue; }
    const cut = p.result.levels.length < p.total;
    if (cut && p.result.levels.length === 0) { notRun.push(p.result.study); continue; }
    try {
      const r = completeStudy(p);
      if (files) await settleBackgroundWrites(files);
      if (cut) incomplete.add(r.study);
      results.push(r);
    } catch (err) {
      // Too few levels to analyse is what an early stop gives: the finished levels are still reported.
      if (cut) { incomplete.add(p.result.study); results.push(p.result); continue; }
      problem(asProblem(err, p.result.study, p.loaded.file));
    }
  }
  // Sweeps over a coefficient: is the error constant bounded toward the limit? Judged before any result is shown, since
  // the sweep's verdict decides whether its members are as expected.
  const sweeps = judgeSweeps(results, new Map(prepared.map((p) => [p.result.study, p.loaded.declaration])), Object.fromEntries(prepared.map((p) => [p.result.study, p.expected])));
  for (const r of results) opts.onResult?.(r);
  if (stopped()) for (const l of loadedStudies) {
    const name = l.declaration.name;
    if (!prepared.some((p) => p.loaded === l) && !problems.some((q) => q.study === name)) notRun.push(name);
  }
  return { results, problems, interrupted: run?.interrupted ?? null, incomplete, notRun, reused, sweeps };
}

/** Private level folders (src/external/level.ts) that a killed run left in a study's folder. Called while holding the
 *  output folder's lock, so none of them belongs to a live run. */
function removeStalePrivateFolders(studyDir: string): void {
  let names: string[];
  try { names = readdirSync(studyDir); } catch { return; }
  for (const name of names) {
    const owner = privateFolderOwner(name);
    if (owner !== null && owner !== process.pid) rmSync(join(studyDir, name), { recursive: true, force: true });
  }
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

interface RunContext {
  progress: Progress;
  /** A level is in (fresh: computed now; else reused from an earlier run). */
  onLevel: (p: PreparedStudy, level: LevelResult, fresh: boolean) => void;
  fail: Fail;
  reusable: Map<PreparedStudy, Map<number, LevelResult>>;
  /** True once a signal stopped the run: no new level starts. */
  stopped: () => boolean;
  stop?: Promise<NodeJS.Signals>;
  solversStopped?: () => Promise<void>;
}

/** Below this many unknowns on the largest level, starting worker threads (each loads the study files and derives
 *  the source terms again) costs more than it saves, so the run stays in this thread (measured: the bundled
 *  studies take 7.7 s serial and 10.6 s on 2 workers). */
export const PARALLEL_MIN_DOFS = 100_000;

/** Estimated unknowns of every level: (n · degree)^dim cells' worth of nodes. */
function levelDofs(prepared: PreparedStudy[]): number[] {
  return prepared.flatMap((p) => {
    const d = p.loaded.declaration;
    const side = Math.max(1, ...d.domain.bbox.map(([a, b]) => b - a));
    return ladderRungs(d).slice(0, p.total).map(({ n }) => (n * (d.discretization.degree ?? 1) * side) ** d.domain.dim);
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

/** Runs the studies in this thread. External codes run in processes of their own, so their studies go in a second
 *  lane beside rungs's own: while a solver process works on one core, this thread computes built-in levels on the
 *  other (the lanes meet at every level's await; each lane keeps its studies' order, and every level is computed
 *  exactly as alone, so the results are the same bits). */
async function runSerial(prepared: PreparedStudy[], ctx: RunContext): Promise<void> {
  const external = prepared.filter((p) => p.loaded.declaration.discretization.kind === 'external');
  const own = prepared.filter((p) => p.loaded.declaration.discretization.kind !== 'external');
  // Two lanes of external studies: their processes spend most of a short level starting up (an interpreter, a
  // compiler), which overlaps well. Measured on 2 shared cores: the bundled studies' external lane took 30 s alone
  // and 24 s in two lanes, beside the 25 s of rungs's own (load average 3-4).
  const lanes: PreparedStudy[][] = [[], []];
  for (const p of external) lanes[lanes[0]!.length <= lanes[1]!.length ? 0 : 1]!.push(p);
  // The cell team's workers are started now when a level will have them solve (solverTeam: from SEAM_MIN_ROWS
  // unknowns), so that they have loaded their code (about 0.12 s of the other core) before that level: started by
  // it, the first parts and the load vector of the 256² P1 level waited for them.
  solverTeam(Math.max(0, ...levelDofs(own)));
  await Promise.all([...lanes.map((l) => runLane(l, ctx)), runLane(own, ctx)]);
}

async function runLane(prepared: PreparedStudy[], ctx: RunContext): Promise<void> {
  const { progress, onLevel, fail } = ctx;
  for (const p of prepared) {
    const decl = p.loaded.declaration;
    const reuse = ctx.reusable.get(p)!;
    try {
      for (let i = 0; i < p.total && !ctx.stopped(); i++) {
        const old = reuse.get(i);
        if (old) { addLevel(p, old); onLevel(p, old, false); continue; }
        progress.levelStart(decl.name, i, p.total);
        levelStarting(p, i);
        const level = await runLevel(decl, p.loaded.file, p.problem, i, p.norms, p.solver, p.env);
        addLevel(p, level);
        progress.levelDone(decl.name, level, p.total);
        onLevel(p, level, true);
        // A level of rungs's own runs synchronously: let the event loop see the other lane's finished processes
        // (awaiting a settled promise only runs microtasks, not I/O callbacks).
        await new Promise<void>((resolve) => setImmediate(resolve));
      }
    } catch (err) {
      progress.clear();
      fail(p, err);
    }
    if (ctx.stopped()) break;
  }
}

/** Levels of all studies on a worker pool, the costliest first (cost ~ n^dim · degree²) so the pool stays busy. */
async function runParallel(prepared: PreparedStudy[], jobs: number, ctx: RunContext): Promise<void> {
  const { progress, onLevel, fail } = ctx;
  for (const p of prepared) {
    for (const [, old] of [...ctx.reusable.get(p)!].sort((a, b) => a[0] - b[0])) { addLevel(p, old); onLevel(p, old, false); }
  }
  const pool = makeLevelPool(jobs);
  const tasks = prepared.flatMap((p) => Array.from({ length: p.total }, (_, index) => {
    const d = p.loaded.declaration;
    const rung = ladderRungs(d)[index]!;
    // A level with time costs its steps' worth of solves.
    const cost = rung.n ** d.domain.dim * (d.discretization.degree ?? 1) ** 2 * (rung.steps ?? 1);
    return { p, index, cost };
  }).filter((t) => !ctx.reusable.get(p)!.has(t.index)));
  tasks.sort((a, b) => b.cost - a.cost);
  // After a signal the levels still computing on workers are not waited for: the pool is destroyed (the solvers they
  // ran were stopped by the signal's handler) and nothing that arrives later is recorded.
  let closed = false;
  try {
    const all = Promise.all(tasks.map(async ({ p, index }) => {
      try {
        if (ctx.stopped()) return;
        const level = await pool.run({ file: p.loaded.file, index, out: p.env.out, norms: p.norms, data: p.env.data, total: p.env.total, errorFiles: p.env.errorFiles, member: p.loaded.declaration.sweepMember?.index });
        if (failed(p) || closed) return;
        addLevel(p, level);
        progress.levelDone(p.result.study, level, p.total);
        onLevel(p, level, true);
      } catch (err) {
        if (closed) return;
        if (!failed(p)) { markFailed(p); fail(p, err); }
      }
    }));
    await (ctx.stop ? Promise.race([all, ctx.stop]) : all);
    if (ctx.stopped()) {
      // Give the workers a moment to see their solvers exit (so that they are reaped) before the pool goes; a level
      // still computing in rungs's own code is not waited for.
      await ctx.solversStopped?.();
      await Promise.race([all, new Promise((r) => setTimeout(r, 2000).unref())]);
    }
  } finally {
    closed = true;
    await pool.close();
  }
}

const failedMark = new WeakSet<PreparedStudy>();
const failed = (p: PreparedStudy) => failedMark.has(p);
const markFailed = (p: PreparedStudy) => failedMark.add(p);

/** A study's levels so far: its CSV and its JSON (`"complete": false` until the final write of the run). */
function writePartial(out: string, partial: StudyResult): void {
  const stem = fileStem(partial.study);
  try {
    writeFileAtomic(join(out, `${stem}.csv`), levelsCsv(partial));
    writeFileAtomic(join(out, `${stem}.json`), studyJson(partial, false));
  } catch {
    // Reported once by the final write of the run.
  }
}
