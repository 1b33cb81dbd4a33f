// External studies whose levels run as jobs (src/scheduler/): every level that is not reused is submitted at once
// (one job array per set of levels whose resources agree), the jobs are waited for with back-off, and each level is
// collected through the same protocol as a local level (src/external/level.ts with a LevelRunner) as soon as its job
// has ended. A level that fails is reported on its own, naming its job; the other levels are still collected and
// recorded. The jobs are recorded in <out>/.rungs/jobs/ so that `rungs run --resume` re-attaches to those still out.
import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { basename, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { RungsInputError } from '../errors.ts';
import { levelArgv, levelEnvironment } from '../external/index.ts';
import { DEFAULT_TIMEOUT_SECONDS } from '../external/command.ts';
import type { LevelRunner } from '../external/level.ts';
import type { ExternalDiscretization } from '../external/types.ts';
import { writeFileAtomic } from '../files/atomic-write.ts';
import { localScheduler } from '../scheduler/local.ts';
import { outcomeProblem } from '../scheduler/outcome.ts';
import { readJobRecord, writeJobRecord, type JobEntry } from '../scheduler/record.ts';
import { groupByResources, levelResources } from '../scheduler/resources.ts';
import { fileTail, levelScript, SCRIPT_FILE, STDERR_FILE, STDOUT_FILE } from '../scheduler/script.ts';
import { slurmScheduler } from '../scheduler/slurm.ts';
import type { JobSpec, Scheduler, SchedulerSettings } from '../scheduler/types.ts';
import { watchJobs, type Outcome } from '../scheduler/wait.ts';
import { runLevel } from '../study/level.ts';
import { fileStem } from '../study/names.ts';
import type { LevelResult } from '../study/result.ts';
import { addLevel, type PreparedStudy } from '../study/runner.ts';
import { ladderRungs } from '../study/time-ladder.ts';
import type { Progress } from './progress.ts';
import { decodeLevelRow, LEVEL_ROW_FORMAT } from './level-errors-command.ts';

/** The command line's say over schedulers: --scheduler and --partition, --cancel-jobs. */
export interface SchedulerFlags {
  scheduler?: 'slurm' | 'local';
  partition?: string;
  /** Cancel the jobs when the run is stopped by a signal (whatever the study's onStop). */
  cancelJobs?: boolean;
}

/** The scheduler settings a study's levels run under, or null when they run as child processes of rungs. */
export function schedulerSettings(p: PreparedStudy, flags: SchedulerFlags): SchedulerSettings | null {
  const d = p.loaded.declaration.discretization;
  if (d.kind !== 'external') return null;
  const own = d.scheduler;
  if (!own && !flags.scheduler) return null;
  return { ...own, kind: flags.scheduler ?? own!.kind, ...(flags.partition ? { partition: flags.partition } : {}) };
}

export interface JobsContext {
  out: string;
  resume: boolean;
  quiet: boolean;
  flags: SchedulerFlags;
  progress: Progress;
  onLevel: (p: PreparedStudy, level: LevelResult, fresh: boolean) => void;
  fail: (p: PreparedStudy, err: unknown) => void;
  reusable: Map<PreparedStudy, Map<number, LevelResult>>;
  keys: Map<PreparedStudy, string[]>;
  stopped: () => boolean;
  stop?: Promise<NodeJS.Signals>;
  /** For tests: a scheduler to use instead of the one the settings name. */
  scheduler?: Scheduler;
}

/** A level's promise rejected because its group could not be submitted: reported once for the group, not per level. */
class NotSubmitted extends Error {}
/** A level left running when the run was stopped (its job runs on, or was cancelled). */
class LeftRunning extends Error {}

/** The rungs command for a job that measures errors beside the data: this Node and this rungs's bin/rungs.mjs (the
 *  same path from src/cli/ and dist/cli/). */
export const RUNGS_BIN = fileURLToPath(new URL('../../bin/rungs.mjs', import.meta.url));

/** Runs the levels of every scheduled study (all studies at once: their jobs queue on the cluster together). */
export async function runScheduledStudies(prepared: readonly PreparedStudy[], ctx: JobsContext): Promise<void> {
  await Promise.all(prepared.map((p) => runStudyJobs(p, ctx).catch((err) => ctx.fail(p, err))));
}

interface Pending {
  index: number;
  spec: JobSpec;
  /** Resolves when the job has ended. */
  done: Promise<Outcome>;
  settle: (o: Outcome | Error) => void;
}

function deferred(): { done: Promise<Outcome>; settle: (o: Outcome | Error) => void } {
  let settle!: (o: Outcome | Error) => void;
  const done = new Promise<Outcome>((res, rej) => { settle = (o) => (o instanceof Error ? rej(o) : res(o)); });
  done.catch(() => { /* handled by the level that awaits it */ });
  return { done, settle };
}

async function runStudyJobs(p: PreparedStudy, ctx: JobsContext): Promise<void> {
  const decl = p.loaded.declaration;
  const disc = decl.discretization as ExternalDiscretization;
  const settings = schedulerSettings(p, ctx.flags)!;
  const sched = ctx.scheduler ?? (settings.kind === 'slurm' ? slurmScheduler : localScheduler());
  const where = `${p.loaded.file} (study '${decl.name}'): discretization.scheduler`;
  const stem = fileStem(decl.name);
  const dir = resolve(ctx.out, stem);
  const keys = ctx.keys.get(p)!;
  const reuse = ctx.reusable.get(p)!;
  const timeoutSeconds = disc.timeoutSeconds ?? DEFAULT_TIMEOUT_SECONDS;
  const ladder = { n: ladderRungs(decl).map((r) => r.n), dim: decl.domain.dim };
  const errorsInJob = settings.errors === 'job' && disc.output === 'vtk';
  const say = (line: string) => { if (!ctx.quiet) process.stderr.write(`${decl.name}: ${line}\n`); };

  for (const [, old] of [...reuse].sort((a, b) => a[0] - b[0])) { addLevel(p, old); ctx.onLevel(p, old, false); }
  const todo = Array.from({ length: p.total }, (_, i) => i).filter((i) => !reuse.has(i));
  if (!todo.length) return;

  // The record: jobs of an earlier run that are still out (same inputs) are re-attached with --resume.
  const record = readJobRecord(ctx.out, stem, decl.name);
  let recordProblem = false;
  const save = () => {
    try { writeJobRecord(ctx.out, stem, decl.name, record.values()); } catch (err) {
      if (!recordProblem) say(`warning: cannot write the job record (${(err as Error).message}); --resume will not find these jobs`);
      recordProblem = true;
    }
  };
  const attached = new Map<number, JobEntry>();
  for (const i of todo) {
    const e = record.get(i);
    if (e?.status !== 'submitted') continue;
    if (ctx.resume && e.key === keys[i] && existsSync(e.folder)) attached.set(i, e);
    else {
      const why = !ctx.resume ? 'no --resume' : e.key !== keys[i] ? 'its inputs changed' : `its folder ${e.folder} is gone`;
      say(`level ${i + 1}: job ${e.id} of an earlier run is not collected (${why}); it is left as it is`);
    }
  }
  if (attached.size) {
    const ids = [...attached.values()].map((e) => e.id);
    say(`re-attached to ${sched.name} job${ids.length > 1 ? 's' : ''} ${ids.join(', ')} (level${ids.length > 1 ? 's' : ''} ${[...attached.keys()].map((i) => i + 1).join(', ')})`);
    // The local scheduler finds the processes of jobs still running (Slurm knows its jobs already).
    sched.adopt?.([...attached.values()].map((e) => ({ id: e.id, folder: e.folder })));
  }

  // Jobs to submit, grouped by resources; each group's folders share a token.
  const fresh = todo.filter((i) => !attached.has(i));
  const resources = new Map(fresh.map((i) => [i, levelResources(settings, i, ladder, timeoutSeconds, where)]));
  const groups = groupByResources(fresh.map((i) => ({ index: i, resources: resources.get(i)! })));
  const tokenOf = new Map<number, string>();
  for (const g of groups) {
    const token = randomBytes(4).toString('hex');
    for (const j of g) tokenOf.set(j.index, token);
  }
  mkdirSync(dir, { recursive: true });
  // Job folders of this study's earlier runs that no live record entry holds are leftovers.
  removeStaleJobFolders(dir, new Set([...record.values()].filter((e) => e.status === 'submitted').map((e) => e.folder)));

  const waiting = new Map<number, Pending>();
  const outcomes = new Map<number, { done: Promise<Outcome>; settle: (o: Outcome | Error) => void; id?: string; folder: string }>();
  for (const [i, e] of attached) outcomes.set(i, { ...deferred(), id: e.id, folder: e.folder });

  const runner = (index: number): LevelRunner => {
    const attach = attached.get(index);
    const folder = attach?.folder ?? join(dir, `.level-${index + 1}.job-${tokenOf.get(index)}`);
    const r = resources.get(index);
    return {
      folder,
      prepare: !attach,
      move: true,
      output: errorsInJob ? 'errors' : undefined,
      leave: (err) => err instanceof LeftRunning || err instanceof NotSubmitted,
      run: async (values) => {
        const tasks = r?.tasks ?? levelResources(settings, index, ladder, timeoutSeconds, where).tasks;
        const v = { ...values, tasks };
        const label = `level ${index + 1}`;
        const argv = levelArgv({ command: disc.command }, v, `${label}: command`);
        let o: Outcome;
        if (attach) {
          o = await outcomes.get(index)!.done;
        } else {
          const after = errorsInJob
            ? [process.execPath, RUNGS_BIN, 'level-errors', resolve(p.loaded.file), '--study', decl.name, '--level', String(index + 1),
              '--out', resolve(ctx.out), '--folder', folder, '--norms', p.norms.join(','), '--total', String(p.total)]
            : undefined;
          const script = join(folder, SCRIPT_FILE);
          writeFileAtomic(script, levelScript({
            title: `rungs: study '${decl.name}' level ${index + 1} (n = ${values.n})`,
            folder, cwd: resolve(disc.cwd ?? process.cwd()), env: { ...levelEnvironment(v), ...disc.env }, argv, timeoutSeconds, after,
          }));
          const d = deferred();
          outcomes.set(index, { ...d, folder });
          waiting.set(index, { index, spec: { level: index + 1, folder, script, name: `rungs-${stem}`, resources: r! }, ...d });
          o = await d.done;
        }
        const problem = outcomeProblem(o, { scheduler: sched.name, folder, timeoutSeconds, minutes: r?.minutes });
        if (problem) throw new RungsInputError(problem, folder);
        const exit = o.exit!;
        return {
          argv, exitCode: 0, seconds: Math.max(0, exit.end - exit.start),
          stdout: fileTail(join(folder, STDOUT_FILE)), stderr: fileTail(join(folder, STDERR_FILE)),
        };
      },
    };
  };

  const env = { ...p.env, levelRunner: (_d: ExternalDiscretization, input: { index: number }) => runner(input.index) };
  const levels = todo.map((i) => ({
    index: i,
    promise: runLevel(decl, p.loaded.file, p.problem, i, p.norms, p.solver, env),
  }));
  for (const l of levels) l.promise.catch(() => { /* handled below */ });
  // Every level has met its runner by now (the level runner meshes, then calls it before its first wait).
  await new Promise<void>((r) => setImmediate(r));

  // Submit each group (the levels that reached their runner: a level refused before, such as one over the memory
  // budget, is not submitted).
  const submittedNow: string[] = [];
  for (const g of groups) {
    const members = g.map((j) => waiting.get(j.index)).filter((w): w is Pending => w !== undefined);
    if (!members.length) continue;
    const token = tokenOf.get(members[0]!.index)!;
    try {
      const ids = await sched.submit({ dir, token, jobs: members.map((m) => m.spec) });
      const now = new Date().toISOString();
      members.forEach((m, k) => {
        outcomes.get(m.index)!.id = ids[k]!;
        record.set(m.index, {
          index: m.index, n: ladder.n[m.index]!, key: keys[m.index]!, id: ids[k]!, scheduler: sched.name, folder: m.spec.folder, submitted: now, status: 'submitted',
        });
      });
      save();
      submittedNow.push(...ids);
      const levelsText = members.map((m) => m.index + 1).join(', ');
      say(`submitted level${members.length > 1 ? 's' : ''} ${levelsText} to ${sched.name} as ${members.length > 1 ? `job array ${ids[0]!.split('_')[0]}` : `job ${ids[0]}`}`);
    } catch (err) {
      for (const m of members) { m.settle(new NotSubmitted()); rmSync(m.spec.folder, { recursive: true, force: true }); }
      ctx.fail(p, err instanceof RungsInputError ? new RungsInputError(`${where}: ${err.message}`, p.loaded.file) : err);
    }
  }

  // Wait for every job that is out; each level is collected as soon as its job has ended.
  const out = [...outcomes].filter(([, o]) => o.id !== undefined);
  const byId = new Map(out.map(([i, o]) => [o.id!, i]));
  const abort = new AbortController();
  let signal: NodeJS.Signals | null = null;
  void ctx.stop?.then((s) => { signal = s; abort.abort(); });
  const watching = watchJobs(sched, out.map(([, o]) => ({ id: o.id!, folder: o.folder })), (o) => outcomes.get(byId.get(o.id)!)!.settle(o), { signal: abort.signal })
    .catch((err) => {
      // After a stop the jobs are settled below (cancelled or left running), never as failed by a wait that was cut short.
      if (abort.signal.aborted) return;
      for (const [, o] of out) o.settle(err instanceof Error ? err : new Error(String(err)));
    });

  const finished = Promise.all(levels.map(async ({ index, promise }) => {
    try {
      let level = await promise;
      if (errorsInJob) level = rowFromJob(level, index, p);
      addLevel(p, level);
      ctx.progress.levelDone(decl.name, level, p.total);
      ctx.onLevel(p, level, true);
      const e = record.get(index);
      if (e) { e.status = 'collected'; save(); }
    } catch (err) {
      if (err instanceof NotSubmitted || err instanceof LeftRunning) return;
      const e = record.get(index);
      if (e && e.status === 'submitted') { e.status = 'failed'; e.message = (err as Error).message; save(); }
      ctx.progress.clear();
      ctx.fail(p, err);
    }
  }));
  await Promise.race([watching, ctx.stop ?? new Promise(() => {})]);
  if (signal) {
    let live = out.filter(([i]) => record.get(i)?.status === 'submitted').map(([, o]) => o.id!);
    const cancel = ctx.flags.cancelJobs || settings.onStop === 'cancel';
    if (!cancel && !sched.queueOutlivesRungs && live.length) {
      // Jobs that wait in this rungs's own queue go with it: recorded as cancelled, so that --resume submits them again.
      const states = await sched.states(live).catch(() => new Map());
      const queued = live.filter((id) => states.get(id)?.phase === 'pending');
      await sched.cancel(queued);
      for (const [i, o] of out) { const e = record.get(i); if (e && queued.includes(o.id!)) { e.status = 'cancelled'; e.message = `never started: ${signal} stopped rungs`; } }
      save();
      live = live.filter((id) => !queued.includes(id));
    }
    if (live.length && cancel) {
      await sched.cancel(live);
      for (const [i] of out) { const e = record.get(i); if (e?.status === 'submitted') { e.status = 'cancelled'; e.message = `cancelled by rungs on ${signal}`; } }
      save();
      say(`${signal}: cancelled ${sched.name} job${live.length > 1 ? 's' : ''} ${live.join(', ')}`);
    } else if (live.length) {
      say(`${signal}: ${sched.name} job${live.length > 1 ? 's' : ''} ${live.join(', ')} keep running; rungs run --resume collects them ` +
        `(${sched.name === 'Slurm' ? `scancel ${live.join(' ')}` : 'or stop them'} to stop them; --cancel-jobs cancels on a stop)`);
    }
    for (const [, o] of out) o.settle(new LeftRunning());
  }
  await finished;
  // Array scripts whose jobs are all in (collected, failed or cancelled) are done with.
  removeStaleJobFolders(dir, new Set([...record.values()].filter((e) => e.status === 'submitted').map((e) => e.folder)));
}

/** A level whose errors were measured in its job: the row that job's rungs wrote into errors.json (info), which holds
 *  what the errors protocol does not (the interpolant's errors, the Céa ratio, where the error lives); the collecting
 *  side's own reading of the same file must agree with it. */
function rowFromJob(level: LevelResult, index: number, p: PreparedStudy): LevelResult {
  const file = join(p.env.out, fileStem(p.loaded.declaration.name), `level-${index + 1}`, 'errors.json');
  let row: LevelResult | null = null;
  try {
    const info = (JSON.parse(readFileSync(file, 'utf8')) as { info?: { format?: string; level?: unknown } }).info;
    if (info?.format === LEVEL_ROW_FORMAT) row = decodeLevelRow(info.level);
  } catch { /* refused below */ }
  if (!row || row.index !== index || row.n !== level.n || Object.keys(level.errors).some((k) => row!.errors[k] !== level.errors[k])) {
    throw new RungsInputError(`${file}: not the level row that rungs writes in a job measuring the errors (info.format '${LEVEL_ROW_FORMAT}'); the job's rungs may be another version`, file);
  }
  return { ...row, seconds: { ...row.seconds, solve: level.seconds.solve, total: row.seconds.total + level.seconds.solve } };
}

/** `.level-<k>.job-<token>` folders (and `.array-<token>.sh` scripts) of earlier runs that no submitted job holds. */
function removeStaleJobFolders(dir: string, live: Set<string>): void {
  let names: string[];
  try { names = readdirSync(dir); } catch { return; }
  const liveTokens = new Set([...live].map((f) => /\.job-([0-9a-f]+)$/.exec(basename(f))?.[1]));
  for (const name of names) {
    const m = /^\.(?:level-\d+\.job|array)-([0-9a-f]+)(?:\.sh)?$/.exec(name);
    if (m && !live.has(join(dir, name)) && !liveTokens.has(m[1])) rmSync(join(dir, name), { recursive: true, force: true });
  }
}
