// Waiting for jobs with back-off: the scheduler is asked about every job still out, then again after a pause that
// grows by a factor up to a ceiling, and falls back to the first pause whenever some job changed its phase (a job that
// started tends to be followed by one that ends). One round asks once per job array, however many levels it holds.
import { RungsInputError } from '../errors.ts';
import { readScriptExit, type ScriptExit } from './script.ts';
import { SchedulerUnreachable } from './slurm.ts';
import type { JobState, Scheduler } from './types.ts';

export interface Backoff {
  /** Seconds before the second question. */
  first: number;
  factor: number;
  /** The longest pause, seconds. */
  max: number;
}

/** 0.5 s, 0.75 s, … up to 30 s: a level of seconds is seen within a fraction of its time, one of hours costs the
 *  controller two questions a minute (common practice, no source). */
export const BACKOFF: Backoff = { first: 0.5, factor: 1.5, max: 30 };

/** A controller that has not answered for this long ends the wait (the jobs run on; --resume re-attaches). */
export const UNREACHABLE_SECONDS = 600;

export interface Watched {
  id: string;
  /** The job's folder (its job.exit). */
  folder: string;
}

/** How a job ended: the scheduler's last word on it (null: it no longer knows the job) and the script's own record. */
export interface Outcome {
  id: string;
  state: JobState | null;
  exit: ScriptExit | null;
  /** Set when rungs cancelled a job that could never start (the reason in words). */
  hopeless?: string;
}

/** The pause before the next round. */
export function nextPause(previous: number | null, changed: boolean, b: Backoff = BACKOFF): number {
  if (previous === null || changed) return b.first;
  return Math.min(b.max, previous * b.factor);
}

const sleep = (seconds: number, signal?: AbortSignal) => new Promise<void>((resolve) => {
  if (signal?.aborted) { resolve(); return; }
  const t = setTimeout(done, seconds * 1e3);
  function done() { clearTimeout(t); signal?.removeEventListener('abort', done); resolve(); }
  signal?.addEventListener('abort', done, { once: true });
});

/**
 * Waits until every job has ended, calling `ended` for each as soon as it has (in the order they are seen). A job has
 * ended when the scheduler says so, or when its script wrote job.exit (the scheduler may lag behind, or have forgotten
 * it), or when the scheduler no longer knows it and it left no job.exit (gone: state null, exit null). A job pending
 * for a reason that waiting does not clear is cancelled and ends with `hopeless`. Returns early when `signal` aborts.
 */
export async function watchJobs(
  s: Scheduler, jobs: readonly Watched[], ended: (o: Outcome) => void, opts: { signal?: AbortSignal; backoff?: Backoff } = {},
): Promise<void> {
  const live = new Map(jobs.map((j) => [j.id, j]));
  const phases = new Map<string, string>();
  let pause: number | null = null;
  let unreachableSince: number | null = null;
  while (live.size && !opts.signal?.aborted) {
    let states: Map<string, JobState | null>;
    let changed = false;
    try {
      states = await s.states([...live.keys()]);
      unreachableSince = null;
    } catch (err) {
      if (!(err instanceof SchedulerUnreachable)) throw err;
      unreachableSince ??= performance.now();
      if (performance.now() - unreachableSince > UNREACHABLE_SECONDS * 1e3) {
        throw new RungsInputError(
          `${s.name} has not answered for ${UNREACHABLE_SECONDS} s (${err.message}); jobs ${[...live.keys()].join(', ')} are left as they are: ` +
            'rungs run --resume re-attaches to them once the scheduler answers again', 'scheduler');
      }
      states = new Map();
    }
    for (const [id, job] of [...live]) {
      if (!states.has(id) && unreachableSince !== null) continue;
      const state = states.get(id) ?? null;
      const exit = readScriptExit(job.folder);
      const word = state ? state.phase : exit ? 'exited' : 'gone';
      if (phases.get(id) !== word) { changed = true; phases.set(id, word); }
      const hopeless = state ? s.hopeless(state) : null;
      if ((state && state.final) || exit || state === null) {
        live.delete(id);
        ended({ id, state, exit });
      } else if (hopeless) {
        await s.cancel([id]);
        live.delete(id);
        ended({ id, state, exit: null, hopeless });
      }
    }
    if (!live.size) break;
    pause = nextPause(pause, changed, opts.backoff);
    await sleep(pause, opts.signal);
  }
}
