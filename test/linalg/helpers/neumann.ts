/** Pure Neumann five-point Laplacian on an m×m grid of nodes (sum of edge matrices [1 −1; −1 1]): symmetric positive
 *  semidefinite, rows sum to zero, null space = constants (common practice, no source). */
import { csrFromTriplets } from '../../../src/linalg/csr.ts';
import type { Csr } from '../../../src/linalg/types.ts';

export function neumannLaplacian(m: number): Csr {
  const I: number[] = [], J: number[] = [], V: number[] = [];
  const id = (i: number, j: number): number => j * m + i;
  for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) {
    for (const [di, dj] of [[1, 0], [0, 1]]) {
      if (i + di >= m || j + dj >= m) continue;
      const a = id(i, j), c = id(i + di, j + dj);
      I.push(a, c, a, c); J.push(a, c, c, a); V.push(1, 1, -1, -1);
    }
  }
  return csrFromTriplets(m * m, m * m, I, J, V);
}
