/** Seeded random test matrices (mulberry32) as dense row arrays, for comparison with ml-matrix. */
import { mulberry32 } from '../../../src/linalg/random.ts';

/** Sparse random B (about `density` of its entries non-zero), then A = B Bᵀ + n I: symmetric positive definite. */
export function randomSpd(n: number, density: number, seed: number): number[][] {
  const rand = mulberry32(seed);
  const B: number[][] = Array.from({ length: n }, () => new Array(n).fill(0));
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (rand() < density) B[i][j] = rand() * 2 - 1;
  const A: number[][] = Array.from({ length: n }, () => new Array(n).fill(0));
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += B[i][k] * B[j][k];
    A[i][j] = s + (i === j ? n : 0);
  }
  return A;
}

/** Non-symmetric, strictly diagonally dominant by rows: random off-diagonals, |a_ii| = 1.5 Σ_{j≠i} |a_ij| + 1. */
export function randomDiagonallyDominant(n: number, density: number, seed: number): number[][] {
  const rand = mulberry32(seed);
  const A: number[][] = Array.from({ length: n }, () => new Array(n).fill(0));
  for (let i = 0; i < n; i++) {
    let off = 0;
    for (let j = 0; j < n; j++) {
      if (j !== i && rand() < density) { A[i][j] = rand() * 2 - 1; off += Math.abs(A[i][j]); }
    }
    A[i][i] = (rand() < 0.5 ? -1 : 1) * (1.5 * off + 1);
  }
  return A;
}

export function randomVector(n: number, seed: number): Float64Array {
  const rand = mulberry32(seed);
  const v = new Float64Array(n);
  for (let i = 0; i < n; i++) v[i] = rand() * 2 - 1;
  return v;
}

/** ||a − b|| / ||b||. */
export function relativeError(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0, s = 0;
  for (let i = 0; i < b.length; i++) { d += (a[i] - b[i]) ** 2; s += b[i] ** 2; }
  return Math.sqrt(d / s);
}
