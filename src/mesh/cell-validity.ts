import { cellDiameterSquared } from './diameter.ts';
import { minJacobian } from './measure.ts';
import type { Mesh } from './types.ts';

/** Cells whose smallest Jacobian is at most this fraction of diameter^dim count as degenerate: far below any
 *  usable shape, yet above round-off in the orientation tests (common practice, no source). */
export const DEGENERACY_TOLERANCE = 1e-12;

export interface CellDefect {
  cell: number;
  problem: 'inverted' | 'degenerate';
  /** Smallest Jacobian determinant of the cell's reference map. */
  jacobian: number;
  diameter: number;
}

/** The first inverted (negative Jacobian) or degenerate (zero Jacobian) cell, or null when every cell is valid. */
export function findDefectiveCell(mesh: Mesh): CellDefect | null {
  for (let c = 0; c < mesh.nCells; c++) {
    const jacobian = minJacobian(mesh, c);
    const diameter = Math.sqrt(cellDiameterSquared(mesh, c));
    const scale = DEGENERACY_TOLERANCE * diameter ** mesh.dim;
    if (!(jacobian > scale)) {
      const problem = jacobian < -scale ? 'inverted' : 'degenerate';
      return { cell: c, problem, jacobian, diameter };
    }
  }
  return null;
}
