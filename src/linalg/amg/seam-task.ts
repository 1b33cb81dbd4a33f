/** The interiors of a seam-ordered sweep (seams.ts), and the prolongation to a seam-ordered level, as a task of a
 *  PartTeam: part p sweeps interior p (or prolongs run p of rows) with the kernels of sparse.wat, on the arena's
 *  shared memory, in whichever thread takes it. The main thread's parts run the same kernels on the same memory
 *  (wasm-cycle.ts, through seamPart), so every part is the same operations on the same values wherever it runs. */
import { dropKeptMemory, instantiateKernels } from '../kernels/arena.ts';
import type { SparseKernels } from '../kernels/sparse-kernels.ts';
import { taskUrl } from '../../files/task-url.ts';
import type { PartTeam } from '../types.ts';

/** This module's URL, for the team's workers. */
export const SEAM_TASK = taskUrl(import.meta.url, 'seam-task');

export type SeamOp = 'forward' | 'backward' | 'product' | 'prolong' | 'restrict';

/** One phase: the level's arrays and vectors as byte offsets into the memory, the interiors, and (op 'product') a
 *  shared array for each part's b·x. */
export interface SeamPhase {
  memoryId: number;
  memory: WebAssembly.Memory;
  op: SeamOp;
  rp: number; ci: number; va: number; dp: number; inv: number;
  b: number; x: number;
  /** r (forward) or w (product); unused by 'backward', 'prolong' (rp, ci, va: P's; b: the coarse x; interiors:
   *  runs of P's rows) and 'restrict' (rp, ci, va: R's; b: the fine residual; x: the coarse b; interiors: runs of R's
   *  rows). */
  v: number;
  interiors: Int32Array;
  sums: Float64Array;
}

/** Runs interior p of a phase with these kernels; returns its b·x for 'product' (0 otherwise). */
export function seamPart(k: SparseKernels, f: SeamPhase, p: number): number {
  const first = f.interiors[2 * p], last = f.interiors[2 * p + 1];
  if (f.op === 'forward') k.forwardSweepFromZeroWithResidualRows(first, last, f.rp, f.ci, f.va, f.dp, f.inv, f.b, f.x, f.v);
  else if (f.op === 'backward') k.backwardSweepRows(first, last, f.rp, f.ci, f.va, f.dp, f.inv, f.b, f.x);
  else if (f.op === 'prolong') k.multiplyAdd(last - first, f.rp + 4 * first, f.ci, f.va, f.b, f.x + 8 * first);
  else if (f.op === 'restrict') k.spmv(last - first, f.rp + 4 * first, f.ci, f.va, f.b, f.x + 8 * first);
  else return k.backwardSweepWithProductRows(first, last, first, f.rp, f.ci, f.va, f.dp, f.inv, f.b, f.x, f.v);
  return 0;
}

/** The kernels on the last memory seen in this thread (one at a time: a new arena's memory replaces the old one, so
 *  this thread holds no more than the main thread's arena). */
let current: { id: number; kernels: SparseKernels } | null = null;

export function prepare(input: unknown): (part: number) => void {
  // A job that only lets go of the kernels (and with them the arena's memory): see releaseArenaMemory.
  if ((input as { forget?: boolean }).forget) { current = null; return () => {}; }
  const f = input as SeamPhase;
  if (!current || current.id !== f.memoryId) {
    const kernels = instantiateKernels(f.memory);
    if (!kernels) throw new Error('no WebAssembly in this thread');
    current = { id: f.memoryId, kernels };
  }
  const k = current.kernels;
  return (p) => {
    const bx = seamPart(k, f, p);
    if (f.op === 'product') f.sums[p] = bx;
  };
}

/** Lets go of the memory the arenas keep for the next solve, in this thread and (by a job that makes the workers
 *  forget their kernels, after which they collect) in the team's: for when no multigrid solve is left to run. The
 *  memory is given back once this thread has collected too (collect.ts); returns whether any was kept. */
export function releaseArenaMemory(team?: PartTeam): boolean {
  const kept = dropKeptMemory();
  current = null;
  if (kept && team && team.workers > 0) team.run(SEAM_TASK, { forget: true }, team.workers + 1, () => {});
  return kept;
}
