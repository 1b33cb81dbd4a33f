import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { fileURLToPath } from 'node:url';
import { isMainThread, Worker } from 'node:worker_threads';
import { DONE, FAILED, NEXT, STATUS, type TaskModule, type TeamJob } from './protocol.ts';
import { taskUrl } from '../../files/task-url.ts';
import { SEAM_MIN_ROWS } from '../../linalg/amg/seams.ts';

/**
 * The cell team: worker threads, started once per process and kept (unreferenced, so they never keep it alive), that
 * share the cells of one level with the main thread. A job is split into parts (ranges of cells, fixed by the mesh
 * and never by the number of threads); every thread, the main one included, claims parts with one atomic addition
 * each until none is left, so a thread slowed by other work on a shared machine simply takes fewer. Each part writes
 * only into places it owns (its own partial sums, the matrix rows it owns), and whatever is summed across parts is
 * summed afterwards in part order on the main thread: the results are the same bits on 1, 2 or N threads, and the
 * same as a serial run, which is the same code taking every part itself (tests in test/fem/team/).
 *
 * Threads: RUNGS_THREADS (total, the main thread included) or the cores this process may use; a worker thread of
 * the level pool (`--jobs`) gets no team of its own (its cores are the pool's). The workers are started at the first
 * job that asks for them and take parts once they have loaded (about 1 s of CPU under tsx, on the other core): until
 * then the main thread takes every part itself.
 */
export interface CellTeam {
  /** Worker threads that take parts (0: the main thread computes every part). */
  readonly workers: number;
  /** Worker threads started (at least `workers`). */
  readonly started: number;
  /** Runs parts 0 … parts − 1 of a task: `here` computes one part on the main thread; the workers rebuild the task
   *  from `task` (a module URL) and `input`. Returns the number of parts the main thread computed. */
  run(task: string, input: unknown, parts: number, here: (part: number) => void, options?: { light?: boolean }): number;
  /** Starts a task of one part on a worker and returns at once, so that this thread goes on with other work (the
   *  part writes its results into the input's shared buffers). See BackgroundJob. */
  background(task: string, input: unknown): BackgroundJob;
  /** Parts computed by worker threads since the team started (tests: that the workers took part). */
  readonly partsElsewhere: number;
  /** Blocks until every worker has loaded and built one task (tests: so that workers surely take parts). */
  warm(): void;
  close(): void;
}

/** A one-part task left to a worker while the main thread goes on (CellTeam.background). */
export interface BackgroundJob {
  /** True once a worker has computed the part (its results are then in the input's buffers); false when none did:
   *  no worker is active, none had claimed the part by this call (it is claimed here, so none will), or the worker
   *  failed. On false the caller computes the result itself. Blocks while a worker is computing the part. */
  settle(): boolean;
}

let team: CellTeam | null = null;
let wanted: number | null = null;
let workersFirst = false;

/** Tests: each job waits (up to 2 minutes, a guard against a hang only) until every worker has claimed a part before
 *  the main thread takes any, so that the workers surely take part whatever the machine's speed (a background job:
 *  until a worker has claimed its part). */
export function setWorkersFirst(on: boolean): void {
  workersFirst = on;
}

/** Total threads of the team, the main thread included: RUNGS_THREADS, or the cores this process may use. */
export function teamThreads(): number {
  if (wanted !== null) return wanted;
  const env = Number(process.env.RUNGS_THREADS);
  return Number.isInteger(env) && env >= 1 ? env : availableParallelism();
}

/** Sets the team's total threads for this process (1: no workers). Workers already started beyond that number stay
 *  idle (so that a benchmark can alternate 1 and 2 threads without restarting them); more are started if needed. */
export function setTeamThreads(threads: number): void {
  if (!(Number.isInteger(threads) && threads >= 1)) throw new Error(`setTeamThreads: threads must be an integer ≥ 1, got ${threads}`);
  wanted = threads;
  if (team && team.started < threads - 1) { team.close(); team = null; }
}

/** The team for a multigrid solve of this many unknowns: the cell team when the system is large enough to have
 *  seam-ordered levels (linalg/amg/seams.ts), whose interiors it sweeps; undefined for smaller systems, which would
 *  only pay for starting workers. */
export function solverTeam(rows: number): CellTeam | undefined {
  return rows >= SEAM_MIN_ROWS ? cellTeam() : undefined;
}

/** The process's team if one was started, else null (for work that only concerns a team already running). */
export function startedTeam(): CellTeam | null {
  return team;
}

/** The process's team (started on first use). */
export function cellTeam(): CellTeam {
  if (!team) team = makeTeam(isMainThread ? teamThreads() - 1 : 0);
  return team;
}

/** The worker's entry: the one-file worker where the package has it (dist/rungs-worker.mjs, scripts/bundle-cli.ts:
 *  its modules and every task's in one file, loaded in a fraction of the 0.3–0.35 s the separate modules took, which
 *  delayed the worker's first parts at the 256² P1 level), else worker-entry.mjs. */
