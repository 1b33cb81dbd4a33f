import type { Mesh } from '../mesh/types.ts';
import { completeParents, locateParents, parentCells, type ParentCells } from '../mesh/nesting.ts';
import { startedTeam, taskUrl, type BackgroundJob } from '../fem/team/team.ts';
import { sharedMesh } from '../fem/team/mesh.ts';
import type { NestingTaskInput } from './nesting-task.ts';

/**
 * The parents of the finest level's cells in the level before it (mesh/nesting.ts, for the local orders of
 * where.ts) located ahead, by a worker of the cell team while the finest level is assembled and solved: at the end of
 * the study the main thread would otherwise spend about 0.2 s on them with the worker idle (P1 ladder, 2M fine cells
 * in 524k coarse ones). The result is the same array: the same search runs on the same data.
 */
const NESTING_TASK = taskUrl(import.meta.url, 'nesting-task');

interface Ahead { coarse: Mesh; input: NestingTaskInput; job: BackgroundJob }
const ahead = new WeakMap<Mesh, Ahead>();

/** Starts locating `fine`'s cells in `coarse` on a worker of the cell team, if one is running; nestedParents picks the
 *  result up. Both meshes' arrays move into shared memory (team/mesh.ts, sharedMesh: large meshes are there already). */
export function nestAhead(coarse: Mesh, fine: Mesh): void {
  const team = startedTeam();
  if (!team || team.workers === 0 || coarse.dim !== fine.dim) return;
  const input: NestingTaskInput = {
    coarse: sharedMesh(coarse), fine: sharedMesh(fine),
    parent: new Int32Array(new SharedArrayBuffer(4 * fine.nCells)), orphan: new Int32Array(new SharedArrayBuffer(4)),
  };
  const job = team.post(NESTING_TASK, input);
  if (job) ahead.set(fine, { coarse, input, job });
}

/** The background job nestAhead started for `fine`, if any (tests: to wait until a worker has claimed it). */
export function nestingJob(fine: Mesh): BackgroundJob | undefined {
  return ahead.get(fine)?.job;
}

/** parentCells(coarse, fine), from the work nestAhead started when it did (waiting for the worker, or doing the part
 *  here when no worker has taken it), else computed here. */
export function nestedParents(coarse: Mesh, fine: Mesh): ParentCells {
  const a = ahead.get(fine);
  if (!a || a.coarse !== coarse) return parentCells(coarse, fine);
  ahead.delete(fine);
  const { input } = a;
  a.job.finish(() => { input.orphan[0] = locateParents(coarse, fine, input.parent); });
  return completeParents(coarse, fine, input.parent, input.orphan[0]!);
}
