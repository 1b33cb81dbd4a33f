import type { Csr } from '../../linalg/types.ts';
import type { Mesh } from '../../mesh/types.ts';
import type { CellValues } from '../geometry/cellvalues.ts';
import type { FormCoefficients } from './types.ts';

/** What the cell loop of the scalar assembly needs: the element's values at each term's rule (CellValues; null for
 *  an absent term), the coefficients, the global system and the Dirichlet data. */
export interface CellLoopInput {
  mesh: Mesh;
  cellDofs: Int32Array;
  n: number;
  cvK: CellValues;
  cvB: CellValues | null;
  cvC: CellValues | null;
  cvF: CellValues | null;
  coef: FormCoefficients;
  A: Csr;
  b: Float64Array;
  reduced: Int32Array;
  dirichletValues: Float64Array;
}

/**
 * The cells one call of a cell loop assembles: c0 … c1 − 1, then halo[h0 … h1 − 1] (ascending, all after c1), and
 * the rows it may write: with `owner`, only those of global unknowns g with owner[g] = part (the other rows of a halo
 * cell belong to another part); without, every row. Every row receives its cells' entries in ascending cell order
 * either way, as in one pass over all cells, so the sums are the same bits (cell-parts.ts).
 */
export interface CellSet {
  c0: number;
  c1: number;
  halo: Int32Array | null;
  h0: number;
  h1: number;
  owner: Int32Array | null;
  part: number;
}

/** Every cell, every row: the serial pass. */
export const allCells = (nCells: number): CellSet => ({ c0: 0, c1: nCells, halo: null, h0: 0, h1: 0, owner: null, part: 0 });

export type CellLoop = (set: CellSet) => void;
