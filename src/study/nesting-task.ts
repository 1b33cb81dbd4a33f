// The cell team's task that locates the finest level's cells in the level before it ahead of the local orders
// (nesting-ahead.ts): one part, every fine cell, the same parents as the main thread would find.
import { meshOf, type SharedMesh } from '../fem/team/mesh.ts';
import { locateParents } from '../mesh/nesting.ts';

export interface NestingTaskInput {
  coarse: SharedMesh;
  fine: SharedMesh;
  /** Out: the parent of each fine cell (shared memory). */
  parent: Int32Array;
  /** Out: [the first orphan, or −1]. */
  orphan: Int32Array;
}

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as NestingTaskInput;
  const coarse = meshOf(p.coarse), fine = meshOf(p.fine);
  return () => { p.orphan[0] = locateParents(coarse, fine, p.parent); };
}
