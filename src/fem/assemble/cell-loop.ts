import type { CellLoop, CellLoopInput } from './cell-set.ts';
import { generalCells } from './general-cells.ts';
import { tetrahedronCells } from './tetrahedra.ts';
import { triangleCells } from './triangles.ts';
import { p1TriangleCells } from './p1-triangles.ts';

/** The cell loop for the mesh's cells: the fast paths for affine triangles (P1 with stiffness and load only: its own
 *  loop) and tetrahedra, the reference loop for the rest (`reference: true` forces it: tests compare them bit for bit). */
export function cellLoop(p: CellLoopInput, reference = false): CellLoop {
  if (!reference && p.mesh.cellKind === 'triangle') return p1TriangleCells(p, triangleCells(p));
  if (!reference && p.mesh.cellKind === 'tetrahedron') return tetrahedronCells(p);
  return generalCells(p);
}
