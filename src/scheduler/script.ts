// The shell script of one level's job: enter the solver's working folder, set the RUNGS_* variables, run the solver
// under `timeout` (Slurm enforces its own time limit in whole minutes and up to about 30 s late, so the level's own
// timeout belongs inside the job), optionally measure the errors with rungs itself, and record how it ended in
// `job.exit` (written to a temporary name and renamed, so a reader sees all of it or nothing). The same script runs
// under Slurm and as a local process; it can also be run by hand (`sh job.sh`) to see what a level does.
import { closeSync, fstatSync, openSync, readFileSync, readSync } from 'node:fs';
import { join } from 'node:path';

/** The file a job writes when it ends: {"exit": …, "stage": "solver" | "errors", "start": …, "end": …}. */
export const EXIT_FILE = 'job.exit';
export const SCRIPT_FILE = 'job.sh';
export const STDOUT_FILE = 'job.out';
export const STDERR_FILE = 'job.err';
/** Seconds between SIGTERM and SIGKILL when the level's timeout stops the solver (as for local solvers). */
export const KILL_AFTER_SECONDS = 2;

/** A word for sh, in single quotes ('\'' for a quote inside). */
export function shellQuote(word: string): string {
  return /^[A-Za-z0-9_@%+=:,./-]+$/.test(word) ? word : `'${word.replace(/'/g, `'\\''`)}'`;
}

export interface LevelScript {
  /** What the script is, for a comment at its top. */
  title: string;
  /** The job's folder ({out}); job.exit is written there. */
  folder: string;
  cwd: string;
  env: Record<string, string>;
  /** The solver's argv. */
  argv: readonly string[];
  timeoutSeconds: number;
  /** argv of a second step run when the solver exits 0 (rungs measuring the errors beside the data). */
  after?: readonly string[];
}

/** The text of a level's job script (POSIX sh). */
export function levelScript(s: LevelScript): string {
  const q = shellQuote;
  const exitFile = join(s.folder, EXIT_FILE);
  const lines = [
    '#!/bin/sh',
    `# ${s.title.replace(/\n/g, ' ')}`,
    '# Written by rungs; run as a job (or by hand: sh job.sh). The solver runs under timeout; job.exit records how it ended.',
    `cd ${q(s.cwd)} || exit 97`,
    ...Object.entries(s.env).map(([k, v]) => `${k}=${q(v)}; export ${k}`),
    'start=$(date +%s)',
    'stage=solver',
    `timeout --kill-after=${KILL_AFTER_SECONDS} ${Math.ceil(s.timeoutSeconds)} ${s.argv.map(q).join(' ')}`,
    'rc=$?',
  ];
  if (s.after) lines.push(`if [ "$rc" -eq 0 ]; then stage=errors; ${s.after.map(q).join(' ')}; rc=$?; fi`);
  lines.push(
    'end=$(date +%s)',
    `printf '{"exit": %s, "stage": "%s", "start": %s, "end": %s}\\n' "$rc" "$stage" "$start" "$end" > ${q(`${exitFile}.tmp`)} && mv -f ${q(`${exitFile}.tmp`)} ${q(exitFile)}`,
    'exit "$rc"',
    '',
  );
  return lines.join('\n');
}

/** How a job's script ended, from its job.exit; null when it has not written one (still running, or killed). */
export interface ScriptExit {
  exit: number;
  stage: 'solver' | 'errors';
  start: number;
  end: number;
}

export function readScriptExit(folder: string): ScriptExit | null {
  try {
    const v = JSON.parse(readFileSync(join(folder, EXIT_FILE), 'utf8')) as ScriptExit;
    return Number.isInteger(v.exit) && (v.stage === 'solver' || v.stage === 'errors') ? v : null;
  } catch {
    return null;
  }
}

/** The last `limit` bytes of a file of the job (its stdout or stderr), '' when there is none. */
export function fileTail(file: string, limit = 64 * 1024): string {
  let fd: number | null = null;
  try {
    fd = openSync(file, 'r');
    const size = fstatSync(fd).size;
    const b = Buffer.alloc(Math.min(size, limit));
    readSync(fd, b, 0, b.length, size - b.length);
    return b.toString('utf8');
  } catch {
    return '';
  } finally {
    if (fd !== null) closeSync(fd);
  }
}
