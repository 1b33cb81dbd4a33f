/** Dense vector kernels on Float64Array used by the Krylov solvers (no allocation). */

export function dot(a: Float64Array, b: Float64Array): number {
  const n = a.length;
  let s = 0;
  for (let i = 0; i < n; i++) s += a[i] * b[i];
  return s;
}

export function norm2(a: Float64Array): number {
  return Math.sqrt(dot(a, a));
}

/** y += alpha x */
export function axpy(alpha: number, x: Float64Array, y: Float64Array): void {
  const n = y.length;
  for (let i = 0; i < n; i++) y[i] += alpha * x[i];
}

/** Whether every entry is a finite number. */
export function allFinite(a: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i])) return false;
  return true;
}
