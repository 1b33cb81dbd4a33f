import { RungsInputError } from '../errors.ts';
import type { Csr } from './types.ts';
import { heapAllocator, type Allocator } from './kernels/allocator.ts';

const WHERE = 'linalg/csr';

/** y = A x. Writes every entry of y, allocates nothing. */
export function spmv(A: Csr, x: Float64Array, y: Float64Array): void {
  const { nRows, rowPtr, colIdx, values } = A;
  let k = rowPtr[0];
  for (let i = 0; i < nRows; i++) {
    const end = rowPtr[i + 1];
    let s = 0;
    for (; k < end; k++) s += values[k] * x[colIdx[k]];
    y[i] = s;
  }
}

/** CSR copy of a dense row-major matrix (rows of numbers); exact zeros are dropped. */
export function csrFromDense(rows: ArrayLike<ArrayLike<number>>): Csr {
  const nRows = rows.length;
  const nCols = nRows > 0 ? rows[0].length : 0;
  let nnz = 0;
  for (let i = 0; i < nRows; i++) {
    if (rows[i].length !== nCols) throw new RungsInputError(`row ${i} has ${rows[i].length} entries, expected ${nCols}`, WHERE);
    for (let j = 0; j < nCols; j++) if (rows[i][j] !== 0) nnz++;
  }
  const rowPtr = new Int32Array(nRows + 1);
  const colIdx = new Int32Array(nnz);
  const values = new Float64Array(nnz);
  let k = 0;
  for (let i = 0; i < nRows; i++) {
    for (let j = 0; j < nCols; j++) {
      const v = rows[i][j];
      if (v !== 0) { colIdx[k] = j; values[k] = v; k++; }
    }
    rowPtr[i + 1] = k;
  }
  return { nRows, nCols, rowPtr, colIdx, values };
}

/** CSR from coordinate triplets (i[k], j[k], v[k]); duplicates are summed, as finite element assembly expects. */
export function csrFromTriplets(
  nRows: number, nCols: number,
  rowsOf: ArrayLike<number>, colsOf: ArrayLike<number>, vals: ArrayLike<number>,
): Csr {
  const m = rowsOf.length;
  if (colsOf.length !== m || vals.length !== m) {
    throw new RungsInputError(`triplet arrays differ in length (${m}, ${colsOf.length}, ${vals.length})`, WHERE);
  }
  // Bucket by row (counting sort), then sort each row by column and merge duplicates.
  const count = new Int32Array(nRows + 1);
  for (let k = 0; k < m; k++) {
    const i = rowsOf[k], j = colsOf[k];
    if (!(i >= 0 && i < nRows && j >= 0 && j < nCols) || i !== Math.floor(i) || j !== Math.floor(j)) {
      throw new RungsInputError(`triplet ${k} at (${i}, ${j}) lies outside a ${nRows}×${nCols} matrix`, WHERE);
    }
    count[i + 1]++;
  }
  for (let i = 0; i < nRows; i++) count[i + 1] += count[i];
  const fill = count.slice(0, nRows);
  const cols = new Int32Array(m);
  const vs = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const p = fill[rowsOf[k]]++;
    cols[p] = colsOf[k];
    vs[p] = vals[k];
  }
  const rowPtr = new Int32Array(nRows + 1);
  let out = 0;
  for (let i = 0; i < nRows; i++) {
    const lo = count[i], hi = count[i + 1];
    sortRowByColumn(cols, vs, lo, hi);
    for (let p = lo; p < hi; p++) {
      if (out > rowPtr[i] && cols[out - 1] === cols[p]) vs[out - 1] += vs[p];
      else { cols[out] = cols[p]; vs[out] = vs[p]; out++; }
    }
    rowPtr[i + 1] = out;
  }
  return { nRows, nCols, rowPtr, colIdx: cols.slice(0, out), values: vs.slice(0, out) };
}