const ONE_FILE_ENTRY = new URL('../../rungs-worker.mjs', import.meta.url);
const ENTRY = new URL('./worker-entry.mjs', import.meta.url);
let entry: URL | null = null;

function makeTeam(nWorkers: number): CellTeam {
  const workers: Worker[] = [];
  for (let i = 0; i < nWorkers; i++) {
    try {
      entry ??= existsSync(fileURLToPath(ONE_FILE_ENTRY)) ? ONE_FILE_ENTRY : ENTRY;
      const w = new Worker(entry);
      w.unref();
      w.on('error', () => { /* its parts are taken by the main thread (FAILED, or never claimed) */ });
      workers.push(w);
    } catch { break; }
  }
  let elsewhere = 0;
  const active = (): Worker[] => workers.slice(0, Math.max(0, teamThreads() - 1));
  return {
    get workers() { return active().length; },
    get started() { return workers.length; },
    get partsElsewhere() { return elsewhere; },
    run(task, input, parts, here, options) {
      if (parts <= 0) return 0;
      const team = active();
      if (team.length === 0 || parts === 1) { for (let k = 0; k < parts; k++) here(k); return parts; }
      const control = new Int32Array(new SharedArrayBuffer(4 * (STATUS + parts)));
      const job: TeamJob = { task, input, control: control.buffer as SharedArrayBuffer, parts, ...(options?.light ? { light: true } : {}) };
      for (const w of team) w.postMessage(job);
      if (workersFirst) {
        const until = performance.now() + 120_000;
        while (Atomics.load(control, NEXT) < Math.min(parts, team.length) && performance.now() < until) Atomics.wait(control, NEXT, Atomics.load(control, NEXT), 20);
      }
      const mine = new Uint8Array(parts);
      let count = 0;
      let k = -1;
      try {
        for (k = Atomics.add(control, NEXT, 1); k < parts; k = Atomics.add(control, NEXT, 1)) { here(k); mine[k] = 1; count++; }
      } catch (e) {
        // No worker claims another part; those they hold are waited for, so that nothing writes into the job's
        // buffers once this returns (the caller may redo the work serially, for the first error in cell order).
        mine[k] = 1;
        const claimed = Math.min(parts, Atomics.add(control, NEXT, parts));
        for (let j = 0; j < claimed; j++) {
          if (mine[j]) continue;
          while (Atomics.load(control, STATUS + j) === 0) Atomics.wait(control, STATUS + j, 0, 200);
        }
        throw e;
      }
      // Parts claimed by a worker: wait until it is done with each; one it failed on is computed here (its error is
      // thrown here, with its message).
      for (let k = 0; k < parts; k++) {
        if (mine[k]) continue;
        let s = Atomics.load(control, STATUS + k);
        while (s === 0) { Atomics.wait(control, STATUS + k, 0, 200); s = Atomics.load(control, STATUS + k); }
        if (s === FAILED) { here(k); count++; } else if (s !== DONE) throw new Error(`internal: part ${k} has status ${s}`);
      }
      elsewhere += parts - count;
      return count;
    },
    background(task, input) {
      const team = active();
      if (team.length === 0) return { settle: () => false };
      const control = new Int32Array(new SharedArrayBuffer(4 * (STATUS + 1)));
      const job: TeamJob = { task, input, control: control.buffer as SharedArrayBuffer, parts: 1 };
      team[0]!.postMessage(job);
      let settled: boolean | null = null;
      return {
        settle() {
          if (settled !== null) return settled;
          if (workersFirst) {
            const until = performance.now() + 120_000;
            while (Atomics.load(control, NEXT) === 0 && performance.now() < until) Atomics.wait(control, NEXT, 0, 20);
          }
          // Claimed here first: no worker will take it (worker.ts claims before computing).
          if (Atomics.add(control, NEXT, 1) === 0) return (settled = false);
          let s = Atomics.load(control, STATUS);
          while (s === 0) { Atomics.wait(control, STATUS, 0, 200); s = Atomics.load(control, STATUS); }
          if (s === DONE) elsewhere++;
          return (settled = s === DONE);
        },
      };
    },
    warm() {
      const team = active();
      if (team.length === 0) return;
      // A job of as many parts as workers whose parts block until every worker holds one: each worker has then
      // loaded and run a task. Guarded by a bound (a worker that cannot start leaves the main thread to do the work).
      const sab = new SharedArrayBuffer(8);
      const n = team.length;
      const control = new Int32Array(new SharedArrayBuffer(4 * (STATUS + n)));
      const job: TeamJob = { task: WARM_TASK, input: { sab, n }, control: control.buffer as SharedArrayBuffer, parts: n };
      for (const w of team) w.postMessage(job);
      const until = performance.now() + 120_000;
      for (let k = 0; k < n; k++) {
        while (Atomics.load(control, STATUS + k) === 0 && performance.now() < until) Atomics.wait(control, STATUS + k, 0, 100);
      }
    },
    close() {
      for (const w of workers) void w.terminate();
      workers.length = 0;
    },
  };
}

export { taskUrl };

const WARM_TASK = taskUrl(import.meta.url, 'warm-task');
export type { TaskModule };
