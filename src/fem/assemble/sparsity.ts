import type { Csr } from '../../linalg/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';

/** CSR pattern (values zero) coupling the reduced dofs: row r holds every reduced dof that shares a cell with r.
 *  reduced[g] is the row of global dof g, or −1 for an eliminated (Dirichlet) dof. Built once per space
 *  from a dof → cells adjacency with a marker array: O(nnz), no map per entry. */
export function buildSparsity(space: FunctionSpace, reduced: Int32Array, nReduced: number, memory: PatternMemory = 'private'): Csr {
  return patternOfCells(space.nDofs, space.mesh.nCells, space.element.nDofs, space.cellDofs, reduced, nReduced, ONE_PASS_MAX_ENTRIES, memory);
}

/** Where a pattern's arrays live: ordinary memory, or shared memory (SharedArrayBuffer) that the worker threads of
 *  the cell team can fill (src/fem/team/). */
export type PatternMemory = 'private' | 'shared';

/** Larger bounds than this many entries take two passes over the rows (count, then fill) instead of one pass into a
 *  buffer of the bound's size. */
const ONE_PASS_MAX_ENTRIES = 2 ** 28;

/**
 * CSR pattern (values zero) of the unknowns coupled through cells: row r holds, sorted, every unknown that shares a
 * cell with the unknown of row r. cellDofs lists nLocal unknowns per cell; reduced (optional) renumbers them, −1
 * dropping an unknown from rows and columns (null: every unknown is its own row). O(nnz) with a dof → cells
 * adjacency and a marker array, no map per entry.
 *
 * Memory: on these machines memory touched for the first time costs up to 3 ms per MB (DEVELOPERS.md), so the
 * buffers are laid out to be touched once. The column indices go in one pass into a buffer sized by the bound
 * nCells · nLocal² (one entry per pair of a cell's unknowns); pages never written are never touched and cost address
 * space only, as the multigrid arena's reservation does (src/linalg/kernels). The values then take the pages the
 * adjacency used (one buffer, the larger of the two sizes; zeroed). colIdx and values may therefore be views of
 * longer buffers; nothing in rungs reads a CSR array's buffer.
 */
export function patternOfCells(
  nDofs: number, nCells: number, nLoc: number, cellDofs: Int32Array, reduced: Int32Array | null, nReduced: number,
  onePassMaxEntries = ONE_PASS_MAX_ENTRIES, memory: PatternMemory = 'private',
): Csr {
  const bytes = (n: number): ArrayBuffer | SharedArrayBuffer => (memory === 'shared' ? new SharedArrayBuffer(n) : new ArrayBuffer(n));
  const start = new Int32Array(nDofs + 1);
  for (let i = 0; i < nCells * nLoc; i++) start[cellDofs[i] + 1]++;
  for (let g = 0; g < nDofs; g++) start[g + 1] += start[g];
  const fill = start.slice(0, nDofs);
  const bound = nCells * nLoc * nLoc;
  const onePass = bound <= onePassMaxEntries;
  // The adjacency and, later, the values share one buffer (see above).
  const shared = bytes(Math.max(4 * nCells * nLoc, onePass ? 8 * bound : 0));
  const adj = new Int32Array(shared, 0, nCells * nLoc);
  for (let c = 0; c < nCells; c++) for (let i = 0; i < nLoc; i++) adj[fill[cellDofs[c * nLoc + i]]++] = c;

  const rowOf = new Int32Array(nReduced); // row → global dof
  if (reduced) { for (let g = 0; g < nDofs; g++) if (reduced[g] >= 0) rowOf[reduced[g]] = g; } else for (let g = 0; g < nDofs; g++) rowOf[g] = g;
  const mark = new Int32Array(nReduced).fill(-1);
  const rowPtr = new Int32Array(bytes(4 * (nReduced + 1)));
  let colIdx: Int32Array;
  if (onePass) {
    const cols = new Int32Array(bytes(4 * bound));
    let k = 0;
    for (let r = 0; r < nReduced; r++) {
      const g = rowOf[r];
      const k0 = k;
      for (let s = start[g]; s < start[g + 1]; s++) {
        const o = adj[s] * nLoc;
        for (let j = 0; j < nLoc; j++) {
          const d = cellDofs[o + j];
          const col = reduced ? reduced[d] : d;
          if (col >= 0 && mark[col] !== r) { mark[col] = r; cols[k++] = col; }
        }
      }
      sortRange(cols, k0, k);
      rowPtr[r + 1] = k;
    }
    colIdx = cols.subarray(0, k);
  } else {
    for (let r = 0; r < nReduced; r++) {
      const g = rowOf[r];
      let count = 0;
      for (let s = start[g]; s < start[g + 1]; s++) {
        const o = adj[s] * nLoc;
        for (let j = 0; j < nLoc; j++) {
          const d = cellDofs[o + j];
          const col = reduced ? reduced[d] : d;
          if (col >= 0 && mark[col] !== r) { mark[col] = r; count++; }
        }
      }
      rowPtr[r + 1] = rowPtr[r] + count;
    }
    colIdx = new Int32Array(bytes(4 * rowPtr[nReduced]));
    mark.fill(-1);
    for (let r = 0; r < nReduced; r++) {
      const g = rowOf[r];
      let k = rowPtr[r];
      for (let s = start[g]; s < start[g + 1]; s++) {
        const o = adj[s] * nLoc;
        for (let j = 0; j < nLoc; j++) {
          const d = cellDofs[o + j];
          const col = reduced ? reduced[d] : d;
          if (col >= 0 && mark[col] !== r) { mark[col] = r; colIdx[k++] = col; }
        }
      }
      sortRange(colIdx, rowPtr[r], rowPtr[r + 1]);
    }
  }
  const nnz = rowPtr[nReduced];
  // Only the adjacency's pages hold anything: zero those; the rest of the buffer is still untouched (zero).
  const values = shared.byteLength >= 8 * nnz ? new Float64Array(shared, 0, nnz).fill(0, 0, Math.ceil((nCells * nLoc) / 2)) : new Float64Array(bytes(8 * nnz));
  return { nRows: nReduced, nCols: nReduced, rowPtr, colIdx, values };
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
