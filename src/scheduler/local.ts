// Levels as local processes behind the same interface as Slurm: each job is its level's script (script.ts) run by sh in
// a process group of its own, detached, so that it outlives a rungs that is stopped (like a Slurm job) and a later
// `rungs run --resume` collects it from its job.exit. At most `slots` jobs run at once; the rest wait in this process
// (and are lost with it: a later --resume finds them gone and submits them again).
import { spawn, type ChildProcess } from 'node:child_process';
import { closeSync, openSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { STDERR_FILE, STDOUT_FILE } from './script.ts';
import type { JobSpec, JobState, Scheduler } from './types.ts';

interface LocalJob {
  spec: JobSpec;
  child: ChildProcess | null;
  /** How the process ended: its exit code or signal. */
  ended: { code: number | null; signal: NodeJS.Signals | null } | null;
  cancelled: boolean;
}

const SIGNALS: Partial<Record<NodeJS.Signals, number>> = { SIGHUP: 1, SIGINT: 2, SIGKILL: 9, SIGTERM: 15 };

/** Whether a process (or, for a negative pid, a process group) still exists. */
function alive(pid: number): boolean {
  try { process.kill(pid, 0); return true; } catch (err) { return (err as NodeJS.ErrnoException).code === 'EPERM'; }
}

/** A scheduler of local processes; job ids are `local-<rungs pid>-<count>`. */
export function localScheduler(slots = availableParallelism()): Scheduler {
  const jobs = new Map<string, LocalJob>();
  const queue: string[] = [];
  let count = 0;
  const running = () => [...jobs.values()].filter((j) => j.child && !j.ended).length;

  const start = (key: string): void => {
    const job = jobs.get(key)!;
    const out = openSync(join(job.spec.folder, STDOUT_FILE), 'a');
    const err = openSync(join(job.spec.folder, STDERR_FILE), 'a');
    try {
      const child = spawn('sh', [job.spec.script], { detached: true, stdio: ['ignore', out, err] });
      job.child = child;
      child.on('error', () => { job.ended ??= { code: 127, signal: null }; pump(); });
      child.on('exit', (code, signal) => { job.ended = { code, signal }; pump(); });
      child.unref();
    } finally {
      closeSync(out);
      closeSync(err);
    }
  };
  const pump = (): void => {
    while (queue.length && running() < slots) start(queue.shift()!);
  };

  return {
    name: 'local',
    queueOutlivesRungs: false,

    async submit(group) {
      const ids: string[] = [];
      for (const spec of group.jobs) {
        const key = `local-${process.pid}-${++count}`;
        jobs.set(key, { spec, child: null, ended: null, cancelled: false });
        queue.push(key);
        ids.push(key);
      }
      try {
        pump();
      } catch (err) {
        throw new RungsInputError(`scheduler 'local': cannot start sh for level ${group.jobs[0]!.level} (${(err as Error).message})`, 'scheduler');
      }
      return ids;
    },

    async states(ids) {
      const out = new Map<string, JobState | null>();
      for (const id of ids) {
        const job = jobs.get(id);
        // A job of an earlier rungs is not known here: collected from its job.exit when it has finished (lane.ts),
        // else reported gone.
        if (!job) { out.set(id, null); continue; }
        const base = { id, reason: null, signal: null, exitCode: null };
        if (job.cancelled) out.set(id, { ...base, phase: 'cancelled', word: 'CANCELLED', final: true, signal: 15 });
        else if (!job.child) out.set(id, { ...base, phase: 'pending', word: 'PENDING', final: false });
        else if (!job.ended) out.set(id, { ...base, phase: 'running', word: 'RUNNING', final: false });
        else {
          const { code, signal } = job.ended;
          const ok = code === 0;
          out.set(id, {
            ...base, phase: ok ? 'completed' : 'failed', word: ok ? 'COMPLETED' : 'FAILED', final: true,
            exitCode: code, signal: signal ? SIGNALS[signal] ?? null : null,
          });
        }
      }
      return out;
    },

    async cancel(ids) {
      for (const id of ids) {
        const job = jobs.get(id);
        if (!job || job.ended) continue;
        job.cancelled = true;
        const q = queue.indexOf(id);
        if (q >= 0) queue.splice(q, 1);
        const pid = job.child?.pid;
        if (pid !== undefined) {
          try { process.kill(-pid, 'SIGTERM'); } catch { /* gone */ }
          setTimeout(() => { if (alive(-pid)) try { process.kill(-pid, 'SIGKILL'); } catch { /* gone */ } }, 2000).unref();
        }
      }
    },

    hopeless() {
      return null;
    },
  };
}
