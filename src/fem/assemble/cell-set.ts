import type { Csr } from '../../linalg/types.ts';
import type { Mesh } from '../../mesh/types.ts';
import type { CellValues } from '../geometry/cellvalues.ts';
import type { FormCoefficients } from './types.ts';
import type { Deferred } from './deferred.ts';

/** What the cell loop of the scalar assembly needs: the element's values at each term's rule (CellValues; null for
 *  an absent term), the coefficients, the global system and the Dirichlet data. A null A or b is not written: the
 *  matrix and the load vector assembled by separate passes (system.ts); a pass without A needs each cell's matrix only
 *  where it has a Dirichlet unknown (its columns are folded into b), and the written-out loops compute it only there. */
export interface CellLoopInput {
  mesh: Mesh;
  cellDofs: Int32Array;
  n: number;
  cvK: CellValues;
  cvB: CellValues | null;
  cvC: CellValues | null;
  cvF: CellValues | null;
  coef: FormCoefficients;
  A: Csr | null;
  b: Float64Array | null;
  reduced: Int32Array;
  dirichletValues: Float64Array;
}

/**
 * The cells one call of a cell loop assembles, c0 … c1 − 1, and the rows it writes: without `owner`, every row;
 * with it, the rows of global unknowns g with owner[g] = part directly, and the additions to the rows of earlier parts
 * recorded in `defer` in the order they are made (deferred.ts), to be replayed once those parts are complete
 * (cell-parts.ts, runPart). Every row then receives its cells' entries in ascending cell order, as in one pass over
 * all cells: the same sums in the same order, the same bits.
 */
export interface CellSet {
  c0: number;
  c1: number;
  owner: Int32Array | null;
  part: number;
  defer: Deferred | null;
}

/** Every cell, every row: the serial pass. */
export const allCells = (nCells: number): CellSet => ({ c0: 0, c1: nCells, owner: null, part: 0, defer: null });

export type CellLoop = (set: CellSet) => void;
