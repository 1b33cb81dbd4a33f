// Runs an external solver for one level: the command template is split into words first (no shell), the
// placeholders are substituted inside each word, and the process runs in its own process group so that a
// timeout can stop it together with anything it started.
import { spawn } from 'node:child_process';
import { BroadcastChannel, isMainThread } from 'node:worker_threads';
import { RungsInputError } from '../errors.ts';
import { levelEnvironment, substituteWords, type LevelValues } from './placeholders.ts';
import { OutputTail, tailNote } from './tail.ts';
import { levelLabel, type LevelRef } from './where.ts';
import { splitCommandWords } from './words.ts';

export { runLevelsInParallel } from './parallel.ts';

/** Default time a level may take before its solver is stopped. */
export const DEFAULT_TIMEOUT_SECONDS = 600;
/** Time between SIGTERM and SIGKILL when a solver is stopped. */
export const KILL_GRACE_SECONDS = 2;

export interface CommandSpec {
  /** A template such as "python3 solver.py --n {n} --out {out}", or the argv words themselves. */
  command: string | readonly string[];
  timeoutSeconds?: number;
  /** Working folder of the solver (default: rungs's working folder). */
  cwd?: string;
  /** Extra environment variables (on top of rungs's own and the RUNGS_* ones). */
  env?: Record<string, string>;
}

export interface CommandRun {
  argv: string[];
  exitCode: number;
  /** The last 64 KiB of each stream. */
  stdout: string;
  stderr: string;
  seconds: number;
}

export interface CommandOptions {
  /** Names the study and level in messages. */
  level?: LevelRef;
  /** Stops the solver (its process group) when aborted. */
  signal?: AbortSignal;
  /** Seconds between SIGTERM and SIGKILL on timeout (default KILL_GRACE_SECONDS). */
  killGraceSeconds?: number;
}

// Every solver's process group, so that a run stopped by a signal can stop them all (stopSolvers) and a run that ends
// can make sure that nothing a solver started outlives it (reapSolvers). Worker threads (the level pool) tell the main
// thread about their groups over a BroadcastChannel, and the main thread tells them to stop: signals reach the main
// thread only.
interface LiveSolver { pgid: number; abort(reason: Error): void }
/** Solvers running in this thread. */
const live = new Set<LiveSolver>();
/** Groups whose leader (the solver) has exited while other members remained; they were sent SIGTERM at that moment. */
const lingering = new Set<number>();
/** Groups of solvers run by worker threads (known to the main thread only). */
const foreign = new Set<number>();
/** Set by stopSolvers: no new solver starts until allowSolvers. */
let stopReason: Error | null = null;

type GroupMessage = { kind: 'start' | 'end'; pgid: number } | { kind: 'stop'; message: string };
const channel = new BroadcastChannel('rungs:solver-groups');
channel.onmessage = (event: unknown) => {
  const m = (event as { data: GroupMessage }).data;
  if (m.kind === 'start' && isMainThread) foreign.add(m.pgid);
  else if (m.kind === 'end' && isMainThread) foreign.delete(m.pgid);
  else if (m.kind === 'stop' && !isMainThread) void stopSolvers(new SolversStopped(m.message));
};
channel.unref();
const tell = (m: GroupMessage): void => { if (!isMainThread) channel.postMessage(m); };

/** The reason a level's solver was stopped by stopSolvers (a signal to rungs, not a failure of the solver). */
export class SolversStopped extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'SolversStopped';
  }
}

