// Runs an external solver for one level: the command template is split into words first (no shell), the
// placeholders are substituted inside each word, and the process runs in its own process group so that a
// timeout can stop it together with anything it started.
import { spawn } from 'node:child_process';
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
    const finish = (fn: () => void): void => {
      if (settled) return;
      settled = true;
      for (const t of timers) clearTimeout(t);
      opts.signal?.removeEventListener('abort', onAbort);
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
    // A grandchild that keeps our pipes open must not hold the level back once the solver itself has exited.
    child.on('exit', () => {
      if (!settled) timers.push(setTimeout(() => { child.stdout?.destroy(); child.stderr?.destroy(); }, 1000));
    });
    child.on('close', (code, signal) => {
      const stdout = out.text();
      const stderr = err.text();
      const seconds = (performance.now() - t0) / 1e3;
      finish(() => {
        if (aborted) { reject(opts.signal?.reason ?? new Error(`${label}: external solver stopped (aborted)`)); return; }
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
