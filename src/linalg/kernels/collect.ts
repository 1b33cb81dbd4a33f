import { setFlagsFromString } from 'node:v8';
import { runInNewContext } from 'node:vm';

/**
 * A full garbage collection of this thread's heap: for a worker of the cell team after each job, and on the main
 * thread before the multigrid setup of a large matrix (amg/setup.ts).
 *
 * Why on the main thread: the arena's WebAssembly memory is shared (arena.ts), and V8 does not count shared memory
 * as external memory the way it counted the unshared arena (all 4 GiB of it, which kept it collecting often); the
 * garbage of a level's assembly (about 100 MB of array buffers at 1M P1 unknowns) then stayed alive through the
 * setup. One collection there, 20–30 ms, took the seven-level P1 ladder's peak RSS from 795–834 to 772–779 MiB
 * (2 threads, 4 alternating runs, AMD EPYC 2 cores).
 *
 * Why: a job's input reaches a worker as objects over SharedArrayBuffers (no copy), and a SharedArrayBuffer's memory
 * is freed only when every thread holding an object of it has collected that object. The main thread collects often
 * (it allocates the level's arrays, and V8 counts them against its heap), but a worker allocates almost nothing: its
 * heap (about 19 MB) went whole levels without a full collection, keeping each finished job's arrays — the previous
 * level's matrix and shared copies among them — alive (measured on the seven-level P1 ladder, study.bench.ts: array
 * buffers at the start of the 1024² level 169 MB with two threads against 82 MB with one; peak RSS 853 → 802 MiB
 * with this collection, 0.91 → 0.80 GB at the end of the run).
 *
 * How: `gc` is V8's collection function, exposed by the --expose-gc flag, which a worker cannot take as an option
 * (Node refuses V8 flags in a Worker's execArgv, ERR_WORKER_INVALID_EXEC_ARGV). The flag is set for the moment of
 * creating one fresh context, whose global `gc` is then kept, and cleared again; the way Jest's leak detector
 * obtains it (jest-leak-detector, common practice, no source). A process started with --expose-gc already has it
 * (the flag is then left alone); without it (a V8 that refuses), nothing is done.
 */
export function collectGarbage(): void {
  collector ??= findCollector();
  collector();
}

/** Found at the first collection, not when this module loads: the fresh context would otherwise exist in every
 *  process that merely imports the solver (and a heap holding it cannot be saved as a start-up snapshot). */
let collector: (() => void) | undefined;

function findCollector(): () => void {
  const given = (globalThis as { gc?: unknown }).gc;
  if (typeof given === 'function') return () => { (given as () => void)(); };
  try {
    setFlagsFromString('--expose-gc');
    const gc = runInNewContext('gc') as unknown;
    return typeof gc === 'function' ? () => { (gc as () => void)(); } : () => {};
  } catch {
    return () => {};
  } finally {
    setFlagsFromString('--no-expose-gc');
  }
}
