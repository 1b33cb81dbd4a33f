import type { Csr } from '../../linalg/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';

/** CSR pattern (values zero) coupling the reduced dofs: row r holds every reduced dof that shares a cell with r.
 *  reduced[g] is the row of global dof g, or −1 for an eliminated (Dirichlet) dof. Built once per space
 *  from a dof → cells adjacency with a marker array: O(nnz), no map per entry. */
export function buildSparsity(space: FunctionSpace, reduced: Int32Array, nReduced: number): Csr {
  const { cellDofs, nDofs } = space;
  const nLoc = space.element.nDofs;
  const nCells = space.mesh.nCells;
  const start = new Int32Array(nDofs + 1);
  for (let i = 0; i < cellDofs.length; i++) start[cellDofs[i] + 1]++;
  for (let g = 0; g < nDofs; g++) start[g + 1] += start[g];
  const fill = start.slice(0, nDofs);
  const adj = new Int32Array(cellDofs.length);
  for (let c = 0; c < nCells; c++) for (let i = 0; i < nLoc; i++) adj[fill[cellDofs[c * nLoc + i]]++] = c;

  const rowOf = new Int32Array(nReduced); // reduced row → global dof
  for (let g = 0; g < nDofs; g++) if (reduced[g] >= 0) rowOf[reduced[g]] = g;
  const mark = new Int32Array(nReduced).fill(-1);
  const rowPtr = new Int32Array(nReduced + 1);
  for (let r = 0; r < nReduced; r++) {
    const g = rowOf[r];
    let count = 0;
    for (let s = start[g]; s < start[g + 1]; s++) {
      const c = adj[s];
      for (let j = 0; j < nLoc; j++) {
        const col = reduced[cellDofs[c * nLoc + j]];
        if (col >= 0 && mark[col] !== r) { mark[col] = r; count++; }
      }
    }
    rowPtr[r + 1] = rowPtr[r] + count;
  }
  const colIdx = new Int32Array(rowPtr[nReduced]);
  mark.fill(-1);
  for (let r = 0; r < nReduced; r++) {
    const g = rowOf[r];
    let k = rowPtr[r];
    for (let s = start[g]; s < start[g + 1]; s++) {
      const c = adj[s];
      for (let j = 0; j < nLoc; j++) {
        const col = reduced[cellDofs[c * nLoc + j]];
        if (col >= 0 && mark[col] !== r) { mark[col] = r; colIdx[k++] = col; }
      }
    }
    sortRange(colIdx, rowPtr[r], rowPtr[r + 1]);
  }
  return { nRows: nReduced, nCols: nReduced, rowPtr, colIdx, values: new Float64Array(colIdx.length) };
}

/** Insertion sort of a short row (rows hold tens of entries). */
function sortRange(a: Int32Array, lo: number, hi: number): void {
  for (let i = lo + 1; i < hi; i++) {
    const v = a[i];
    let j = i - 1;
    while (j >= lo && a[j] > v) { a[j + 1] = a[j]; j--; }
    a[j + 1] = v;
  }
}

/** Position of column col in row r of a CSR pattern (binary search); −1 when absent. */
export function findEntry(A: Csr, r: number, col: number): number {
  let lo = A.rowPtr[r], hi = A.rowPtr[r + 1] - 1;
  const ci = A.colIdx;
  while (lo <= hi) {
    const mid = (lo + hi) >> 1;
    const v = ci[mid];
    if (v === col) return mid;
    if (v < col) lo = mid + 1; else hi = mid - 1;
  }
  return -1;
}
