/** Sparse matrix–matrix product C = A B in CSR, row by row (Gustavson 1978, ACM TOMS 4(3) 250–269): each row of C
 *  accumulates scaled rows of B. Short output rows are kept sorted by insertion as they grow (cheaper than a
 *  lookup table for a handful of entries); longer ones use a marker per column of B holding the entry's position
 *  in the current row, then a sort. One pass; output arrays grow geometrically. */
import { RungsInputError } from '../errors.ts';
import { sortRowByColumn } from './csr.ts';
import type { Csr } from './types.ts';

/** Rows whose product has at most this many contributions use sorted insertion. */
const INSERTION_LIMIT = 24;

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
    if (bound <= INSERTION_LIMIT) {
      for (let k = aPtr[i]; k < aPtr[i + 1]; k++) {
        const a = aVal[k];
        const r = aCol[k];
        for (let q = bPtr[r]; q < bPtr[r + 1]; q++) {
          const j = bCol[q];
          const v = a * bVal[q];
          let p = nnz - 1;
          while (p >= rowStart && cols[p] > j) p--;
          if (p >= rowStart && cols[p] === j) vals[p] += v;
          else {
            for (let s = nnz; s > p + 1; s--) { cols[s] = cols[s - 1]; vals[s] = vals[s - 1]; }
            cols[p + 1] = j; vals[p + 1] = v; nnz++;
          }
        }
      }
    } else {
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
    }
    rowPtr[i + 1] = nnz;
  }
  return { nRows: m, nCols: nc, rowPtr, colIdx: cols.slice(0, nnz), values: vals.slice(0, nnz) };
}
