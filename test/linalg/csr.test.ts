import { Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import {
  csrFromDense, csrFromTriplets, diagonal, isSymmetric, relativeResidualNorm, residualNorm, spmv, transpose,
} from '../../src/linalg/csr.ts';
import { spgemm } from '../../src/linalg/spgemm.ts';
import { spillingAllocator } from '../../src/linalg/amg/pack.ts';
import { heapAllocator, type Allocator } from '../../src/linalg/kernels/allocator.ts';
import { createArena } from '../../src/linalg/kernels/arena.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { lagrangeGridStiffness } from './helpers/lagrange-grid.ts';
import { fivePointLaplacian } from './helpers/poisson.ts';
import { randomDiagonallyDominant, randomVector } from './helpers/random-matrices.ts';
import { mulberry32 } from '../../src/linalg/random.ts';

function toDense(A: Csr): number[][] {
  const D = Array.from({ length: A.nRows }, () => new Array(A.nCols).fill(0));
  for (let i = 0; i < A.nRows; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) D[i][A.colIdx[k]] += A.values[k];
  return D;
}

function rowsSorted(A: Csr): boolean {
  for (let i = 0; i < A.nRows; i++) for (let k = A.rowPtr[i] + 1; k < A.rowPtr[i + 1]; k++) if (A.colIdx[k] <= A.colIdx[k - 1]) return false;
  return true;
}

function randomRect(m: number, n: number, density: number, seed: number): number[][] {
  const rand = mulberry32(seed);
  return Array.from({ length: m }, () => Array.from({ length: n }, () => (rand() < density ? rand() * 2 - 1 : 0)));
}

describe('CSR construction and kernels (reference: ml-matrix dense products)', () => {
  it('csrFromDense round-trips and spmv equals the dense product', () => {
    const D = randomRect(23, 17, 0.3, 1);
    const A = csrFromDense(D);
    expect(rowsSorted(A)).toBe(true);
    expect(toDense(A)).toEqual(D);
    const x = randomVector(17, 2);
    const y = new Float64Array(23);
    spmv(A, x, y);
    const ref = new Matrix(D).mmul(Matrix.columnVector(Array.from(x))).getColumn(0);
    for (let i = 0; i < 23; i++) expect(y[i]).toBeCloseTo(ref[i], 13);
  });

  it('csrFromTriplets sums duplicates (as assembly needs) and sorts rows', () => {
    const rand = mulberry32(7);
    const n = 12;
    const dense = Array.from({ length: n }, () => new Array(n).fill(0));
    const I: number[] = [], J: number[] = [], V: number[] = [];
    for (let t = 0; t < 200; t++) {
      const i = Math.floor(rand() * n), j = Math.floor(rand() * n), v = rand() - 0.5;
      I.push(i); J.push(j); V.push(v); dense[i][j] += v;
    }
    const A = csrFromTriplets(n, n, I, J, V);
    expect(rowsSorted(A)).toBe(true);
    const D = toDense(A);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(D[i][j]).toBeCloseTo(dense[i][j], 14);
    expect(() => csrFromTriplets(2, 2, [0, 2], [0, 0], [1, 1])).toThrow(/outside a 2×2 matrix/);
  });

  it('P1 stiffness on right-diagonal triangles equals the five-point stencil (common practice, no source)', () => {
    const p1 = toDense(lagrangeGridStiffness('triangle', 1, 9).A);
    const five = toDense(fivePointLaplacian(8));
    for (let i = 0; i < 64; i++) for (let j = 0; j < 64; j++) expect(p1[i][j]).toBeCloseTo(five[i][j], 12);
  });

  it('transpose and diagonal agree with ml-matrix', () => {
    const D = randomRect(9, 14, 0.4, 3);
    const T = transpose(csrFromDense(D));
    expect(rowsSorted(T)).toBe(true);
    expect(toDense(T)).toEqual(new Matrix(D).transpose().to2DArray());
    const S = randomDiagonallyDominant(10, 0.3, 4);
    expect(Array.from(diagonal(csrFromDense(S)))).toEqual(new Matrix(S).diag());
  });

  it('isSymmetric: symmetric FE matrices pass, a one-entry change or a missing partner fails', () => {
    expect(isSymmetric(lagrangeGridStiffness('triangle', 2, 4).A)).toBe(true);
    const A = fivePointLaplacian(5);
    expect(isSymmetric(A)).toBe(true);
    const B: Csr = { ...A, values: A.values.slice() };
    B.values[B.rowPtr[7] + 1] += 1e-6;
    expect(isSymmetric(B)).toBe(false);
    expect(isSymmetric(B, 1e-3)).toBe(true);
    // (0,2) stored without (2,0).
    expect(isSymmetric(csrFromDense([[2, 0, 1], [0, 2, 0], [0, 0, 2]]))).toBe(false);
    // An explicit zero without partner is still symmetric.
    expect(isSymmetric(csrFromTriplets(2, 2, [0, 0, 1], [0, 1, 1], [1, 0, 1]))).toBe(true);
    expect(isSymmetric(csrFromDense([[1, 2, 3]]))).toBe(false);
  });

  it('residual norms equal ||b − A x|| computed densely', () => {
    const D = randomDiagonallyDominant(15, 0.4, 5);
    const A = csrFromDense(D);
    const x = randomVector(15, 6), b = randomVector(15, 7);
    const Ax = new Matrix(D).mmul(Matrix.columnVector(Array.from(x))).getColumn(0);
    let r2 = 0, b2 = 0;
    for (let i = 0; i < 15; i++) { r2 += (b[i] - Ax[i]) ** 2; b2 += b[i] ** 2; }
    expect(residualNorm(A, x, b)).toBeCloseTo(Math.sqrt(r2), 13);
    expect(relativeResidualNorm(A, x, b)).toBeCloseTo(Math.sqrt(r2 / b2), 13);
  });

  // Twice: on the JavaScript heap, and in a WebAssembly arena where the kernels sparseProduct and transposeInto
  // (src/linalg/kernels/sparse.wat) do the work; rows of more than 32 entries take the heap-sort path in both.
  for (const where of ['heap', 'arena'] as const) {
    const allocator = (): Allocator => (where === 'heap' ? heapAllocator : spillingAllocator(createArena(1 << 22)!));
    const inArena = (A: Csr, alloc: Allocator): Csr => {
      if (where === 'heap') return A;
      const rowPtr = alloc.i32(A.rowPtr.length), colIdx = alloc.i32(A.colIdx.length), values = alloc.f64(A.values.length);
      rowPtr.set(A.rowPtr); colIdx.set(A.colIdx); values.set(A.values);
      return { ...A, rowPtr, colIdx, values };
    };

    it(`spgemm equals the dense product, with short and long output rows (${where})`, () => {
      for (const [m, k, n, dens, seed] of [[30, 25, 20, 0.1, 8], [40, 40, 40, 0.5, 9]] as const) {
        const Da = randomRect(m, k, dens, seed), Db = randomRect(k, n, dens, seed + 100);
        const alloc = allocator();
        const C = spgemm(inArena(csrFromDense(Da), alloc), inArena(csrFromDense(Db), alloc), alloc);
        if (where === 'arena') expect(alloc.wasm!.owns(C.rowPtr, C.colIdx, C.values)).toBe(true);
        expect(rowsSorted(C)).toBe(true);
        const ref = new Matrix(Da).mmul(new Matrix(Db)).to2DArray();
        const got = toDense(C);
        for (let i = 0; i < m; i++) for (let j = 0; j < n; j++) expect(got[i][j]).toBeCloseTo(ref[i][j], 12);
      }
    });

    it(`transpose equals ml-matrix's (${where})`, () => {
      const D = randomRect(35, 50, 0.3, 12);
      const alloc = allocator();
      const T = transpose(inArena(csrFromDense(D), alloc), alloc);
      expect(rowsSorted(T)).toBe(true);
      expect(toDense(T)).toEqual(new Matrix(D).transpose().to2DArray());
    });
  }
});
