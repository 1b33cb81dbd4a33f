import type { Csr } from '../../linalg/types.ts';

/** The blocks [[A, Bᵀ], [B, C]] of a matrix whose first m rows and columns are the first field: A (m×m) and B
 *  ((n−m)×m). C is checked to be empty (a saddle-point system without stabilisation). */
export function splitTwoFields(K: Csr, m: number): { A: Csr; B: Csr; cNonzeros: number } {
  const n = K.nRows;
  const { rowPtr, colIdx, values } = K;
  const take = (r0: number, r1: number, keep: (col: number) => boolean, shift: number): Csr => {
    const rows = r1 - r0;
    const rp = new Int32Array(rows + 1);
    for (let r = r0; r < r1; r++) {
      let k = 0;
      for (let s = rowPtr[r]; s < rowPtr[r + 1]; s++) if (keep(colIdx[s])) k++;
      rp[r - r0 + 1] = rp[r - r0] + k;
    }
    const ci = new Int32Array(rp[rows]);
    const va = new Float64Array(rp[rows]);
    for (let r = r0; r < r1; r++) {
      let k = rp[r - r0];
      for (let s = rowPtr[r]; s < rowPtr[r + 1]; s++) if (keep(colIdx[s])) { ci[k] = colIdx[s] - shift; va[k] = values[s]; k++; }
    }
    return { nRows: rows, nCols: m, rowPtr: rp, colIdx: ci, values: va };
  };
  const first = (c: number) => c < m;
  const A = take(0, m, first, 0);
  const B = take(m, n, first, 0);
  let cNonzeros = 0;
  for (let r = m; r < n; r++) for (let s = rowPtr[r]; s < rowPtr[r + 1]; s++) if (colIdx[s] >= m && values[s] !== 0) cNonzeros++;
  return { A, B, cNonzeros };
}
