/** Test and benchmark matrices on uniform square grids of m×m interior nodes (Dirichlet nodes eliminated). */
import type { Csr } from '../../../src/linalg/types.ts';

/** Five-point Laplacian (4 on the diagonal, −1 to the four neighbours), built straight into CSR with sorted rows.
 *  It equals the P1 stiffness matrix on right-diagonal triangles of the grid (common practice, no source). */
export function fivePointLaplacian(m: number): Csr {
  const n = m * m;
  const rowPtr = new Int32Array(n + 1);
  const colIdx = new Int32Array(5 * n);
  const values = new Float64Array(5 * n);
  let k = 0;
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < m; i++) {
      const row = j * m + i;
      if (j > 0) { colIdx[k] = row - m; values[k++] = -1; }
      if (i > 0) { colIdx[k] = row - 1; values[k++] = -1; }
      colIdx[k] = row; values[k++] = 4;
      if (i < m - 1) { colIdx[k] = row + 1; values[k++] = -1; }
      if (j < m - 1) { colIdx[k] = row + m; values[k++] = -1; }
      rowPtr[row + 1] = k;
    }
  }
  return { nRows: n, nCols: n, rowPtr, colIdx: colIdx.slice(0, k), values: values.slice(0, k) };
}
