// The cell team's task that locates the finest level's cells in the coarser level's (parentCells) on a worker while
// the main thread meshes, assembles and sets up the multigrid of the finest level (where.ts, parentCellsAhead). One
// part: the whole. The local-order task takes its result instead of locating them again.
import { meshOf, type SharedMesh } from '../fem/team/mesh.ts';
import { parentCells } from '../mesh/nesting.ts';
import { cellMeasures } from '../mesh/regions.ts';

export interface ParentTaskInput {
  coarse: SharedMesh;
  fine: SharedMesh;
  /** Out: the coarse cell of each fine cell (ParentCells.parent). */
  parent: Int32Array;
  /** Out: [nested (1 or 0)]. */
  nested: Int32Array;
  /** Out: the fine cells' measures, which the location's check of nestedness computes (the main thread then takes
   *  them for the finest level's error densities instead of measuring 2M triangles again). */
  fineMeasures: Float64Array;
}

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as ParentTaskInput;
  return () => {
    const fine = meshOf(p.fine);
    const nest = parentCells(meshOf(p.coarse), fine);
    p.parent.set(nest.parent);
    p.fineMeasures.set(cellMeasures(fine));
    p.nested[0] = nest.nested ? 1 : 0;
  };
}
