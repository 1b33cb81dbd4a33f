import type { Csr } from '../../linalg/types.ts';

/** CSR pattern (values zero) of every unknown coupled to every other unknown of a cell, from the cells' lists of
 *  global unknowns (nCells · nLocal). Built with an unknown → cells adjacency and a marker array: O(nnz), no map
 *  per entry; the same construction as src/fem/assemble/sparsity.ts for one Lagrange space. */
export function sparsityOfCells(nDofs: number, nCells: number, nLocal: number, cellDofs: Int32Array): Csr {
  const start = new Int32Array(nDofs + 1);
  for (let i = 0; i < nCells * nLocal; i++) start[cellDofs[i] + 1]++;
  for (let g = 0; g < nDofs; g++) start[g + 1] += start[g];
  const fill = start.slice(0, nDofs);
  const adj = new Int32Array(nCells * nLocal);
  for (let c = 0; c < nCells; c++) for (let i = 0; i < nLocal; i++) adj[fill[cellDofs[c * nLocal + i]]++] = c;
  const mark = new Int32Array(nDofs).fill(-1);
  const rowPtr = new Int32Array(nDofs + 1);
  for (let r = 0; r < nDofs; r++) {
    let count = 0;
    for (let s = start[r]; s < start[r + 1]; s++) {
      const o = adj[s] * nLocal;
      for (let j = 0; j < nLocal; j++) { const col = cellDofs[o + j]; if (mark[col] !== r) { mark[col] = r; count++; } }
    }
    rowPtr[r + 1] = rowPtr[r] + count;
  }
  const colIdx = new Int32Array(rowPtr[nDofs]);
  mark.fill(-1);
  for (let r = 0; r < nDofs; r++) {
    let k = rowPtr[r];
    for (let s = start[r]; s < start[r + 1]; s++) {
      const o = adj[s] * nLocal;
      for (let j = 0; j < nLocal; j++) { const col = cellDofs[o + j]; if (mark[col] !== r) { mark[col] = r; colIdx[k++] = col; } }
    }
    colIdx.subarray(rowPtr[r], rowPtr[r + 1]).sort();
  }
  return { nRows: nDofs, nCols: nDofs, rowPtr, colIdx, values: new Float64Array(colIdx.length) };
}
