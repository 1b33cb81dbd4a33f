/** splitInPlace (src/fem/discretizations/taylor-hood.ts): the blocks [[A, Bᵀ], [B, C]] written into the matrix's own
 *  arrays must hold exactly what a copy of the blocks holds: the reference here is a dense copy of K taken before the
 *  split (common practice, no source), compared entry by entry and in the stored order. */
import { describe, expect, it } from 'vitest';
import { splitInPlace } from '../../src/fem/discretizations/taylor-hood.ts';
import { csrFromTriplets } from '../../src/linalg/csr.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { mulberry32 } from '../../src/linalg/random.ts';

/** A random sparse n × n matrix with stored zeros, some in the trailing block. */
function randomMatrix(n: number, seed: number): Csr {
  const rand = mulberry32(seed);
  const ri: number[] = [], ci: number[] = [], v: number[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) if (i === j || rand() < 0.3) { ri.push(i); ci.push(j); v.push(rand() < 0.2 ? 0 : rand() - 0.5); }
  }
  return csrFromTriplets(n, n, ri, ci, v);
}

/** The stored entries of rows r0..r1 with columns in [c0, c1), as [row, column, value] in stored order. */
function entries(K: Csr, r0: number, r1: number, c0: number, c1: number): [number, number, number][] {
  const out: [number, number, number][] = [];
  for (let r = r0; r < r1; r++) {
    for (let k = K.rowPtr[r]; k < K.rowPtr[r + 1]; k++) {
      if (K.colIdx[k] >= c0 && K.colIdx[k] < c1) out.push([r - r0, K.colIdx[k] - c0, K.values[k]]);
    }
  }
  return out;
}

describe('splitInPlace', () => {
  it('holds the entries of the blocks as a copy would, in the same order, C copied out', () => {
    const n = 40, m = 27;
    const K = randomMatrix(n, 5);
    const wantA = entries(K, 0, m, 0, m), wantB = entries(K, m, n, 0, m), wantC = entries(K, m, n, m, n);
    const nonzeroC = wantC.filter((e) => e[2] !== 0).length;
    expect(wantC.length).toBeGreaterThan(nonzeroC); // the test matrix stores zeros in C
    const { A, B, cNonzeros, trailing } = splitInPlace(K, m, true);
    expect([A.nRows, A.nCols, B.nRows, B.nCols]).toEqual([m, m, n - m, m]);
    expect(entries(A, 0, m, 0, m)).toEqual(wantA);
    expect(entries(B, 0, n - m, 0, m)).toEqual(wantB);
    expect(entries(trailing!, 0, n - m, 0, n - m)).toEqual(wantC);
    expect(cNonzeros).toBe(nonzeroC);
    // Views of K's arrays, not copies.
    expect([A.values.buffer === K.values.buffer, B.colIdx.buffer === K.colIdx.buffer]).toEqual([true, true]);
    expect([A.rowPtr[m], B.rowPtr[n - m]]).toEqual([wantA.length, wantB.length]);
  });
});
