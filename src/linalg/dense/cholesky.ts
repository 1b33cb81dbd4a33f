/** Dense Cholesky A = L Lᵀ (row-major n×n) for the coarsest multigrid level. Golub & Van Loan (2013), Matrix
 *  Computations, 4th ed., Algorithm 4.2.1 (gaxpy Cholesky; numbering from memory). A pivot that vanishes relative to
 *  its original diagonal marks a null direction (a singular, semidefinite operator such as a pure Neumann Laplacian):
 *  that column is dropped and its solution component set to 0, so the solve acts as a symmetric pseudo-inverse. */
import { RungsInputError } from '../../errors.ts';

/** Pivot ≤ this fraction of the original diagonal counts as a null direction. */
export const NULL_PIVOT_FRACTION = 1e-10;

export interface DenseCholesky {
  n: number;
  /** Number of null directions dropped (0 for a positive definite matrix). */
  nullity: number;
  /** x = A⁺ b (exact A⁻¹ b when nullity = 0). x and b may be the same array. */
  solve(b: Float64Array, x: Float64Array): void;
}

/** Factorises a (row-major, n×n, symmetric; only the lower triangle is read). `a` is overwritten. */
export function denseCholesky(a: Float64Array, n: number): DenseCholesky {
  const isNull = new Uint8Array(n);
  let nullity = 0;
  for (let j = 0; j < n; j++) {
    const ajj0 = a[j * n + j];
    if (!(ajj0 >= 0) || !Number.isFinite(ajj0)) {
      throw new RungsInputError(`dense Cholesky: diagonal entry ${j} is ${ajj0}; a symmetric positive (semi)definite matrix is needed`,
        'linalg/dense/cholesky');
    }
    let d = ajj0;
    const rowJ = j * n;
    for (let k = 0; k < j; k++) d -= a[rowJ + k] * a[rowJ + k];
    if (!(d > NULL_PIVOT_FRACTION * ajj0)) {
      if (d < -1e-8 * ajj0) {
        throw new RungsInputError(`dense Cholesky: pivot ${j} is ${d}; the matrix is not positive semidefinite`, 'linalg/dense/cholesky');
      }
      isNull[j] = 1;
      nullity++;
      for (let i = j; i < n; i++) a[i * n + j] = 0;
      continue;
    }
    const ljj = Math.sqrt(d);
    a[rowJ + j] = ljj;
    const inv = 1 / ljj;
    for (let i = j + 1; i < n; i++) {
      const rowI = i * n;
      let s = a[rowI + j];
      for (let k = 0; k < j; k++) s -= a[rowI + k] * a[rowJ + k];
      a[rowI + j] = s * inv;
    }
  }
  return {
    n,
    nullity,
    solve(b: Float64Array, x: Float64Array): void {
      for (let i = 0; i < n; i++) {
        if (isNull[i]) { x[i] = 0; continue; }
        let s = b[i];
        const rowI = i * n;
        for (let k = 0; k < i; k++) s -= a[rowI + k] * x[k];
        x[i] = s / a[rowI + i];
      }
      for (let i = n - 1; i >= 0; i--) {
        if (isNull[i]) { x[i] = 0; continue; }
        let s = x[i];
        for (let k = i + 1; k < n; k++) s -= a[k * n + i] * x[k];
        x[i] = s / a[i * n + i];
      }
    },
  };
}
