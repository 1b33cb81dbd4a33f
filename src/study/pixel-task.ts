// The cell team's task that locates the pixel centres of a mesh's map in its cells (raster.ts, pixelOwners) on a
// worker while the main thread runs the finest level (where.ts, pixelOwnersAhead). One part: the whole.
import { meshOf, type SharedMesh } from '../fem/team/mesh.ts';
import { pixelOwners } from '../mesh/raster.ts';

export interface PixelTaskInput {
  mesh: SharedMesh;
  /** Out: the cell of each pixel (pixelOwners). */
  owner: Int32Array;
}

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as PixelTaskInput;
  return () => { p.owner.set(pixelOwners(meshOf(p.mesh))!); };
}