/** Sorts cols[lo..hi) ascending, carrying vals along: insertion sort for the short rows of FE matrices, heap sort past 32. */
export function sortRowByColumn(cols: Int32Array, vals: Float64Array, lo: number, hi: number): void {
  if (hi - lo > 32) { heapSortRow(cols, vals, lo, hi); return; }
  for (let i = lo + 1; i < hi; i++) {
    const c = cols[i], v = vals[i];
    let j = i - 1;
    while (j >= lo && cols[j] > c) { cols[j + 1] = cols[j]; vals[j + 1] = vals[j]; j--; }
    cols[j + 1] = c; vals[j + 1] = v;
  }
}

function heapSortRow(cols: Int32Array, vals: Float64Array, lo: number, hi: number): void {
  const n = hi - lo;
  for (let s = (n >> 1) - 1; s >= 0; s--) siftDown(cols, vals, lo, s, n);
  for (let end = n - 1; end > 0; end--) {
    const tc = cols[lo]; cols[lo] = cols[lo + end]; cols[lo + end] = tc;
    const tv = vals[lo]; vals[lo] = vals[lo + end]; vals[lo + end] = tv;
    siftDown(cols, vals, lo, 0, end);
  }
}

function siftDown(cols: Int32Array, vals: Float64Array, lo: number, start: number, end: number): void {
  let root = start;
  for (;;) {
    let child = 2 * root + 1;
    if (child >= end) return;
    if (child + 1 < end && cols[lo + child + 1] > cols[lo + child]) child++;
    if (cols[lo + root] >= cols[lo + child]) return;
    const a = lo + root, b = lo + child;
    const tc = cols[a]; cols[a] = cols[b]; cols[b] = tc;
    const tv = vals[a]; vals[a] = vals[b]; vals[b] = tv;
    root = child;
  }
}

/** Aᵀ in CSR; a counting sort by column, so the rows of the result come out sorted. */
export function transpose(A: Csr, alloc: Allocator = heapAllocator): Csr {
  const { nRows, nCols, rowPtr, colIdx, values } = A;
  const nnz = rowPtr[nRows];
  const tPtr = alloc.i32(nCols + 1);
  for (let k = 0; k < nnz; k++) tPtr[colIdx[k] + 1]++;
  for (let j = 0; j < nCols; j++) tPtr[j + 1] += tPtr[j];
  const fill = alloc.i32(nCols, false);
  fill.set(tPtr.subarray(0, nCols));
  const tCol = alloc.i32(nnz, false);
  const tVal = alloc.f64(nnz, false);
  const wasm = alloc.wasm;
  if (wasm && wasm.owns(rowPtr, colIdx, values, tPtr, fill, tCol, tVal)) {
    wasm.kernels.transposeInto(nRows, rowPtr.byteOffset, colIdx.byteOffset, values.byteOffset, fill.byteOffset,
      tCol.byteOffset, tVal.byteOffset);
    alloc.free(fill);
    return { nRows: nCols, nCols: nRows, rowPtr: tPtr, colIdx: tCol, values: tVal };
  }
  for (let i = 0; i < nRows; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const p = fill[colIdx[k]]++;
      tCol[p] = i;
      tVal[p] = values[k];
    }
  }
  alloc.free(fill);
  return { nRows: nCols, nCols: nRows, rowPtr: tPtr, colIdx: tCol, values: tVal };
}

/** Position of the diagonal entry of every row, −1 where the row stores none. */
export function diagonalPositions(A: Csr, alloc: Allocator = heapAllocator): Int32Array {
  const { nRows, rowPtr, colIdx } = A;
  const pos = alloc.i32(nRows, false).fill(-1);
  for (let i = 0; i < nRows; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      if (colIdx[k] === i) { pos[i] = k; break; }
      if (colIdx[k] > i) break;
    }
  }
  return pos;
}

/** The diagonal a_ii (0 where absent). */
export function diagonal(A: Csr, out?: Float64Array): Float64Array {
  const n = Math.min(A.nRows, A.nCols);
  const d = out ?? new Float64Array(n);
  const pos = diagonalPositions(A);
  for (let i = 0; i < n; i++) d[i] = pos[i] >= 0 ? A.values[pos[i]] : 0;
  return d;
}

