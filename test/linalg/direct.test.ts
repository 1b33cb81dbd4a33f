import { CholeskyDecomposition, LuDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { csrFromDense, csrFromTriplets } from '../../src/linalg/csr.ts';
import { denseCholesky } from '../../src/linalg/dense/cholesky.ts';
import { denseLu } from '../../src/linalg/dense/lu.ts';
import { directFactor, directSolve } from '../../src/linalg/direct/direct-solve.ts';
import { reverseCuthillMcKee } from '../../src/linalg/direct/rcm.ts';
import { mulberry32 } from '../../src/linalg/random.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { neumannLaplacian } from './helpers/neumann.ts';
import { fivePointLaplacian } from './helpers/poisson.ts';
import { randomDiagonallyDominant, randomSpd, randomVector, relativeError } from './helpers/random-matrices.ts';

// References: ml-matrix LuDecomposition / CholeskyDecomposition (general-purpose dense library).
const luSolve = (D: number[][], b: Float64Array): number[] =>
  new LuDecomposition(new Matrix(D)).solve(Matrix.columnVector(Array.from(b))).getColumn(0);

function bandwidth(A: Csr, order?: Int32Array): number {
  const pos = new Int32Array(A.nRows);
  for (let i = 0; i < A.nRows; i++) pos[order ? order[i] : i] = i;
  let bw = 0;
  for (let i = 0; i < A.nRows; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) bw = Math.max(bw, Math.abs(pos[i] - pos[A.colIdx[k]]));
  return bw;
}

describe('direct solver: RCM + banded LU with partial pivoting (reference: ml-matrix LU)', () => {
  it('agrees with ml-matrix on random non-symmetric systems, including ones that need pivoting', () => {
    for (const [n, seed] of [[40, 1], [90, 2]] as const) {
      const D = randomDiagonallyDominant(n, 0.08, seed);
      // Swap two rows so that a zero meets the diagonal and partial pivoting is exercised.
      [D[0], D[1]] = [D[1], D[0]];
      const b = randomVector(n, seed + 10);
      const x = new Float64Array(n);
      const stats = directSolve(csrFromDense(D), b, x);
      expect(stats.stoppedBy).toBe('direct');
      expect(relativeError(x, luSolve(D, b))).toBeLessThan(1e-12);
    }
  });

  it('agrees with ml-matrix on an SPD system and on the 2D Poisson matrix', () => {
    const D = randomSpd(60, 0.05, 3);
    const b = randomVector(60, 4);
    const x = new Float64Array(60);
    directSolve(csrFromDense(D), b, x);
    expect(relativeError(x, luSolve(D, b))).toBeLessThan(1e-12);
    const P = fivePointLaplacian(12);
    const Pd = new Matrix(144, 144);
    for (let i = 0; i < 144; i++) for (let k = P.rowPtr[i]; k < P.rowPtr[i + 1]; k++) Pd.set(i, P.colIdx[k], P.values[k]);
    const bp = randomVector(144, 5);
    const xp = new Float64Array(144);
    directSolve(P, bp, xp);
    expect(relativeError(xp, luSolve(Pd.to2DArray(), bp))).toBeLessThan(1e-12);
  });

  it('reverse Cuthill–McKee brings a scrambled grid Laplacian back to a band of about one grid line', () => {
    // The natural ordering of an m×m grid has bandwidth m (common practice, no source).
    const m = 20, n = m * m;
    const A = fivePointLaplacian(m);
    const rand = mulberry32(6);
    const perm = Array.from({ length: n }, (_, i) => i);
    for (let i = n - 1; i > 0; i--) { const j = Math.floor(rand() * (i + 1)); [perm[i], perm[j]] = [perm[j], perm[i]]; }
    const I: number[] = [], J: number[] = [], V: number[] = [];
    for (let i = 0; i < n; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) { I.push(perm[i]); J.push(perm[A.colIdx[k]]); V.push(A.values[k]); }
    const S = csrFromTriplets(n, n, I, J, V);
    expect(bandwidth(S)).toBeGreaterThan(5 * m);
    const order = reverseCuthillMcKee(S);
    expect(new Set(order).size).toBe(n);
    expect(bandwidth(S, order)).toBeLessThanOrEqual(m + 2);
    const factor = directFactor(S);
    expect(factor.bandwidth[0]).toBeLessThanOrEqual(m + 2);
  });

  it('a singular matrix (pure Neumann Laplacian, rows summing to zero) throws a clear RungsInputError', () => {
    const A = neumannLaplacian(8);
    const b = randomVector(64, 7);
    expect(() => directSolve(A, b, new Float64Array(64))).toThrow(RungsInputError);
    expect(() => directSolve(A, b, new Float64Array(64))).toThrow(/singular.*Neumann/);
    expect(() => directSolve(csrFromDense([[1, 2], [2, 4]]), new Float64Array([1, 2]), new Float64Array(2))).toThrow(/singular/);
  });

  it('rejects NaN entries and wrong sizes', () => {
    expect(() => directSolve(csrFromDense([[1, NaN], [0, 1]]), new Float64Array(2), new Float64Array(2))).toThrow(/finite/);
    expect(() => directSolve(csrFromDense([[1, 0], [0, 1]]), new Float64Array(3), new Float64Array(2))).toThrow(/length 3/);
  });
});

describe('dense factorisations of the coarsest multigrid level (reference: ml-matrix)', () => {
  it('dense LU with partial pivoting matches ml-matrix LuDecomposition', () => {
    const D = randomDiagonallyDominant(30, 0.3, 8);
    [D[3], D[17]] = [D[17], D[3]];
    const b = randomVector(30, 9);
    const x = new Float64Array(30);
    denseLu(Float64Array.from(D.flat()), 30).solve(b, x);
    expect(relativeError(x, luSolve(D, b))).toBeLessThan(1e-12);
    expect(() => denseLu(new Float64Array([1, 2, 2, 4]), 2)).toThrow(/singular/);
  });

  it('dense Cholesky matches ml-matrix CholeskyDecomposition; a semidefinite matrix gets a pseudo-inverse', () => {
    const D = randomSpd(25, 0.2, 10);
    const b = randomVector(25, 11);
    const x = new Float64Array(25);
    const f = denseCholesky(Float64Array.from(D.flat()), 25);
    expect(f.nullity).toBe(0);
    f.solve(b, x);
    const ref = new CholeskyDecomposition(new Matrix(D)).solve(Matrix.columnVector(Array.from(b))).getColumn(0);
    expect(relativeError(x, ref)).toBeLessThan(1e-12);
    // Neumann Laplacian, consistent right-hand side (sums to zero): the pseudo-solve must satisfy A x = b.
    const N = neumannLaplacian(4);
    const Nd = new Float64Array(256);
    for (let i = 0; i < 16; i++) for (let k = N.rowPtr[i]; k < N.rowPtr[i + 1]; k++) Nd[i * 16 + N.colIdx[k]] = N.values[k];
    const g = denseCholesky(Nd.slice(), 16);
    expect(g.nullity).toBe(1);
    const bn = randomVector(16, 12);
    const mean = bn.reduce((s, v) => s + v, 0) / 16;
    for (let i = 0; i < 16; i++) bn[i] -= mean;
    const xn = new Float64Array(16);
    g.solve(bn, xn);
    for (let i = 0; i < 16; i++) {
      let s = 0;
      for (let j = 0; j < 16; j++) s += Nd[i * 16 + j] * xn[j];
      expect(s).toBeCloseTo(bn[i], 10);
    }
  });
});
