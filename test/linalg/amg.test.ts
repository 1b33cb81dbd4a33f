import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { cg } from '../../src/linalg/cg.ts';
import { csrFromTriplets } from '../../src/linalg/csr.ts';
import { directSolve } from '../../src/linalg/direct/direct-solve.ts';
import { gmres } from '../../src/linalg/gmres.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { dot } from '../../src/linalg/vector.ts';
import { checkerboard, lagrangeGridStiffness } from './helpers/lagrange-grid.ts';
import { neumannLaplacian } from './helpers/neumann.ts';
import { fivePointLaplacian } from './helpers/poisson.ts';
import { randomVector, relativeError } from './helpers/random-matrices.ts';

// Reference for every solution: the exact banded LU of src/linalg/direct (itself checked against ml-matrix in
// direct.test.ts).
function direct(A: Csr, b: Float64Array): Float64Array {
  const x = new Float64Array(A.nRows);
  directSolve(A, b, x);
  return x;
}

function amgPcg(A: Csr, b: Float64Array, relTol = 1e-13): { x: Float64Array; iterations: number; levels: number } {
  const { preconditioner, stats } = amgSetup(A);
  const x = new Float64Array(A.nRows);
  const s = cg(A, b, x, { relTol, preconditioner });
  expect(s.converged).toBe(true);
  return { x, iterations: s.iterations, levels: stats.levels };
}

/** Upwind convection–diffusion on an m×m grid: five-point diffusion plus first-order upwind differences of
 *  β·∇u scaled by h (a non-symmetric M-matrix; common practice, no source). */
function convectionDiffusion(m: number, bx: number, by: number): Csr {
  const h = 1 / (m + 1);
  const I: number[] = [], J: number[] = [], V: number[] = [];
  for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) {
    const r = j * m + i;
    const push = (c: number, v: number): void => { I.push(r); J.push(c); V.push(v); };
    push(r, 4 + h * (Math.abs(bx) + Math.abs(by)));
    const west = -1 - (bx > 0 ? h * bx : 0), east = -1 + (bx < 0 ? h * bx : 0);
    const south = -1 - (by > 0 ? h * by : 0), north = -1 + (by < 0 ? h * by : 0);
    if (i > 0) push(r - 1, west);
    if (i < m - 1) push(r + 1, east);
    if (j > 0) push(r - m, south);
    if (j < m - 1) push(r + m, north);
  }
  return csrFromTriplets(m * m, m * m, I, J, V);
}

describe('smoothed-aggregation AMG as a CG preconditioner agrees with the direct solver to 1e-10', () => {
  const cases: [string, () => Csr][] = [
    ['five-point Laplacian, 32²', () => fivePointLaplacian(32)],
    ['P1 stiffness (triangles built here), 32²', () => lagrangeGridStiffness('triangle', 1, 33).A],
    ['P1, 1000:1 checkerboard coefficient', () => lagrangeGridStiffness('triangle', 1, 33, checkerboard(1000)).A],
    ['P2 stiffness', () => lagrangeGridStiffness('triangle', 2, 16).A],
    ['P3 stiffness', () => lagrangeGridStiffness('triangle', 3, 11).A],
    ['P3, 1000:1 checkerboard', () => lagrangeGridStiffness('triangle', 3, 11, checkerboard(1000, 2)).A],
    ['Q2 stiffness', () => lagrangeGridStiffness('square', 2, 16).A],
    ['Q2, 1000:1 checkerboard', () => lagrangeGridStiffness('square', 2, 16, checkerboard(1000, 2)).A],
  ];
  for (const [name, make] of cases) {
    it(name, () => {
      const A = make();
      const b = randomVector(A.nRows, 3);
      const { x, levels, iterations } = amgPcg(A, b);
      expect(levels).toBeGreaterThanOrEqual(2);
      expect(iterations).toBeLessThan(40);
      expect(relativeError(x, direct(A, b))).toBeLessThan(1e-10);
    });
  }
});

