/** Estimate of ρ(D_F⁻¹A_F) for the filtered matrix A_F of smoothed aggregation (strong off-diagonal entries of a
 *  symmetric A, diagonal dF) by a few Lanczos steps on the similar symmetric matrix D_F^{-1/2} A_F D_F^{-1/2}
 *  (Lanczos 1950; Saad 2003, Iterative Methods for Sparse Linear Systems, §6.6). The largest Ritz value approaches
 *  λ_max from below, so the estimate is inflated slightly and capped by Gershgorin's bound. */
import { mulberry32 } from '../random.ts';
import { spmv } from '../csr.ts';
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import type { Csr } from '../types.ts';

/** strong = null: the whole of A (then dF must be its diagonal), ρ(D⁻¹A). The products run as the kernel spmv (or
 *  filteredProduct with a strong mask) when every array lives in the allocator's WebAssembly memory, with the bits
 *  of the loops here. */
export function lanczosSpectralRadius(
  A: Csr, strong: Uint8Array | null, dF: Float64Array, steps: number, gershgorin: number, alloc: Allocator = heapAllocator,
): number {
  const n = A.nRows;
  const k = Math.min(steps, n);
  const { rowPtr, colIdx, values } = A;
  // B = D_F^{-1/2} A_F D_F^{-1/2} is applied as s ⊙ (A_F (s ⊙ v)), s = D_F^{-1/2}, with A_F read from A through the
  // strong mask: no copy of the matrix (on the finest level a copy would cost more than the four products).
  const s = alloc.f64(n, false);
  for (let i = 0; i < n; i++) s[i] = dF[i] > 0 ? 1 / Math.sqrt(dF[i]) : 0;
  const u = alloc.f64(n, false);
  const rand = mulberry32(0x5eed);
  let v = alloc.f64(n, false);
  let vPrev = alloc.f64(n); // zero: the first step subtracts β₋₁ v₋₁ = 0 · v₋₁
  const w = alloc.f64(n, false);
  const Au = alloc.f64(n, false);
  const wasm = alloc.wasm && alloc.wasm.owns(rowPtr, colIdx, values, u, Au, dF, ...(strong ? [strong] : [])) ? alloc.wasm.kernels : null;
  let nrm = 0;
  for (let i = 0; i < n; i++) { v[i] = rand() - 0.5; nrm += v[i] * v[i]; }
  nrm = Math.sqrt(nrm);
  for (let i = 0; i < n; i++) { v[i] /= nrm; u[i] = s[i] * v[i]; }
  const alpha = new Float64Array(k);
  const beta = new Float64Array(k);
  let m = 0;
  let betaPrev = 0;
  for (let j = 0; j < k; j++) {
    // w = B v − β_{j−1} v_{j−1}, α_j = w·v
    let a = 0;
    if (!strong || wasm) {
      // A u, or the filtered product dF ⊙ u + A_strong u as one kernel (the loop below, same operations)
      if (wasm && strong) wasm.filteredProduct(n, rowPtr.byteOffset, colIdx.byteOffset, values.byteOffset, strong.byteOffset, dF.byteOffset, u.byteOffset, Au.byteOffset);
      else if (wasm) wasm.spmv(n, rowPtr.byteOffset, colIdx.byteOffset, values.byteOffset, u.byteOffset, Au.byteOffset);
      else spmv(A, u, Au);
      for (let i = 0; i < n; i++) {
        const wi = s[i] * Au[i] - betaPrev * vPrev[i];
        w[i] = wi;
        a += wi * v[i];
      }
    } else for (let i = 0; i < n; i++) {
      let acc = dF[i] * u[i];
      for (let p = rowPtr[i]; p < rowPtr[i + 1]; p++) if (strong[p]) acc += values[p] * u[colIdx[p]];
      const wi = s[i] * acc - betaPrev * vPrev[i];
      w[i] = wi;
      a += wi * v[i];
    }
    alpha[j] = a;
    let bb = 0;
    for (let i = 0; i < n; i++) { const wi = w[i] - a * v[i]; w[i] = wi; bb += wi * wi; }
    m = j + 1;
    const b = Math.sqrt(bb);
    beta[j] = b;
    if (!(b > 1e-12 * Math.abs(a))) break;
    const t = vPrev; vPrev = v; v = t;
    const inv = 1 / b;
    for (let i = 0; i < n; i++) { const vi = w[i] * inv; v[i] = vi; u[i] = s[i] * vi; }
    betaPrev = b;
  }
  alloc.free(s); alloc.free(u); alloc.free(v); alloc.free(vPrev); alloc.free(w);
  alloc.free(Au);
  const lmax = largestTridiagonalEigenvalue(alpha, beta, m);
  return Math.min(gershgorin, 1.05 * lmax);
}

/** Largest eigenvalue of the symmetric tridiagonal matrix (diag a[0..m), off-diag b[0..m−1)) by Sturm-sequence
 *  bisection (Golub & Van Loan 2013, Matrix Computations, §8.4.1). */
function largestTridiagonalEigenvalue(a: Float64Array, b: Float64Array, m: number): number {
  let lo = Infinity, hi = -Infinity;
  for (let i = 0; i < m; i++) {
    const r = (i > 0 ? Math.abs(b[i - 1]) : 0) + (i < m - 1 ? Math.abs(b[i]) : 0);
    lo = Math.min(lo, a[i] - r);
    hi = Math.max(hi, a[i] + r);
  }
  // count(x) = number of eigenvalues < x.
  const count = (x: number): number => {
    let c = 0, d = 1;
    for (let i = 0; i < m; i++) {
      d = a[i] - x - (i > 0 ? (b[i - 1] * b[i - 1]) / d : 0);
      if (d === 0) d = -1e-300;
      if (d < 0) c++;
    }
    return c;
  };
  for (let it = 0; it < 100 && hi - lo > 1e-10 * Math.max(1, Math.abs(hi)); it++) {
    const mid = 0.5 * (lo + hi);
    if (count(mid) >= m) hi = mid; else lo = mid;
  }
  return hi;
}
