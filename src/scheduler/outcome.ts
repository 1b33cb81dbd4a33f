// A job's end in words: null when the level's solver (and, for errors measured in the job, rungs after it) exited 0;
// else one sentence naming the job, what happened and what to change. The caller adds the study and level.
import { join } from 'node:path';
import { tailNote } from '../external/tail.ts';
import { fileTail, STDERR_FILE, STDOUT_FILE } from './script.ts';
import type { Outcome } from './wait.ts';

/** Exit statuses of `timeout` (GNU coreutils): 124 when it stopped the command, 128 + 9 when SIGKILL had to follow. */
const TIMEOUT_EXITS = new Set([124, 137]);

export interface OutcomeContext {
  scheduler: string;
  folder: string;
  /** The level's own timeout inside the job. */
  timeoutSeconds: number;
  /** The job's time limit (minutes), for a job the scheduler stopped. */
  minutes?: number;
}

/** The job's stderr and stdout tails, as local levels show them. */
export function jobOutputNote(folder: string): string {
  return tailNote(fileTail(join(folder, STDERR_FILE)), fileTail(join(folder, STDOUT_FILE)));
}

export function outcomeProblem(o: Outcome, c: OutcomeContext): string | null {
  const job = `${c.scheduler} job ${o.id}`;
  const files = `; job folder ${c.folder} (job.sh, job.out, job.err)`;
  if (o.hopeless) {
    return `${job} can never start: ${o.hopeless} (Reason=${o.state?.reason}); rungs cancelled it — ask for resources the partition has ` +
      '(scheduler.partition, .tasks, .memory, .minutes; sinfo -N -l lists the nodes)';
  }
  const e = o.exit;
  const s = o.state;
  // Stopped at the scheduler's time limit: said so even when the script, signalled, still wrote its exit status.
  if (s?.phase === 'timeout' && (!e || e.exit !== 0)) {
    return `${job} was stopped by ${c.scheduler} at its time limit${c.minutes ? ` of ${c.minutes} min` : ''} (state ${s.word}); ` +
      `raise scheduler.minutes (or timeoutSeconds, which the time limit follows)${files}${jobOutputNote(c.folder)}`;
  }
  if (e) {
    if (e.exit === 0) return null;
    if (e.stage === 'errors') {
      return `${job}: the solver finished, but rungs measuring the errors in the job exited with code ${e.exit}${files}${jobOutputNote(c.folder)}`;
    }
    if (TIMEOUT_EXITS.has(e.exit) && e.end - e.start >= Math.floor(c.timeoutSeconds)) {
      return `${job}: the external solver ran past the level's timeout of ${c.timeoutSeconds} s and was stopped inside the job ` +
        `(timeout, SIGTERM then SIGKILL); raise timeoutSeconds if this level needs longer${files}${jobOutputNote(c.folder)}`;
    }
    return `${job}: the external solver exited with code ${e.exit}${files}${jobOutputNote(c.folder)}`;
  }
  if (!s) {
    const how = c.scheduler === 'Slurm'
      ? "it was purged from the controller (MinJobAge), lost with the controller's state, or killed before it could write"
      : 'its process was killed before it could write, or its folder has no job.pid naming a process that still runs';
    return `${job} is no longer known to ${c.scheduler} and left no record of its end (job.exit) in its folder: ${how}; ` +
      `rungs run --resume submits the level again${files}`;
  }
  switch (s.phase) {
    case 'completed':
      return `${job} completed, but its script left no job.exit: the job folder may not be writable from the compute node${files}`;
    case 'cancelled':
      return `${job} was cancelled (state ${s.word}: scancel, or an administrator) before the level finished${files}`;
    default: {
      const why = s.word === 'OUT_OF_MEMORY' ? '; raise scheduler.memory'
        : s.word === 'NODE_FAIL' || s.word === 'BOOT_FAIL' ? '; a node failed: rungs run --resume submits the level again' : '';
      const code = s.exitCode !== null ? `, exit code ${s.exitCode}${s.signal ? `, signal ${s.signal}` : ''}` : '';
      return `${job} ended in state ${s.word}${s.reason ? ` (${s.reason})` : ''}${code}${why}${files}${jobOutputNote(c.folder)}`;
    }
  }
}
