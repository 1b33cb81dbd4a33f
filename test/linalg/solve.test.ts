import { EigenvalueDecomposition, Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { cg } from '../../src/linalg/cg.ts';
import { csrFromDense } from '../../src/linalg/csr.ts';
import { ic0Preconditioner } from '../../src/linalg/precond/ic0.ts';
import { AUTO_AMG_MIN_N, AUTO_DIRECT_MAX_N, solveSystem } from '../../src/linalg/solve.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { neumannLaplacian } from './helpers/neumann.ts';
import { fivePointLaplacian } from './helpers/poisson.ts';
import { randomDiagonallyDominant, randomSpd, randomVector, relativeError } from './helpers/random-matrices.ts';

const mlSolve = (D: number[][], b: Float64Array): number[] => solve(new Matrix(D), Matrix.columnVector(Array.from(b))).getColumn(0);

function toDense(A: Csr): number[][] {
  const D = Array.from({ length: A.nRows }, () => new Array(A.nCols).fill(0));
  for (let i = 0; i < A.nRows; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) D[i][A.colIdx[k]] += A.values[k];
  return D;
}

describe('solveSystem: automatic choices (reference solutions: ml-matrix solve)', () => {
  it(`n ≤ ${AUTO_DIRECT_MAX_N}: the direct solver`, () => {
    const D = randomDiagonallyDominant(80, 0.1, 1);
    const b = randomVector(80, 2);
    const { x, stats } = solveSystem(csrFromDense(D), b, { symmetric: false });
    expect(stats.method).toBe('direct');
    expect(relativeError(x, mlSolve(D, b))).toBeLessThan(1e-12);
  });

  it('symmetric, mid-size: CG + IC(0); large: CG + AMG', () => {
    const A = fivePointLaplacian(20); // 400 unknowns
    const b = randomVector(400, 3);
    const mid = solveSystem(A, b, { symmetric: true });
    expect([mid.stats.method, mid.stats.preconditioner]).toEqual(['cg', 'ic0']);
    expect(mid.stats.converged).toBe(true);
    expect(relativeError(mid.x, mlSolve(toDense(A), b))).toBeLessThan(1e-10);
    const big = fivePointLaplacian(75); // 5625 > AUTO_AMG_MIN_N
    expect(big.nRows).toBeGreaterThan(AUTO_AMG_MIN_N);
    const r = solveSystem(big, randomVector(big.nRows, 4), { symmetric: true, relTol: 1e-10 });
    expect([r.stats.method, r.stats.preconditioner]).toEqual(['cg', 'amg']);
    expect(r.stats.converged).toBe(true);
    expect(r.amg?.levels).toBeGreaterThanOrEqual(3);
    expect(r.stats.setupSeconds).toBeGreaterThan(0);
  });

  it('non-symmetric, mid-size: GMRES + ILU(0)', () => {
    const D = randomDiagonallyDominant(300, 0.02, 5);
    const b = randomVector(300, 6);
    const { x, stats } = solveSystem(csrFromDense(D), b, { symmetric: false });
    expect([stats.method, stats.preconditioner]).toEqual(['gmres', 'ilu0']);
    expect(relativeError(x, mlSolve(D, b))).toBeLessThan(1e-10);
  });

  it('every explicit method/preconditioner pair on an SPD system agrees with ml-matrix', () => {
    const D = randomSpd(250, 0.01, 7);
    const A = csrFromDense(D);
    const b = randomVector(250, 8);
    const ref = mlSolve(D, b);
    for (const method of ['cg', 'gmres', 'bicgstab', 'direct'] as const) {
      for (const preconditioner of ['none', 'jacobi', 'ssor', 'ic0', 'ilu0', 'amg'] as const) {
        const { x, stats } = solveSystem(A, b, { symmetric: true, method, preconditioner, amg: { maxCoarseSize: 50 } });
        expect(stats.converged, `${method}+${preconditioner}`).toBe(true);
        expect(relativeError(x, ref), `${method}+${preconditioner}`).toBeLessThan(1e-10);
      }
    }
  });

  it('x0 is used as the initial guess and left untouched', () => {
    const A = fivePointLaplacian(20);
    const b = randomVector(400, 9);
    const exact = solveSystem(A, b, { symmetric: true, method: 'direct' }).x;
    const x0 = exact.slice();
    const { x, stats } = solveSystem(A, b, { symmetric: true, method: 'cg', x0, relTol: 1e-10 });
    expect(stats.iterations).toBe(0);
    expect(x).not.toBe(x0);
    expect(Array.from(x0)).toEqual(Array.from(exact));
  });
});

describe('solveSystem: mistakes and hard systems', () => {
  it('a non-symmetric matrix given to CG throws, naming the problem and the alternatives', () => {
    const A = csrFromDense(randomDiagonallyDominant(300, 0.02, 10));
    const b = randomVector(300, 11);
    expect(() => solveSystem(A, b, { symmetric: true, method: 'cg' })).toThrow(RungsInputError);
    expect(() => solveSystem(A, b, { symmetric: true, method: 'cg' })).toThrow(/not symmetric.*gmres.*bicgstab/);
    expect(() => solveSystem(A, b, { symmetric: false, method: 'cg' })).toThrow(/needs a symmetric matrix/);
    expect(() => solveSystem(A, b, { symmetric: false, preconditioner: 'ic0', method: 'gmres' })).toThrow(/ilu0/);
  });

  it('a symmetric indefinite matrix makes CG say it is not positive definite', () => {
    const A = fivePointLaplacian(20);
    for (let k = 0; k < A.values.length; k++) A.values[k] = -A.values[k];
    expect(() => cg(A, randomVector(400, 12), new Float64Array(400))).toThrow(/not positive definite/);
  });

  it('pure Neumann without a constraint: the direct solver throws, iterative ones report a possibly singular system', () => {
    const A = neumannLaplacian(24); // 576 unknowns
    const b = randomVector(A.nRows, 13).map((v) => v + 0.5);
    expect(() => solveSystem(A, b, { symmetric: true, method: 'direct' })).toThrow(/singular.*Neumann/);
    for (const [method, preconditioner] of [['cg', 'ic0'], ['cg', 'amg'], ['gmres', 'ilu0'], ['bicgstab', 'jacobi']] as const) {
      const { stats } = solveSystem(A, b, { symmetric: true, method, preconditioner });
      expect(stats.converged, `${method}+${preconditioner}`).toBe(false);
      expect(stats.message, `${method}+${preconditioner}`).toMatch(/singular.*Neumann/);
    }
  });

  it('not converged within maxIter: converged = false, no exception', () => {
    const A = fivePointLaplacian(40);
    const { stats } = solveSystem(A, randomVector(1600, 14), { symmetric: true, method: 'cg', preconditioner: 'none', maxIter: 5 });
    expect(stats.converged).toBe(false);
    expect(stats.stoppedBy).toBe('maxIter');
  });

  it('auto on a large non-symmetric matrix with a negative diagonal entry falls back from AMG to ILU(0) and says so', () => {
    const m = 75;
    const A = fivePointLaplacian(m); // 5625 > AUTO_AMG_MIN_N unknowns
    const row = 3 * m + 7; // an interior row: two lower neighbours, then the diagonal
    expect(A.colIdx[A.rowPtr[row] + 2]).toBe(row);
    A.values[A.rowPtr[row] + 2] = -4;
    const b = randomVector(A.nRows, 16);
    const { stats } = solveSystem(A, b, { symmetric: false });
    expect(stats.preconditioner).toBe('ilu0');
    expect(stats.message).toMatch(/ilu0 was used instead/);
    expect(() => solveSystem(A, b, { symmetric: false, preconditioner: 'amg' })).toThrow(/positive diagonal/);
  });

  it('unknown names and NaN loads are input errors', () => {
    const A = fivePointLaplacian(5);
    const b = randomVector(25, 15);
    // @ts-expect-error: checking the run-time guard
    expect(() => solveSystem(A, b, { symmetric: true, method: 'lu' })).toThrow(/unknown method 'lu'; valid: auto, cg/);
    // @ts-expect-error: checking the run-time guard
    expect(() => solveSystem(A, b, { symmetric: true, preconditioner: 'ilut' })).toThrow(/unknown preconditioner/);
    b[3] = NaN;
    expect(() => solveSystem(A, b, { symmetric: true, method: 'cg' })).toThrow(/right-hand side holds NaN/);
  });
});

describe('IC(0) breakdown', () => {
  it('on the Kershaw matrix (SPD, IC(0) meets a negative pivot) a diagonal shift is applied and named', () => {
    // Kershaw (1978), J. Comput. Phys. 26, 43–65: SPD 4×4 matrix for which incomplete Cholesky breaks down (from memory).
    // IC(0) pivots by hand: d = 3, 5/3, 3/5, then 3 − (2/3)²·3 − (10/3)²·(3/5) = −5 < 0.
    const K = [[3, -2, 0, 2], [-2, 3, -2, 0], [0, -2, 3, -2], [2, 0, -2, 3]];
    for (const lambda of new EigenvalueDecomposition(new Matrix(K)).realEigenvalues) expect(lambda).toBeGreaterThan(0);
    const M = ic0Preconditioner(csrFromDense(K));
    expect(M.shift).toBeGreaterThan(0);
    expect(M.name).toMatch(/shift/);
    const b = new Float64Array([1, 2, 3, 4]);
    const x = new Float64Array(4);
    const stats = cg(csrFromDense(K), b, x, { preconditioner: M });
    expect(stats.converged).toBe(true);
    expect(relativeError(x, mlSolve(K, b))).toBeLessThan(1e-10);
  });
});
