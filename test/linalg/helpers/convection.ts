import { csrFromTriplets } from '../../../src/linalg/csr.ts';
import type { Csr } from '../../../src/linalg/types.ts';

/** Upwind convection–diffusion on an m×m grid: five-point diffusion plus first-order upwind differences of
 *  β·∇u scaled by h (a non-symmetric M-matrix; common practice, no source). */
export function convectionDiffusion(m: number, bx: number, by: number): Csr {
  const h = 1 / (m + 1);
  const I: number[] = [], J: number[] = [], V: number[] = [];
  for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) {
    const r = j * m + i;
    const push = (c: number, v: number): void => { I.push(r); J.push(c); V.push(v); };
    push(r, 4 + h * (Math.abs(bx) + Math.abs(by)));
    const west = -1 - (bx > 0 ? h * bx : 0), east = -1 + (bx < 0 ? h * bx : 0);
    const south = -1 - (by > 0 ? h * by : 0), north = -1 + (by < 0 ? h * by : 0);
    if (i > 0) push(r - 1, west);
    if (i < m - 1) push(r + 1, east);
    if (j > 0) push(r - m, south);
    if (j < m - 1) push(r + m, north);
  }
  return csrFromTriplets(m * m, m * m, I, J, V);
}
