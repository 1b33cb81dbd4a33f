// The cell team's task that makes the mesh's own arrays of the finest level's errors.vtu (its points, offsets and cell
// types: src/external/vtk/write.ts, fillMeshVtuArrays) on a worker while the main thread runs the level (where.ts,
// meshVtuArraysAhead). One part: the whole.
import { meshOf, type SharedMesh } from '../fem/team/mesh.ts';
import { fillMeshVtuArrays, type MeshVtuArrays } from '../external/vtk/write.ts';

export interface MeshVtuTaskInput extends MeshVtuArrays {
  mesh: SharedMesh;
}

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as MeshVtuTaskInput;
  return () => { fillMeshVtuArrays(meshOf(p.mesh), p); };
}