/** Whether A equals Aᵀ up to |a_ij − a_ji| ≤ relTol · max(rowMax_i, rowMax_j), with rowMax the largest |entry| of a row
 *  (so round-off in entries that should cancel to zero is not mistaken for asymmetry). A missing entry counts as 0.
 *  One sweep in row order: the transposed partner of every upper entry (i, j) is met in row j in increasing i,
 *  so a cursor per row finds it without search — O(nnz). */
export function isSymmetric(A: Csr, relTol = 1e-10): boolean {
  const { nRows, nCols, rowPtr, colIdx, values } = A;
  if (nRows !== nCols) return false;
  const rowMax = new Float64Array(nRows);
  for (let i = 0; i < nRows; i++) {
    let m = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const a = Math.abs(values[k]);
      if (!(a < Infinity)) return false; // NaN or ±Inf: no meaningful comparison
      if (a > m) m = a;
    }
    rowMax[i] = m;
  }
  // cursor[j]: next unmatched strictly-lower entry of row j.
  const cursor = rowPtr.slice(0, nRows);
  for (let i = 0; i < nRows; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j <= i) continue;
      const tol = relTol * Math.max(rowMax[i], rowMax[j]);
      // Lower entries (j, c) with c < i have no upper partner (i would have met them): they must be ~0.
      let p = cursor[j];
      const end = rowPtr[j + 1];
      while (p < end && colIdx[p] < i) {
        if (Math.abs(values[p]) > relTol * Math.max(rowMax[j], rowMax[colIdx[p]])) return false;
        p++;
      }
      if (p < end && colIdx[p] === i) {
        if (Math.abs(values[k] - values[p]) > tol) return false;
        p++;
      } else if (Math.abs(values[k]) > tol) return false;
      cursor[j] = p;
    }
  }
  // Lower entries left unmatched at the end of each row.
  for (let j = 0; j < nRows; j++) {
    for (let p = cursor[j]; p < rowPtr[j + 1] && colIdx[p] < j; p++) {
      if (Math.abs(values[p]) > relTol * Math.max(rowMax[j], rowMax[colIdx[p]])) return false;
    }
  }
  return true;
}

/** r = b − A x (allocation-free when r is given). */
export function residual(A: Csr, x: Float64Array, b: Float64Array, r: Float64Array): void {
  const { nRows, rowPtr, colIdx, values } = A;
  for (let i = 0; i < nRows; i++) {
    let s = b[i];
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s -= values[k] * x[colIdx[k]];
    r[i] = s;
  }
}

/** ||b − A x||₂ without storing the residual. */
export function residualNorm(A: Csr, x: Float64Array, b: Float64Array): number {
  const { nRows, rowPtr, colIdx, values } = A;
  let sum = 0;
  for (let i = 0; i < nRows; i++) {
    let s = b[i];
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s -= values[k] * x[colIdx[k]];
    sum += s * s;
  }
  return Math.sqrt(sum);
}

/** ||b − A x|| / ||b|| (the absolute residual when b = 0). */
export function relativeResidualNorm(A: Csr, x: Float64Array, b: Float64Array): number {
  let bb = 0;
  for (let i = 0; i < b.length; i++) bb += b[i] * b[i];
  const r = residualNorm(A, x, b);
  return bb > 0 ? r / Math.sqrt(bb) : r;
}

/** Throws a RungsInputError naming the first non-finite entry of A (row, column), if any. */
export function assertFiniteMatrix(A: Csr, where: string): void {
  const { nRows, rowPtr, colIdx, values } = A;
  for (let i = 0; i < nRows; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      if (!Number.isFinite(values[k])) {
        throw new RungsInputError(
          `matrix entry (${i}, ${colIdx[k]}) is ${values[k]}; every entry must be finite (check the coefficients and the assembly)`,
          where,
        );
      }
    }
  }
}

/** Throws unless A is square with n rows and the vectors given have length n. */
export function assertSquareSystem(A: Csr, where: string, ...vectors: [string, Float64Array][]): void {
  if (A.nRows !== A.nCols) throw new RungsInputError(`matrix is ${A.nRows}×${A.nCols}; a square matrix is needed`, where);
  for (const [name, v] of vectors) {
    if (v.length !== A.nRows) throw new RungsInputError(`${name} has length ${v.length}, expected ${A.nRows} (the matrix size)`, where);
  }
}
