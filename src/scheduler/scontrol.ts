// The state of Slurm jobs from `scontrol show job -o <id>`: one line per job, `Key=Value` fields separated by blanks.
// sacct would need slurmdbd, which many small clusters (and the test cluster) do not run; scontrol asks the controller,
// which keeps a finished job for MinJobAge seconds (default 300). A job array shows one line per task that has started
// (JobId=<own id> ArrayJobId=<array> ArrayTaskId=<task>) and one line for the tasks still pending together
// (ArrayTaskId=2,4 or 1-3,7 or 1-9:2%4).
import type { JobPhase, JobState } from './types.ts';

/** Slurm's job states (squeue(1) "JOB STATE CODES", Slurm 22.05) and what they mean for a level. States not listed
 *  (REQUEUED, RESIZING, SIGNALING, STAGE_OUT, SUSPENDED, …) are not final: rungs waits. */
const PHASES: Record<string, JobPhase> = {
  PENDING: 'pending', CONFIGURING: 'pending', REQUEUE_HOLD: 'pending', REQUEUE_FED: 'pending', RESV_DEL_HOLD: 'pending',
  RUNNING: 'running', COMPLETING: 'running', SUSPENDED: 'running', STOPPED: 'running',
  COMPLETED: 'completed',
  FAILED: 'failed', NODE_FAIL: 'failed', BOOT_FAIL: 'failed', OUT_OF_MEMORY: 'failed', DEADLINE: 'failed', PREEMPTED: 'failed',
  TIMEOUT: 'timeout',
  CANCELLED: 'cancelled',
};

/** The fields of one line. A value runs to the next ` Key=` (a job name or path with blanks stays whole). */
export function scontrolFields(line: string): Map<string, string> {
  const fields = new Map<string, string>();
  const keys = [...line.matchAll(/(?:^|\s)([A-Za-z][A-Za-z0-9_:/]*)=/g)];
  for (let i = 0; i < keys.length; i++) {
    const m = keys[i]!;
    const start = m.index! + m[0].length;
    const end = i + 1 < keys.length ? keys[i + 1]!.index! : line.length;
    if (!fields.has(m[1]!)) fields.set(m[1]!, line.slice(start, end).trim());
  }
  return fields;
}

/** The task ids of an ArrayTaskId value: "4", "2,4", "1-3,7", "1-9:2", "1-10%2" (the % limit is dropped). */
export function arrayTaskIds(text: string): number[] {
  const out: number[] = [];
  for (const part of text.replace(/%\d+$/, '').split(',')) {
    const m = /^(\d+)(?:-(\d+)(?::(\d+))?)?$/.exec(part.trim());
    if (!m) continue;
    const a = Number(m[1]);
    const b = m[2] !== undefined ? Number(m[2]) : a;
    const step = m[3] !== undefined ? Math.max(1, Number(m[3])) : 1;
    for (let k = a; k <= b; k += step) out.push(k);
  }
  return out;
}

/** "3:0" → exit 3, no signal; "0:15" → exit 0, signal 15. */
function exitPair(text: string | undefined): { exitCode: number | null; signal: number | null } {
  const m = /^(\d+):(\d+)$/.exec(text ?? '');
  if (!m) return { exitCode: null, signal: null };
  const signal = Number(m[2]);
  return { exitCode: Number(m[1]), signal: signal === 0 ? null : signal };
}

/**
 * Every job the text of `scontrol show job -o` describes, by id: a plain job by its JobId, an array task as
 * `<ArrayJobId>_<ArrayTaskId>` (so a pending group of tasks gives one entry per task). Lines without JobId (blank,
 * messages) are skipped.
 */
export function parseScontrolJobs(text: string): Map<string, JobState> {
  const jobs = new Map<string, JobState>();
  for (const line of text.split('\n')) {
    if (!line.startsWith('JobId=')) continue;
    const f = scontrolFields(line);
    const word = (f.get('JobState') ?? 'UNKNOWN').replace(/\+$/, '');
    const phase = PHASES[word] ?? 'pending';
    const reason = f.get('Reason');
    const base: Omit<JobState, 'id'> = {
      phase, word,
      final: phase === 'completed' || phase === 'failed' || phase === 'timeout' || phase === 'cancelled',
      ...exitPair(f.get('ExitCode')),
      reason: reason && reason !== 'None' ? reason : null,
    };
    const array = f.get('ArrayJobId');
    const tasks = f.get('ArrayTaskId');
    if (array && tasks) {
      for (const t of arrayTaskIds(tasks)) jobs.set(`${array}_${t}`, { id: `${array}_${t}`, ...base });
    } else {
      const id = f.get('JobId')!;
      jobs.set(id, { id, ...base });
    }
  }
  return jobs;
}

/** Pending reasons that waiting does not clear: the partition as configured can never run the job (slurm.conf(5),
 *  squeue(1) "JOB REASON CODES"; common practice, no source for the choice). */
export const HOPELESS_REASONS: Record<string, string> = {
  PartitionConfig: 'the partition cannot give the job what it asks for (more CPUs, tasks or memory than its nodes have)',
  PartitionNodeLimit: 'the job asks for more nodes than the partition allows',
  PartitionTimeLimit: "the job's time limit is above the partition's MaxTime",
  BadConstraints: "the job's constraints can never be met",
  InvalidAccount: 'the account is not valid',
  InvalidQOS: 'the QOS is not valid',
};
