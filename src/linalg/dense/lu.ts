/** Dense LU with partial (row) pivoting, P A = L U, row-major n×n; for the coarsest level of a non-symmetric
 *  multigrid hierarchy. Golub & Van Loan (2013), Matrix Computations, 4th ed., §3.4 (Gaussian elimination with
 *  partial pivoting). */
import { RungsInputError } from '../../errors.ts';

export interface DenseLu {
  n: number;
  /** x = A⁻¹ b; x and b may be the same array. */
  solve(b: Float64Array, x: Float64Array): void;
}

/** Factorises a in place; throws a RungsInputError naming the column when a pivot vanishes (singular matrix). */
export function denseLu(a: Float64Array, n: number, pivotTol = 1e-13): DenseLu {
  let scale = 0;
  for (let i = 0; i < n * n; i++) scale = Math.max(scale, Math.abs(a[i]));
  const perm = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    let p = k, best = Math.abs(a[k * n + k]);
    for (let i = k + 1; i < n; i++) { const v = Math.abs(a[i * n + k]); if (v > best) { best = v; p = i; } }
    perm[k] = p;
    if (!(best > pivotTol * scale)) {
      throw new RungsInputError(
        `dense LU: no usable pivot in column ${k} (largest |entry| ${best.toExponential(2)}); the matrix is singular ` +
          '(a pure Neumann problem needs a constraint fixing the constant)',
        'linalg/dense/lu');
    }
    if (p !== k) {
      for (let j = 0; j < n; j++) { const t = a[k * n + j]; a[k * n + j] = a[p * n + j]; a[p * n + j] = t; }
    }
    const inv = 1 / a[k * n + k];
    for (let i = k + 1; i < n; i++) {
      const l = a[i * n + k] * inv;
      if (l === 0) continue;
      a[i * n + k] = l;
      for (let j = k + 1; j < n; j++) a[i * n + j] -= l * a[k * n + j];
    }
  }
  return {
    n,
    solve(b: Float64Array, x: Float64Array): void {
      if (x !== b) x.set(b);
      // Whole rows (multipliers included) were swapped, so apply every interchange first, then L y = P b.
      for (let k = 0; k < n; k++) {
        const p = perm[k];
        if (p !== k) { const t = x[k]; x[k] = x[p]; x[p] = t; }
      }
      for (let i = 1; i < n; i++) {
        let s = x[i];
        for (let k = 0; k < i; k++) s -= a[i * n + k] * x[k];
        x[i] = s;
      }
      for (let i = n - 1; i >= 0; i--) {
        let s = x[i];
        for (let j = i + 1; j < n; j++) s -= a[i * n + j] * x[j];
        x[i] = s / a[i * n + i];
      }
    },
  };
}
