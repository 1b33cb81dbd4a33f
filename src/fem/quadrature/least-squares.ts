/**
 * Least-squares solution of the small dense system J x ≈ r (m >= n rows, row-major J, both overwritten)
 * by Householder QR (Golub & Van Loan 2013, Matrix Computations, §5.2–5.3). Returns x, or null when a
 * column is numerically dependent (|R_kk| below 1e-13 of the largest column norm).
 */
export function householderLeastSquares(J: Float64Array, r: Float64Array, m: number, n: number): Float64Array | null {
  let scale = 0;
  for (let k = 0; k < n; k++) {
    let norm = 0;
    for (let i = 0; i < m; i++) norm += J[i * n + k]! ** 2;
    scale = Math.max(scale, Math.sqrt(norm));
  }
  const diag = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let norm = 0;
    for (let i = k; i < m; i++) norm += J[i * n + k]! ** 2;
    norm = Math.sqrt(norm);
    if (norm <= 1e-13 * scale) return null;
    const alpha = J[k * n + k]! > 0 ? -norm : norm;
    // v = x - alpha e1 stored in column k below the diagonal (v_k = x_k - alpha)
    J[k * n + k] = J[k * n + k]! - alpha;
    let vv = 0;
    for (let i = k; i < m; i++) vv += J[i * n + k]! ** 2;
    for (let c = k + 1; c < n; c++) {
      let dot = 0;
      for (let i = k; i < m; i++) dot += J[i * n + k]! * J[i * n + c]!;
      const f = (2 * dot) / vv;
      for (let i = k; i < m; i++) J[i * n + c] = J[i * n + c]! - f * J[i * n + k]!;
    }
    let dot = 0;
    for (let i = k; i < m; i++) dot += J[i * n + k]! * r[i]!;
    const f = (2 * dot) / vv;
    for (let i = k; i < m; i++) r[i] = r[i]! - f * J[i * n + k]!;
    diag[k] = alpha;
  }
  const x = new Float64Array(n);
  for (let k = n - 1; k >= 0; k--) {
    let s = r[k]!;
    for (let c = k + 1; c < n; c++) s -= J[k * n + c]! * x[c]!;
    x[k] = s / diag[k]!;
  }
  return x;
}
