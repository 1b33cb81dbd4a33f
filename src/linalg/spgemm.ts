/** Sparse matrix–matrix product C = A B in CSR, row by row (Gustavson 1978, ACM TOMS 4(3) 250–269): each row of C
 *  accumulates scaled rows of B; a marker per column of B holds the position of that column in the current output
 *  row, so accumulation is O(flops) with no hashing. One pass, output arrays grown geometrically. */
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
  let cap = Math.max(16, aPtr[m] + bPtr[B.nRows]);
  let cols = new Int32Array(cap);
  let vals = new Float64Array(cap);
  let nnz = 0;
  for (let i = 0; i < m; i++) {
    const rowStart = nnz;
    let bound = 0;
    for (let k = aPtr[i]; k < aPtr[i + 1]; k++) { const r = aCol[k]; bound += bPtr[r + 1] - bPtr[r]; }
    if (nnz + bound > cap) {
      cap = Math.max(nnz + bound, Math.ceil(cap * 1.5));
      const c2 = new Int32Array(cap); c2.set(cols.subarray(0, nnz)); cols = c2;
      const v2 = new Float64Array(cap); v2.set(vals.subarray(0, nnz)); vals = v2;
    }
    for (let k = aPtr[i]; k < aPtr[i + 1]; k++) {
      const a = aVal[k];
      const r = aCol[k];
      for (let q = bPtr[r]; q < bPtr[r + 1]; q++) {
        const j = bCol[q];
        const pos = marker[j];
        if (pos < rowStart) { marker[j] = nnz; cols[nnz] = j; vals[nnz] = a * bVal[q]; nnz++; }
        else vals[pos] += a * bVal[q];
      }
    }
    sortRowByColumn(cols, vals, rowStart, nnz);
    rowPtr[i + 1] = nnz;
  }
  return { nRows: m, nCols: nc, rowPtr, colIdx: cols.slice(0, nnz), values: vals.slice(0, nnz) };
}
