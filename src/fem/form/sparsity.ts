import type { Csr } from '../../linalg/types.ts';
import { patternOfCells } from '../assemble/sparsity.ts';

/** CSR pattern (values zero) of every unknown coupled to every other unknown of a cell, from the cells' lists of
 *  global unknowns (nCells · nLocal): the construction of src/fem/assemble/sparsity.ts with every unknown a row. */
export function sparsityOfCells(nDofs: number, nCells: number, nLocal: number, cellDofs: Int32Array): Csr {
  return patternOfCells(nDofs, nCells, nLocal, cellDofs, null, nDofs);
}
