/** Banded LU with partial pivoting, the scheme of LAPACK dgbtrf/dgbtrs (Anderson et al. 1999, LAPACK Users' Guide,
 *  3rd ed.; Golub & Van Loan 2013, Matrix Computations, §4.3): with kl sub- and ku super-diagonals, row interchanges
 *  widen U to kl + ku super-diagonals. Row i is stored in a window of columns [i − kl, i + kl + ku]. */
import { RungsInputError } from '../../errors.ts';
import type { Csr } from '../types.ts';

export interface BandedLu {
  n: number;
  kl: number;
  ku: number;
  /** x = A⁻¹ b (x and b distinct or equal). */
  solve(b: Float64Array, x: Float64Array): void;
}

/** Entries of band storage this solver accepts before telling the caller to use an iterative method. */
export const MAX_BAND_ENTRIES = 40_000_000;

/** A pivot with |u_kk| ≤ PIVOT_TOL · max|a_ij| means the matrix is singular to working precision. */
export const PIVOT_TOL = 1e-12;

/** Factorises A (rows already in the wanted order). Throws RungsInputError on a singular matrix. */
export function bandedLu(A: Csr): BandedLu {
  const where = 'linalg/direct';
  const n = A.nRows;
  const { rowPtr, colIdx, values } = A;
  let kl = 0, ku = 0, scale = 0;
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      if (values[k] === 0) continue;
      const d = colIdx[k] - i;
      if (d > ku) ku = d;
      if (-d > kl) kl = -d;
      scale = Math.max(scale, Math.abs(values[k]));
    }
  }
  const w = 2 * kl + ku + 1;
  if (n * w > MAX_BAND_ENTRIES) {
    throw new RungsInputError(
      `direct solver: n = ${n} with bandwidth ${kl}+${ku} needs ${n * w} band entries (limit ${MAX_BAND_ENTRIES}); ` +
        "use method 'cg' (symmetric) or 'gmres'", where);
  }
  const band = new Float64Array(n * w);
  for (let i = 0; i < n; i++) {
    const base = i * w + kl - i;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) if (values[k] !== 0) band[base + colIdx[k]] += values[k];
  }
  const mult = new Float64Array(n * Math.max(kl, 1));
  const piv = new Int32Array(n);
  const singular = (k: number, p: number): RungsInputError => new RungsInputError(
    `direct solver: the matrix is singular (pivot ${p.toExponential(2)} in column ${k} against entries up to ` +
      `${scale.toExponential(2)}); a pure Neumann problem needs a constraint fixing the constant (pin one value or impose a zero mean)`,
    where);
  if (scale === 0 && n > 0) throw singular(0, 0);

  for (let k = 0; k < n; k++) {
    const last = Math.min(n - 1, k + kl);
    let p = k, best = Math.abs(band[k * w + kl]);
    for (let q = k + 1; q <= last; q++) {
      const v = Math.abs(band[q * w + kl + k - q]);
      if (v > best) { best = v; p = q; }
    }
    if (!(best > PIVOT_TOL * scale)) throw singular(k, best);
    piv[k] = p;
    const jEnd = Math.min(n - 1, k + kl + ku);
    if (p !== k) {
      const rk = k * w + kl - k, rp = p * w + kl - p;
      for (let j = k; j <= jEnd; j++) { const t = band[rk + j]; band[rk + j] = band[rp + j]; band[rp + j] = t; }
    }
    const rk = k * w + kl - k;
    const inv = 1 / band[rk + k];
    for (let q = k + 1; q <= last; q++) {
      const rq = q * w + kl - q;
      const l = band[rq + k] * inv;
      mult[k * kl + (q - k - 1)] = l;
      if (l === 0) continue;
      band[rq + k] = 0;
      for (let j = k + 1; j <= jEnd; j++) band[rq + j] -= l * band[rk + j];
    }
  }
  return {
    n, kl, ku,
    solve(b: Float64Array, x: Float64Array): void {
      if (x !== b) x.set(b);
      for (let k = 0; k < n; k++) {
        const p = piv[k];
        if (p !== k) { const t = x[k]; x[k] = x[p]; x[p] = t; }
        const xk = x[k];
        const last = Math.min(n - 1, k + kl);
        for (let q = k + 1; q <= last; q++) x[q] -= mult[k * kl + (q - k - 1)] * xk;
      }
      for (let i = n - 1; i >= 0; i--) {
        const ri = i * w + kl - i;
        const jEnd = Math.min(n - 1, i + kl + ku);
        let s = x[i];
        for (let j = i + 1; j <= jEnd; j++) s -= band[ri + j] * x[j];
        x[i] = s / band[ri + i];
      }
    },
  };
}
