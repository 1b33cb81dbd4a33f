/** Sparse matrix–matrix product C = A B in CSR, row by row (Gustavson 1978, ACM TOMS 4(3) 250–269): each row of C
 *  accumulates scaled rows of B through a marker per column of B that holds the entry's position in the current
 *  row; the row is sorted at the end. Used for the multigrid Galerkin products. When every operand lives in the
 *  allocator's WebAssembly memory, the same loop runs as the kernel sparseProduct (sparse.wat), same bits. */
import { RungsInputError } from '../errors.ts';
import { sortRowByColumn } from './csr.ts';
import { heapAllocator, type Allocator } from './kernels/allocator.ts';
import type { Csr } from './types.ts';

/** The result's arrays come from `alloc` (default: the JavaScript heap). */
export function spgemm(A: Csr, B: Csr, alloc: Allocator = heapAllocator): Csr {
  if (A.nCols !== B.nRows) {
    throw new RungsInputError(`spgemm: cannot multiply ${A.nRows}×${A.nCols} by ${B.nRows}×${B.nCols}`, 'linalg/spgemm');
  }
  const m = A.nRows, nc = B.nCols;
  const aPtr = A.rowPtr, aCol = A.colIdx, aVal = A.values;
  const bPtr = B.rowPtr, bCol = B.colIdx, bVal = B.values;
  const out = productBuffers(A, B, alloc);
  const byKernel = productByKernel('sparseProduct', A, B, out, alloc);
  if (byKernel) return byKernel;
  const { rowPtr, cols, vals } = out;
  const marker = new Int32Array(nc).fill(-1);
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
  return productResult(A, B, out, nnz, alloc);
}

/** Row pointers and room for every contribution of a product A·B (or of a part of it): each entry a_ik picks row k
 *  of B. Pages the product never reaches are never touched (the operating system maps them on first write), so the
 *  bound costs address space, not time; productResult gives the unused tail back. */
export interface ProductBuffers { rowPtr: Int32Array; cols: Int32Array; vals: Float64Array }

export function productBuffers(A: Csr, B: Csr, alloc: Allocator): ProductBuffers {
  const m = A.nRows, aPtr = A.rowPtr, aCol = A.colIdx, bPtr = B.rowPtr;
  let bound = 0;
  for (let k = 0; k < aPtr[m]; k++) { const r = aCol[k]; bound += bPtr[r + 1] - bPtr[r]; }
  return { rowPtr: alloc.i32(m + 1), cols: alloc.i32(Math.max(1, bound), false), vals: alloc.f64(Math.max(1, bound), false) };
}

/** The product with nnz entries in `out`, its unused room given back. */
export function productResult(A: Csr, B: Csr, out: ProductBuffers, nnz: number, alloc: Allocator): Csr {
  return { nRows: A.nRows, nCols: B.nCols, rowPtr: out.rowPtr, colIdx: alloc.shrink(out.cols, nnz), values: alloc.shrink(out.vals, nnz) };
}

/** A·B (sparseProduct) or the upper triangle of A·B (upperProduct) by the WebAssembly kernel of that name, when every
 *  operand lives in the allocator's WebAssembly memory; null otherwise (the caller runs its TypeScript loop). */
export function productByKernel(
  kernel: 'sparseProduct' | 'upperProduct', A: Csr, B: Csr, out: ProductBuffers, alloc: Allocator,
): Csr | null {
  const wasm = alloc.wasm;
  const { rowPtr, cols, vals } = out;
  if (!wasm || !wasm.owns(A.rowPtr, A.colIdx, A.values, B.rowPtr, B.colIdx, B.values, rowPtr, cols, vals)) return null;
  const marker = alloc.i32(B.nCols, false);
  if (!wasm.owns(marker)) { alloc.free(marker); return null; }
  marker.fill(-1);
  const nnz = wasm.kernels[kernel](A.nRows, A.rowPtr.byteOffset, A.colIdx.byteOffset, A.values.byteOffset, B.rowPtr.byteOffset,
    B.colIdx.byteOffset, B.values.byteOffset, marker.byteOffset, rowPtr.byteOffset, cols.byteOffset, vals.byteOffset);
  alloc.free(marker);
  sortLongRows(rowPtr, cols, vals, A.nRows);
  return productResult(A, B, out, nnz, alloc);
}

/** The kernels sort rows of up to 32 entries (insertion sort); the longer ones are sorted here (heap sort). */
export function sortLongRows(rowPtr: Int32Array, cols: Int32Array, vals: Float64Array, m: number): void {
  for (let i = 0; i < m; i++) if (rowPtr[i + 1] - rowPtr[i] > 32) sortRowByColumn(cols, vals, rowPtr[i], rowPtr[i + 1]);
}
