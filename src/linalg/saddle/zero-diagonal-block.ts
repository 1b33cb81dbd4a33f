/** The refusal of a saddle-point matrix where an SPD solver (CG) was asked for. A symmetric positive definite matrix
 *  has a positive diagonal (e_iᵀ A e_i > 0), so a zero diagonal entry already rules CG out; what makes the message
 *  worth giving is the shape [[A, Bᵀ], [B, 0]]: a set Z of at least two rows with zero (or absent) diagonal entries
 *  whose block K[Z, Z] is entirely zero while each of those rows couples to the others (common practice, no source).
 *  A single lost diagonal entry is not called a saddle point: it keeps the message of whatever meets it first.
 *  One pass over the matrix, O(nnz), no ordering assumed (the pressure unknowns may come first, last or interleaved). */
import { RungsInputError } from '../../errors.ts';
import type { Csr } from '../types.ts';

export interface ZeroDiagonalBlock {
  /** Rows with a zero diagonal entry (all of them: the zero block). */
  rows: number;
  /** The first such row. */
  first: number;
}

/** The zero diagonal block of a saddle-point matrix, or null when A does not have that shape. */
export function findZeroDiagonalBlock(A: Csr): ZeroDiagonalBlock | null {
  const { nRows, rowPtr, colIdx, values } = A;
  if (A.nCols !== nRows) return null;
  const zero = new Uint8Array(nRows);
  let count = 0, first = -1;
  for (let i = 0; i < nRows; i++) {
    let d = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) if (colIdx[k] === i) d += values[k];
    if (d === 0) { zero[i] = 1; count++; if (first < 0) first = i; }
  }
  if (count < 2 || count === nRows) return null;
  for (let i = 0; i < nRows; i++) {
    if (!zero[i]) continue;
    let coupled = false;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (values[k] === 0) continue;
      if (zero[j]) return null; // the block K[Z, Z] is not zero: not the saddle-point shape
      coupled = true;
    }
    if (!coupled) return null; // an empty row: singular, but not a constraint row
  }
  return { rows: count, first };
}

/** Throws a RungsInputError naming MINRES and solveSaddlePoint when A has the saddle-point shape; `context` starts
 *  the message (e.g. "solveSystem: method 'cg'"). */
export function assertNotSaddlePoint(A: Csr, context: string, where: string): void {
  const z = findZeroDiagonalBlock(A);
  if (!z) return;
  throw new RungsInputError(
    `${context}: the matrix has a zero diagonal block (${z.rows} rows with a zero diagonal, the first row ${z.first}, ` +
      'coupled only to the other unknowns): it is a saddle-point system [[A, Bᵀ], [B, 0]] (e.g. velocity and ' +
      'pressure), symmetric but indefinite, and conjugate gradients needs a positive definite matrix; use ' +
      "solveSaddlePoint (MINRES with a block-diagonal preconditioner, src/linalg/saddle) or method 'direct'", where);
}
