// A cell-team worker thread: for each job posted by the main thread (team.ts) it imports the job's task module (once
// per module), rebuilds the task from the job's input and takes parts until none is left, storing DONE (or FAILED,
// after any error: the main thread then computes that part itself and meets the error there, with its message).
import { parentPort } from 'node:worker_threads';
import { DONE, FAILED, NEXT, STATUS, type TaskModule, type TeamJob } from './protocol.ts';
import { collectGarbage } from '../../linalg/kernels/collect.ts';
import { heldTaskModule } from './task-registry.ts';

const modules = new Map<string, Promise<TaskModule>>();

parentPort!.on('message', async (job: TeamJob) => {
  await runJob(job);
  if (job.light) return;
  // The job's input held the level's shared arrays (mesh, unknowns per cell, matrix, vectors: 0.3 GB at 1M P1
  // unknowns); a SharedArrayBuffer's memory is given back only once every thread that received it has collected its
  // object, and this thread's small heap is rarely collected by itself (src/linalg/kernels/collect.ts).
  collectGarbage();
});

async function runJob(job: TeamJob): Promise<void> {
  const control = new Int32Array(job.control);
  let run: ((part: number) => void) | null = null;
  try {
    let mod = modules.get(job.task);
    if (!mod) {
      const held = heldTaskModule(job.task);
      mod = held ? Promise.resolve(held) : import(job.task) as Promise<TaskModule>;
      modules.set(job.task, mod);
    }
    run = (await mod).prepare(job.input);
  } catch {
    run = null;
  }
  // A worker that could not build the task takes no part: the main thread takes them all.
  if (!run) return;
  for (let k = Atomics.add(control, NEXT, 1); k < job.parts; k = Atomics.add(control, NEXT, 1)) {
    let status = DONE;
    try { run(k); } catch { status = FAILED; }
    Atomics.store(control, STATUS + k, status);
    Atomics.notify(control, STATUS + k);
    if (status === FAILED) break;
  }
}
