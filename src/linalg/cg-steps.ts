/** The two vector updates of preconditioned CG, fused so that each reads its vectors once: here in TypeScript,
 *  and as the WebAssembly kernels cgUpdate/cgDirection (sparse.wat) for vectors in the multigrid arena. */
import type { CgSteps, Csr } from './types.ts';

export const javascriptCgSteps: CgSteps = {
  /** x += α p, r −= α q; returns ||r||². */
  update(alpha, p, q, x, r) {
    const n = x.length;
    let rr = 0;
    for (let i = 0; i < n; i++) {
      x[i] += alpha * p[i];
      const ri = r[i] - alpha * q[i];
      r[i] = ri;
      rr += ri * ri;
    }
    return rr;
  },
  /** p = z + β p, q = w + β q with w = A z; returns p·q. */
  direction(beta, z, w, p, q) {
    const n = p.length;
    let pq = 0;
    for (let i = 0; i < n; i++) {
      const pi = z[i] + beta * p[i];
      const qi = w[i] + beta * q[i];
      p[i] = pi;
      q[i] = qi;
      pq += pi * qi;
    }
    return pq;
  },
};

/** q = A p; returns p·q (one sweep). */
export function spmvDot(A: Csr, p: Float64Array, q: Float64Array): number {
  const { nRows: n, rowPtr, colIdx, values } = A;
  let pq = 0;
  let k = rowPtr[0];
  for (let i = 0; i < n; i++) {
    const end = rowPtr[i + 1];
    let s = 0;
    for (; k < end; k++) s += values[k] * p[colIdx[k]];
    q[i] = s;
    pq += p[i] * s;
  }
  return pq;
}

/** r = b − A x, each row summed from b_i down (the order the residual kernel of sparse.wat transcribes); returns r·r. */
export function residualInto(A: Csr, b: Float64Array, x: Float64Array, r: Float64Array): number {
  const { nRows: n, rowPtr, colIdx, values } = A;
  let rr = 0;
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) s -= values[k] * x[colIdx[k]];
    r[i] = s;
    rr += s * s;
  }
  return rr;
}
