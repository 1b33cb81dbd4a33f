/** Galerkin coarse operator A_c = Pᵀ A P (restriction R = Pᵀ), formed as R (A P) with sparse products;
 *  Vaněk, Mandel & Brezina (1996), Computing 56, 179–196, §2 (variational coarse spaces). The intermediate
 *  products are given back to the allocator as soon as they are used. */
import { sortRowByColumn } from '../csr.ts';
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import type { Csr } from '../types.ts';
import { productBuffers, productByKernel, productResult, spgemm } from '../spgemm.ts';

const freeCsr = (M: Csr, alloc: Allocator): void => { alloc.free(M.rowPtr); alloc.free(M.colIdx); alloc.free(M.values); };

/** R must be Pᵀ (the caller keeps it as the restriction of the cycle). */
export function galerkinProduct(A: Csr, P: Csr, R: Csr, symmetric: boolean, alloc: Allocator = heapAllocator): Csr {
  const AP = spgemm(A, P, alloc);
  if (!symmetric) {
    const C = spgemm(R, AP, alloc);
    freeCsr(AP, alloc);
    return C;
  }
  const U = upperProduct(R, AP, alloc);
  freeCsr(AP, alloc);
  const C = mirrorUpper(U, alloc);
  freeCsr(U, alloc);
  return C;
}

/** Upper triangle (J ≥ I) of C = R M, which is symmetric when A is: each row of M is read from its end down to the
 *  first column below I, so about half of the products are skipped. Rows come out sorted. In WebAssembly memory
 *  the same loop runs as the kernel upperProduct (sparse.wat). */
function upperProduct(R: Csr, M: Csr, alloc: Allocator): Csr {
  const m = R.nRows, nc = M.nCols;
  const rPtr = R.rowPtr, rCol = R.colIdx, rVal = R.values;
  const mPtr = M.rowPtr, mCol = M.colIdx, mVal = M.values;
  const out = productBuffers(R, M, alloc);
  const byKernel = productByKernel('upperProduct', R, M, out, alloc);
  if (byKernel) return byKernel;
  const { rowPtr, cols, vals } = out;
  const marker = new Int32Array(nc).fill(-1);
  let nnz = 0;
  for (let I = 0; I < m; I++) {
    const rowStart = nnz;
    for (let k = rPtr[I]; k < rPtr[I + 1]; k++) {
      const a = rVal[k];
      const i = rCol[k];
      const lo = mPtr[i];
      for (let q = mPtr[i + 1] - 1; q >= lo; q--) {
        const J = mCol[q];
        if (J < I) break;
        const pos = marker[J];
        if (pos < rowStart) { marker[J] = nnz; cols[nnz] = J; vals[nnz] = a * mVal[q]; nnz++; }
        else vals[pos] += a * mVal[q];
      }
    }
    sortRowByColumn(cols, vals, rowStart, nnz);
    rowPtr[I + 1] = nnz;
  }
  return productResult(R, M, out, nnz, alloc);
}

/** Full symmetric matrix from its upper triangle U: row I = (strict upper part of U)ᵀ row I, then U row I.
 *  The transposed entries arrive in increasing source row, so every row is sorted without a sort. */
function mirrorUpper(U: Csr, alloc: Allocator): Csr {
  const n = U.nRows;
  const { rowPtr, colIdx, values } = U;
  const count = alloc.i32(n + 1);
  for (let I = 0; I < n; I++) {
    count[I + 1] += rowPtr[I + 1] - rowPtr[I];
    for (let k = rowPtr[I]; k < rowPtr[I + 1]; k++) if (colIdx[k] !== I) count[colIdx[k] + 1]++;
  }
  for (let I = 0; I < n; I++) count[I + 1] += count[I];
  const fill = count.slice(0, n);
  const cols = alloc.i32(count[n], false);
  const vals = alloc.f64(count[n], false);
  // Lower entries first: for each source row I in order, its strict upper entries (I, J) become (J, I).
  for (let I = 0; I < n; I++) {
    for (let k = rowPtr[I]; k < rowPtr[I + 1]; k++) {
      const J = colIdx[k];
      if (J !== I) { const p = fill[J]++; cols[p] = I; vals[p] = values[k]; }
    }
    // Row I's own lower entries are complete now (they came from rows < I); append its upper part.
    for (let k = rowPtr[I]; k < rowPtr[I + 1]; k++) { const p = fill[I]++; cols[p] = colIdx[k]; vals[p] = values[k]; }
  }
  return { nRows: n, nCols: n, rowPtr: count, colIdx: cols, values: vals };
}
