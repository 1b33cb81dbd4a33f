// The cell team's task that locates the finest level's cells in the level before it (parentCells) on a worker while
// the main thread writes the finest level's error file and maps (where.ts, parentCellsAhead). One part: the whole.
import { meshOf, type SharedMesh } from '../fem/team/mesh.ts';
import { parentCells } from '../mesh/nesting.ts';

export interface NestingTaskInput {
  coarse: SharedMesh;
  fine: SharedMesh;
  /** Out: the parent of each fine cell (parentCells's `parent`). */
  parent: Int32Array;
  /** Out: [1] when the pair is nested, [0] when not. */
  nested: Int32Array;
}

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as NestingTaskInput;
  return () => {
    const found = parentCells(meshOf(p.coarse), meshOf(p.fine), { into: p.parent });
    p.nested[0] = found.nested ? 1 : 0;
  };
}