/** Whether any process of the group still exists (EPERM: it exists, owned by someone else). */
function groupAlive(pgid: number): boolean {
  try {
    process.kill(-pgid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function signalGroup(pgid: number, sig: NodeJS.Signals): void {
  try { process.kill(-pgid, sig); } catch { /* gone */ }
}

/** Waits (polling) until none of the groups has a process left, or the time is up; returns the groups still alive. */
async function waitForGroups(groups: readonly number[], seconds: number): Promise<number[]> {
  const until = performance.now() + seconds * 1e3;
  let alive = groups.filter(groupAlive);
  while (alive.length && performance.now() < until) {
    await new Promise((r) => setTimeout(r, 25));
    alive = alive.filter(groupAlive);
  }
  return alive;
}

/** Every group this thread knows of that may still have processes: running solvers, leftovers, worker threads' ones. */
function knownGroups(): number[] {
  return [...new Set([...[...live].map((s) => s.pgid), ...lingering, ...foreign])];
}

/**
 * Stops every running solver's process group (and what solvers that already exited left behind, and the groups of
 * worker threads' solvers): SIGTERM, then SIGKILL to whatever is left after the grace time. The levels they ran reject
 * with `reason` (a SolversStopped); no new solver starts until allowSolvers(). Resolves when the groups are gone (or,
 * for processes that outlive even SIGKILL, after a second more).
 */
export async function stopSolvers(reason: Error, graceSeconds = KILL_GRACE_SECONDS): Promise<void> {
  stopReason = reason;
  if (isMainThread) channel.postMessage({ kind: 'stop', message: reason.message } satisfies GroupMessage);
  const groups = knownGroups();
  for (const s of [...live]) s.abort(reason);
  for (const g of groups) signalGroup(g, 'SIGTERM');
  const left = await waitForGroups(groups, graceSeconds);
  for (const g of left) signalGroup(g, 'SIGKILL');
  await waitForGroups(left, 1);
  for (const g of groups) if (!groupAlive(g)) { lingering.delete(g); foreign.delete(g); }
}

/** At the end of a run: SIGKILL to what solvers left behind and that SIGTERM did not stop; resolves once it is gone
 *  (or after the grace time). Running solvers are not touched. */
export async function reapSolvers(graceSeconds = KILL_GRACE_SECONDS): Promise<void> {
  const groups = [...lingering];
  const left = await waitForGroups(groups, graceSeconds);
  for (const g of left) signalGroup(g, 'SIGKILL');
  await waitForGroups(left, 1);
  for (const g of groups) if (!groupAlive(g)) lingering.delete(g);
}

/** Lets solvers start again after stopSolvers (a new run in the same process). */
export function allowSolvers(): void {
  stopReason = null;
}

/** Process groups of solvers that may still have processes (for tests and diagnostics). */
export function solverGroups(): number[] {
  return knownGroups().filter(groupAlive);
}

/** The argv words of a command template for one level. */
export function levelArgv(spec: CommandSpec, values: LevelValues, where = 'command'): string[] {
  const words = typeof spec.command === 'string' ? splitCommandWords(spec.command, where) : [...spec.command];
  if (words.length === 0 || words[0] === '') throw new RungsInputError(`${where}: the command is empty`, where);
  return substituteWords(words, values, where);
}

/** argv as one readable line (words with blanks or quotes are JSON-quoted). */
export function showArgv(argv: readonly string[]): string {
  return argv.map((w) => (w === '' || /[\s"'\\]/.test(w) ? JSON.stringify(w) : w)).join(' ');
}

/**
 * Runs the solver of one level and resolves when it exits with status 0. Rejects with a RungsInputError naming the
 * level, the command and what went wrong (cannot start, exit status, signal, timeout), with the last lines of its
 * stderr (or stdout) in the message.
 */
export function runLevelCommand(spec: CommandSpec, values: LevelValues, opts: CommandOptions = {}): Promise<CommandRun> {
  const label = levelLabel(opts.level ?? { study: values.study, index: values.level - 1, n: values.n });
  let argv: string[];
  try {
    argv = levelArgv(spec, values, `${label}: command`);
  } catch (err) {
    return Promise.reject(err);
  }
  const timeout = spec.timeoutSeconds ?? DEFAULT_TIMEOUT_SECONDS;
  if (!(timeout > 0) || !Number.isFinite(timeout)) {
    return Promise.reject(new RungsInputError(`${label}: timeoutSeconds must be a positive number of seconds, got ${timeout}`, 'timeoutSeconds'));
  }
  const grace = opts.killGraceSeconds ?? KILL_GRACE_SECONDS;
  const shown = showArgv(argv);
  const t0 = performance.now();

  return new Promise<CommandRun>((resolve, reject) => {
    if (opts.signal?.aborted) { reject(opts.signal.reason ?? new Error('aborted')); return; }
    if (stopReason) { reject(stopReason); return; }
    const child = spawn(argv[0]!, argv.slice(1), {
      cwd: spec.cwd,
      env: { ...process.env, ...levelEnvironment(values), ...spec.env },
      stdio: ['ignore', 'pipe', 'pipe'],
      detached: true,
      shell: false,
      windowsHide: true,
    });
    const out = new OutputTail();
    const err = new OutputTail();
    child.stdout!.on('data', (c: Buffer) => out.push(c));
    child.stderr!.on('data', (c: Buffer) => err.push(c));

    let settled = false;
    let timedOut = false;
    let aborted = false;
    let abortReason: Error | null = null;
    const timers: NodeJS.Timeout[] = [];
    const killGroup = (sig: NodeJS.Signals): void => {
      if (child.pid === undefined) return;
      try { process.kill(-child.pid, sig); } catch { try { child.kill(sig); } catch { /* already gone */ } }
    };
    // SIGKILL follows even after the solver itself has exited: members of its group that ignore SIGTERM go too.
    // The timer is unref'd so that it never keeps rungs alive.
    const stop = (): void => {
      killGroup('SIGTERM');
      setTimeout(() => killGroup('SIGKILL'), grace * 1e3).unref();
    };
    const entry: LiveSolver | null = child.pid === undefined ? null : {
      pgid: child.pid,
      abort: (reason) => { abortReason = reason; aborted = true; stop(); },
    };
    if (entry) { live.add(entry); tell({ kind: 'start', pgid: entry.pgid }); }
    const finish = (fn: () => void): void => {
      if (settled) return;
      settled = true;
      for (const t of timers) clearTimeout(t);
      opts.signal?.removeEventListener('abort', onAbort);
      if (entry) {
        live.delete(entry);
        if (!lingering.has(entry.pgid) && !groupAlive(entry.pgid)) tell({ kind: 'end', pgid: entry.pgid });
      }
      fn();
    };
    const onAbort = (): void => { aborted = true; stop(); };
    opts.signal?.addEventListener('abort', onAbort, { once: true });
    timers.push(setTimeout(() => { timedOut = true; stop(); }, timeout * 1e3));

    child.on('error', (e: NodeJS.ErrnoException) => {
      finish(() => reject(new RungsInputError(
        `${label}: cannot start the external solver "${argv[0]}" (${e.code ?? e.message}); check the program name, ` +
          `that it is executable and on PATH, and the working folder; command: ${shown}`,
        'command',
      )));
    });
    // What the solver started and left running (a grandchild in its process group) is stopped once the solver itself
    // has exited, however it exited: SIGTERM now, SIGKILL after the grace time (and at the latest when the run ends:
    // reapSolvers). A grandchild that keeps our pipes open must not hold the level back either.
    child.on('exit', () => {
      const pgid = child.pid;
      if (pgid !== undefined && !timedOut && !aborted && groupAlive(pgid)) {
        lingering.add(pgid);
        signalGroup(pgid, 'SIGTERM');
        setTimeout(() => {
          if (groupAlive(pgid)) signalGroup(pgid, 'SIGKILL');
          lingering.delete(pgid);
          tell({ kind: 'end', pgid });
        }, grace * 1e3).unref();
      }
      if (!settled) timers.push(setTimeout(() => { child.stdout?.destroy(); child.stderr?.destroy(); }, 1000));
    });
    child.on('close', (code, signal) => {
      const stdout = out.text();
      const stderr = err.text();
      const seconds = (performance.now() - t0) / 1e3;
      finish(() => {
        if (aborted) { reject(abortReason ?? opts.signal?.reason ?? new Error(`${label}: external solver stopped (aborted)`)); return; }
        if (timedOut) {
          reject(new RungsInputError(
            `${label}: the external solver did not finish within the timeout of ${timeout} s and was stopped ` +
              `(SIGTERM, then SIGKILL to its process group); raise timeoutSeconds if this level needs longer; ` +
              `command: ${shown}${tailNote(stderr, stdout)}`,
            'timeoutSeconds',
          ));
          return;
        }
        if (signal) {
          reject(new RungsInputError(`${label}: the external solver was killed by ${signal}; command: ${shown}${tailNote(stderr, stdout)}`, 'command'));
          return;
        }
        if (code !== 0) {
          reject(new RungsInputError(`${label}: the external solver exited with code ${code}; command: ${shown}${tailNote(stderr, stdout)}`, 'command'));
          return;
        }
        resolve({ argv, exitCode: 0, stdout, stderr, seconds });
      });
    });
  });
}
