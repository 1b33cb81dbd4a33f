// Levels as local processes behind the same interface as Slurm: each job is its level's script (script.ts) run by sh in
// a process group of its own, detached, so that it outlives a rungs that is stopped (like a Slurm job). Its process is
// recorded in the job's folder (job.pid: pid, start time and boot, process-identity.ts), so that a later
// `rungs run --resume` re-attaches to a job still running (`adopt`) and waits for it, or collects one that has ended
// from its job.exit. At most `slots` jobs run at once, re-attached ones included; the rest wait in this process (and
// are lost with it: a stopped rungs records them as cancelled, and --resume submits them again).
import { spawn, type ChildProcess } from 'node:child_process';
import { closeSync, openSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { processIdentity, readProcessIdentity, sessionMembers, stillRunning, writeProcessIdentity, type ProcessIdentity } from './process-identity.ts';
import { STDERR_FILE, STDOUT_FILE } from './script.ts';
import type { JobSpec, JobState, Scheduler } from './types.ts';

interface LocalJob {
  /** What to start; null for a job of an earlier rungs, which runs already. */
  spec: JobSpec | null;
  child: ChildProcess | null;
  /** A job of an earlier rungs, known by its process (it is not this rungs's child: its exit code is in job.exit). */
  adopted: ProcessIdentity | null;
  /** How the process ended: its exit code or signal (both null for an adopted job, whose end is seen, not heard). */
  ended: { code: number | null; signal: NodeJS.Signals | null } | null;
  cancelled: boolean;
}

const SIGNALS: Partial<Record<NodeJS.Signals, number>> = { SIGHUP: 1, SIGINT: 2, SIGKILL: 9, SIGTERM: 15 };

/** Whether a process (or, for a negative pid, a process group) still exists. */
function alive(pid: number): boolean {
  try { process.kill(pid, 0); return true; } catch (err) { return (err as NodeJS.ErrnoException).code === 'EPERM'; }
}

/** SIGTERM to a job's process group and to every process of its session (the solver runs in `timeout`'s own group),
 *  SIGKILL after 2 s to whatever of them is left. */
function stopGroup(pid: number): void {
  const signal = (sig: NodeJS.Signals): void => {
    try { process.kill(-pid, sig); } catch { /* gone */ }
    for (const member of sessionMembers(pid)) try { process.kill(member, sig); } catch { /* gone */ }
  };
  signal('SIGTERM');
  setTimeout(() => { if (alive(-pid) || sessionMembers(pid).length) signal('SIGKILL'); }, 2000).unref();
}

/** A scheduler of local processes; job ids are `local-<rungs pid>-<count>`. */
export function localScheduler(slots = availableParallelism()): Scheduler {
  const jobs = new Map<string, LocalJob>();
  const queue: string[] = [];
  let count = 0;
  const running = () => [...jobs.values()].filter((j) => (j.child || j.adopted) && !j.ended).length;

  const start = (key: string): void => {
    const job = jobs.get(key)!;
    const spec = job.spec!;
    const out = openSync(join(spec.folder, STDOUT_FILE), 'a');
    const err = openSync(join(spec.folder, STDERR_FILE), 'a');
    try {
      const child = spawn('sh', [spec.script], { detached: true, stdio: ['ignore', out, err] });
      job.child = child;
      child.on('error', () => { job.ended ??= { code: 127, signal: null }; pump(); });
      child.on('exit', (code, signal) => { job.ended = { code, signal }; pump(); });
      child.unref();
      // Without it a later --resume finds the job gone and submits its level again: a lost record costs time, not results.
      if (child.pid !== undefined) try { writeProcessIdentity(spec.folder, processIdentity(child.pid)); } catch { /* see above */ }
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
        // An adopted job's id may be this one's when the earlier rungs had this pid.
        let key: string;
        do key = `local-${process.pid}-${++count}`; while (jobs.has(key));
        jobs.set(key, { spec, child: null, adopted: null, ended: null, cancelled: false });
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

    adopt(list) {
      for (const { id, folder } of list) {
        const identity = readProcessIdentity(folder);
        // No job.pid: the job is reported gone, and collected all the same when it left its job.exit.
        if (identity && !jobs.has(id)) jobs.set(id, { spec: null, child: null, adopted: identity, ended: null, cancelled: false });
      }
    },

    async states(ids) {
      const out = new Map<string, JobState | null>();
      let freed = false;
      for (const id of ids) {
        const job = jobs.get(id);
        // A job this rungs does not know: collected from its job.exit when it has finished (jobs-lane.ts), else gone.
        if (!job) { out.set(id, null); continue; }
        const base = { id, reason: null, signal: null, exitCode: null };
        if (job.adopted && !job.ended && !stillRunning(job.adopted)) { job.ended = { code: null, signal: null }; freed = true; }
        if (job.cancelled) out.set(id, { ...base, phase: 'cancelled', word: 'CANCELLED', final: true, signal: 15 });
        // Ended, but not this rungs's child: its exit code is in its job.exit, which the waiting reads (wait.ts).
        else if (job.adopted) out.set(id, job.ended ? null : { ...base, phase: 'running', word: 'RUNNING', final: false });
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
      if (freed) pump();
      return out;
    },

    async cancel(ids) {
      for (const id of ids) {
        const job = jobs.get(id);
        if (!job || job.ended) continue;
        job.cancelled = true;
        const q = queue.indexOf(id);
        if (q >= 0) queue.splice(q, 1);
        if (job.child?.pid !== undefined) stopGroup(job.child.pid);
        // Only the process that is still the job's: its pid may have gone to another process since.
        else if (job.adopted && stillRunning(job.adopted)) stopGroup(job.adopted.pid);
      }
    },

    hopeless() {
      return null;
    },
  };
}
