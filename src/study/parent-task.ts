// The cell team's task that locates the finest level's cells in the coarser level's (parentCells) on a worker while
// the main thread meshes, assembles and sets up the multigrid of the finest level (where.ts, parentCellsAhead). One
// part: the whole. The local-order task takes its result instead of locating them again.
import { meshOf, type SharedMesh } from '../fem/team/mesh.ts';
import { parentCells } from '../mesh/nesting.ts';

export interface ParentTaskInput {
  coarse: SharedMesh;
  fine: SharedMesh;
  /** Out: the coarse cell of each fine cell (ParentCells.parent). */
  parent: Int32Array;
  /** Out: [nested (1 or 0)]. */
  nested: Int32Array;
}

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as ParentTaskInput;
  return () => {
    const nest = parentCells(meshOf(p.coarse), meshOf(p.fine));
    p.parent.set(nest.parent);
    p.nested[0] = nest.nested ? 1 : 0;
  };
}
