/** The assembled saddle-point operator (src/linalg/saddle/block-operator.ts) against the block-by-block loop it
 *  replaced (y_u = A x_u + Bᵀ x_p summed in one running sum, A's row then Bᵀ's; y_p = B x_u − C x_p), bit for bit:
 *  the reference here is that loop written out plainly, with Bᵀ formed by a dense transpose. The operator leaves out
 *  exact zeros, so the blocks below store some on purpose. */
import { describe, expect, it } from 'vitest';
import { saddlePointOperator } from '../../src/linalg/saddle/block-operator.ts';
import { csrFromTriplets } from '../../src/linalg/csr.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { taylorHoodGrid } from './helpers/taylor-hood-grid.ts';
import { randomVector } from './helpers/random-matrices.ts';

/** The blocks' own entries plus stored exact zeros at every (i, (i·7) mod cols) not yet in the pattern. */
function withZeros(M: Csr): Csr {
  const ri: number[] = [], ci: number[] = [], v: number[] = [];
  for (let i = 0; i < M.nRows; i++) {
    for (let k = M.rowPtr[i]; k < M.rowPtr[i + 1]; k++) { ri.push(i); ci.push(M.colIdx[k]); v.push(M.values[k]); }
    ri.push(i); ci.push((i * 7) % M.nCols); v.push(0);
  }
  return csrFromTriplets(M.nRows, M.nCols, ri, ci, v);
}

/** y = [[A, Bᵀ], [B, −C]] x as the former loop did it. */
function reference(A: Csr, B: Csr, C: Csr | undefined, x: Float64Array): Float64Array {
  const nu = A.nRows, np = B.nRows;
  const Bt: { col: number; v: number }[][] = Array.from({ length: nu }, () => []);
  for (let i = 0; i < np; i++) for (let k = B.rowPtr[i]; k < B.rowPtr[i + 1]; k++) Bt[B.colIdx[k]].push({ col: i, v: B.values[k] });
  const y = new Float64Array(nu + np);
  for (let i = 0; i < nu; i++) {
    let s = 0;
    for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) s += A.values[k] * x[A.colIdx[k]];
    for (const e of Bt[i]) s += e.v * x[nu + e.col];
    y[i] = s;
  }
  for (let i = 0; i < np; i++) {
    let s = 0;
    for (let k = B.rowPtr[i]; k < B.rowPtr[i + 1]; k++) s += B.values[k] * x[B.colIdx[k]];
    if (C) for (let k = C.rowPtr[i]; k < C.rowPtr[i + 1]; k++) s -= C.values[k] * x[nu + C.colIdx[k]];
    y[nu + i] = s;
  }
  return y;
}

const mismatches = (a: Float64Array, b: Float64Array): number => {
  let bad = 0;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) bad++;
  return bad;
};

describe('saddlePointOperator', () => {
  const { A: A0, B: B0, M } = taylorHoodGrid(8);
  const A = withZeros(A0), B = withZeros(B0), C = withZeros(M);
  for (const kernels of ['wasm', 'javascript'] as const) {
    for (const withC of [false, true]) {
      it(`gives the bits of the block-by-block loop (${kernels}, ${withC ? 'with' : 'without'} a pressure block)`, () => {
        const K = saddlePointOperator(A, B, withC ? C : undefined, { vectors: 2, kernels });
        try {
          expect(K.kernels).toBe(kernels);
          // Fewer stored entries than the blocks: the exact zeros are gone.
          const stored = A.rowPtr[A.nRows] + 2 * B.rowPtr[B.nRows] + (withC ? C.rowPtr[C.nRows] : 0);
          expect(K.matrix.rowPtr[K.n]).toBeLessThan(stored);
          const x = randomVector(K.n, 11);
          const want = reference(A, B, withC ? C : undefined, x);
          // The solver's vectors (in the arena for wasm) and plain heap vectors (staging copies).
          const xs = K.vector(), ys = K.vector();
          xs.set(x);
          K.apply(xs, ys);
          const yHeap = new Float64Array(K.n);
          K.apply(x, yHeap);
          expect([mismatches(ys, want), mismatches(yHeap, want)]).toEqual([0, 0]);
        } finally {
          K.dispose();
        }
      });
    }
  }
});
