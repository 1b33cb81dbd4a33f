/** Sparse matrix–matrix product C = A B in CSR, row by row (Gustavson 1978, ACM TOMS 4(3) 250–269): each row of C
 *  accumulates scaled rows of B through a marker per column of B that holds the entry's position in the current
 *  row; the row is sorted at the end. Used for the multigrid Galerkin products. */
import { RungsInputError } from '../errors.ts';
import { sortRowByColumn } from './csr.ts';
import type { Csr } from './types.ts';

export function spgemm(A: Csr, B: Csr): Csr {
  if (A.nCols !== B.nRows) {
    throw new RungsInputError(`spgemm: cannot multiply ${A.nRows}×${A.nCols} by ${B.nRows}×${B.nCols}`, 'linalg/spgemm');
  }
  const m = A.nRows, nc = B.nCols;
  const aPtr = A.rowPtr, aCol = A.colIdx, aVal = A.values;
  const bPtr = B.rowPtr, bCol = B.colIdx, bVal = B.values;
  const marker = new Int32Array(nc).fill(-1);
  const rowPtr = new Int32Array(m + 1);
  // Room for every contribution: pages the product never reaches are never touched (the operating system maps
  // them on first write), so the bound costs address space, not time; the result is a view, not a copy.
  let bound = 0;
  for (let k = 0; k < aPtr[m]; k++) { const r = aCol[k]; bound += bPtr[r + 1] - bPtr[r]; }
  const cols = new Int32Array(Math.max(1, bound));
  const vals = new Float64Array(Math.max(1, bound));
  let nnz = 0;
  for (let i = 0; i < m; i++) {
    const rowStart = nnz;
    const lo = aPtr[i], hi = aPtr[i + 1];
    for (let k = lo; k < hi; k++) {
      const a = aVal[k];
      const r = aCol[k];
      for (let q = bPtr[r], qe = bPtr[r + 1]; q < qe; q++) {
        const j = bCol[q];
        const pos = marker[j];
        if (pos < rowStart) { marker[j] = nnz; cols[nnz] = j; vals[nnz] = a * bVal[q]; nnz++; }
        else vals[pos] += a * bVal[q];
      }
    }
    sortRowByColumn(cols, vals, rowStart, nnz);
    rowPtr[i + 1] = nnz;
  }
  return { nRows: m, nCols: nc, rowPtr, colIdx: cols.subarray(0, nnz), values: vals.subarray(0, nnz) };
}