describe('multigrid behaviour', () => {
  it('PCG iteration counts stay flat (within ±3) for the five-point Laplacian on 32², 64², 128²', () => {
    // h-independent convergence of multigrid for the Poisson problem (common practice, no source).
    const counts = [32, 64, 128].map((m) => {
      const A = fivePointLaplacian(m);
      const b = randomVector(A.nRows, 4);
      const { preconditioner } = amgSetup(A);
      const s = cg(A, b, new Float64Array(A.nRows), { relTol: 1e-10, preconditioner });
      expect(s.converged).toBe(true);
      return s.iterations;
    });
    expect(Math.max(...counts) - Math.min(...counts)).toBeLessThanOrEqual(6);
    for (const c of counts) expect(Math.abs(c - counts[0])).toBeLessThanOrEqual(3);
    expect(Math.max(...counts)).toBeLessThanOrEqual(25);
  });

  it('the V-cycle is a symmetric operator (u·Bv = v·Bu), as CG requires', () => {
    const A = lagrangeGridStiffness('triangle', 2, 16, checkerboard(1000, 2)).A;
    const { preconditioner: B, stats } = amgSetup(A);
    expect(stats.levels).toBeGreaterThanOrEqual(2);
    const u = randomVector(A.nRows, 5), v = randomVector(A.nRows, 6);
    const Bu = new Float64Array(A.nRows), Bv = new Float64Array(A.nRows);
    B.apply(u, Bu);
    B.apply(v, Bv);
    expect(Math.abs(dot(u, Bv) - dot(v, Bu))).toBeLessThan(1e-12 * Math.abs(dot(u, Bv)));
    expect(dot(u, Bu)).toBeGreaterThan(0);
  });

  it('reports levels, complexities and setup time; coarsens by a large factor', () => {
    const A = fivePointLaplacian(64);
    const { stats } = amgSetup(A);
    expect(stats.levels).toBeGreaterThanOrEqual(3);
    expect(stats.perLevel[0]).toEqual({ rows: 4096, nnz: A.values.length });
    for (let l = 1; l < stats.levels; l++) expect(stats.perLevel[l].rows).toBeLessThan(stats.perLevel[l - 1].rows / 3);
    // Smoothed aggregation keeps operator complexity well below 2 on 2D Laplacians (common practice, no source).
    expect(stats.operatorComplexity).toBeGreaterThan(1);
    expect(stats.operatorComplexity).toBeLessThan(2);
    expect(stats.gridComplexity).toBeLessThan(1.5);
    expect(stats.setupSeconds).toBeGreaterThan(0);
    expect(stats.coarseSolver).toMatch(/^cholesky/);
  });

  it('handles decoupled rows (Dirichlet nodes kept as identity rows) and agrees with the direct solver', () => {
    const m = 40, M = m + 2;
    const I: number[] = [], J: number[] = [], V: number[] = [];
    const onBoundary = (i: number, j: number): boolean => i === 0 || j === 0 || i === M - 1 || j === M - 1;
    for (let j = 0; j < M; j++) for (let i = 0; i < M; i++) {
      const r = j * M + i;
      if (onBoundary(i, j)) { I.push(r); J.push(r); V.push(1); continue; }
      I.push(r); J.push(r); V.push(4);
      for (const [di, dj] of [[1, 0], [-1, 0], [0, 1], [0, -1]]) {
        if (!onBoundary(i + di, j + dj)) { I.push(r); J.push((j + dj) * M + i + di); V.push(-1); }
      }
    }
    const A = csrFromTriplets(M * M, M * M, I, J, V);
    const b = randomVector(A.nRows, 10);
    const { x, iterations } = amgPcg(A, b);
    expect(iterations).toBeLessThan(25);
    expect(relativeError(x, direct(A, b))).toBeLessThan(1e-10);
  });

  it('preconditions GMRES on a non-symmetric convection–diffusion matrix (coarsest solve by LU)', () => {
    const A = convectionDiffusion(48, 20, -10);
    const b = randomVector(A.nRows, 7);
    const { preconditioner, stats } = amgSetup(A);
    expect(stats.coarseSolver).toMatch(/^lu/);
    const x = new Float64Array(A.nRows);
    const s = gmres(A, b, x, { preconditioner });
    expect(s.converged).toBe(true);
    expect(s.iterations).toBeLessThan(40);
    expect(relativeError(x, direct(A, b))).toBeLessThan(1e-10);
  });
});

describe('singular and bad input', () => {
  it('pure Neumann Laplacian: setup notes the singular coarse operator; a consistent load still converges', () => {
    const A = neumannLaplacian(40);
    const { preconditioner, stats } = amgSetup(A);
    expect(stats.notes.join(' ')).toMatch(/singular/);
    const b = randomVector(A.nRows, 8);
    const mean = b.reduce((s, v) => s + v, 0) / b.length;
    for (let i = 0; i < b.length; i++) b[i] -= mean;
    const s = cg(A, b, new Float64Array(A.nRows), { relTol: 1e-10, preconditioner });
    expect(s.converged).toBe(true);
  });

  it('pure Neumann Laplacian with a load that does not sum to zero: not converged, message says possibly singular', () => {
    const A = neumannLaplacian(30);
    const { preconditioner } = amgSetup(A);
    const b = randomVector(A.nRows, 9).map((v) => v + 1);
    const s = cg(A, b, new Float64Array(A.nRows), { preconditioner });
    expect(s.converged).toBe(false);
    expect(['stagnation', 'breakdown']).toContain(s.stoppedBy);
    expect(s.message).toMatch(/singular.*Neumann/);
  });

  it('a NaN in the matrix makes setup throw a RungsInputError naming the entry', () => {
    const A = fivePointLaplacian(10);
    const row = 9, k = A.rowPtr[row] + 1;
    A.values[k] = NaN;
    expect(() => amgSetup(A)).toThrow(RungsInputError);
    expect(() => amgSetup(A)).toThrow(new RegExp(`entry \\(${row}, ${A.colIdx[k]}\\).*NaN.*finite`));
    A.values[k] = Infinity;
    expect(() => amgSetup(A)).toThrow(/Infinity/);
  });

  it('a non-positive diagonal makes setup throw', () => {
    const A = fivePointLaplacian(6);
    for (let i = 0; i < A.nRows; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) A.values[k] = -A.values[k];
    expect(() => amgSetup(A)).toThrow(/positive diagonal/);
  });
});
