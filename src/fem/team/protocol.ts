/** The shared words of one job of the cell team (team.ts on the main thread, worker.ts in each worker): an Int32Array
 *  over a SharedArrayBuffer. Parts are claimed by Atomics.add on NEXT (by any thread); a worker stores DONE or FAILED
 *  in its part's status word when it is through with it, and the main thread waits on the status words of the parts
 *  it did not take. Every word is read and written with Atomics, so the plain writes a thread made into the job's
 *  output buffers before it stored a status are seen by the main thread after the matching load. */
export const NEXT = 0;
/** Status words start here, one per part: 0 while not finished by a worker, then DONE or FAILED. */
export const STATUS = 1;
export const DONE = 1, FAILED = 2;

/** A job as posted to a worker: the task module to import (its URL), the input its `prepare` rebuilds the task from
 *  (numbers, strings, SharedArrayBuffer-backed typed arrays: no copy), the control words and the number of parts. */
export interface TeamJob {
  task: string;
  input: unknown;
  control: SharedArrayBuffer;
  parts: number;
  /** A task that allocates nothing and holds none of the level's arrays (the seam sweeps of the multigrid cycle, a
   *  few milliseconds each): the worker skips its garbage collection after it (worker.ts). */
  light?: boolean;
}

/** What a task module exports: `prepare` builds, from a job's input, the function that computes one part (writing
 *  only into the input's shared output buffers, into places that part owns). The main thread runs the same
 *  `prepare` on the same input, so every part is the same operations on the same values whichever thread takes it. */
export interface TaskModule {
  prepare(input: unknown): (part: number) => void;
}
