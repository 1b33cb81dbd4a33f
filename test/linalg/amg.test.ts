import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { cg } from '../../src/linalg/cg.ts';
import { csrFromTriplets } from '../../src/linalg/csr.ts';
import { directSolve } from '../../src/linalg/direct/direct-solve.ts';
import { gmres } from '../../src/linalg/gmres.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { dot } from '../../src/linalg/vector.ts';
import { spmv } from '../../src/linalg/csr.ts';
import { finestOperator, ROUND_OFF_ENTRY } from '../../src/linalg/amg/negligible-entries.ts';
import { scanLevel } from '../../src/linalg/amg/level-scan.ts';
import { strengthGraph } from '../../src/linalg/amg/strength.ts';
import { manufacture } from '../../src/equation/index.ts';
import { assembleSystem } from '../../src/fem/assemble/system.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { checkerboard, lagrangeGridStiffness } from './helpers/lagrange-grid.ts';
import { neumannLaplacian } from './helpers/neumann.ts';
import { convectionDiffusion } from './helpers/convection.ts';
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

// The matrices rungs's own assembly produces: P_degree on m×m squares cut into right-diagonal triangles, Dirichlet
// dofs eliminated, dofs numbered vertices first, then edges, then cell interiors (so rows of neighbouring nodes
// are far apart), conductivity 1 or a 1000:1 checkerboard of 8×8 blocks.
const loadFrom = manufacture({ dim: 2, u: 'sin(pi*x) * sin(pi*y)' });
function assembled(degree: number, m: number, contrast = 1): { A: Csr; b: Float64Array } {
  const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
  const k = (x: number, y: number): number => ((Math.floor(8 * x) + Math.floor(8 * y)) % 2 === 0 ? contrast : 1);
  const coefficients = contrast === 1 ? { f: loadFrom.f } : { f: loadFrom.f, k, hints: { k: 0 } };
  const sys = assembleSystem(lagrangeSpace(mesh, degree), coefficients, { dirichlet: { tags: mesh.tagNames, value: loadFrom.u } });
  return { A: sys.A, b: sys.b };
}

function pcgIterations(A: Csr, b: Float64Array, relTol: number): { x: Float64Array; iterations: number } {
  const { preconditioner } = amgSetup(A, { symmetric: true });
  const x = new Float64Array(A.nRows);
  const s = cg(A, b, x, { relTol, preconditioner });
  expect(s.converged).toBe(true);
  return { x, iterations: s.iterations };
}

describe('on the finite element matrices rungs assembles', () => {
  it('P2: PCG iteration counts stay within ±3 on 16², 32², 64² squares (961 to 16129 unknowns)', () => {
    // h-independent convergence of multigrid for the Poisson problem (common practice, no source); the bound 22
    // is the target band for P2 (≤ 25 iterations to 1e-10 at any size).
    const counts = [16, 32, 64].map((m) => { const { A, b } = assembled(2, m); return pcgIterations(A, b, 1e-10).iterations; });
    expect(Math.max(...counts) - Math.min(...counts)).toBeLessThanOrEqual(3);
    expect(Math.max(...counts)).toBeLessThanOrEqual(22);
  });

  const small: [string, number, number, number][] = [
    ['P1, 24² squares', 1, 24, 1], ['P2, 16² squares', 2, 16, 1], ['P3, 8² squares', 3, 8, 1],
    ['P2, 16² squares, 1000:1 checkerboard', 2, 16, 1000], ['P3, 16² squares, 1000:1 checkerboard', 3, 16, 1000],
  ];
  for (const [name, degree, m, contrast] of small) {
    it(`${name}: agrees with the direct solver to 1e-10`, () => {
      // Reference: the exact banded LU of src/linalg/direct (checked against ml-matrix in direct.test.ts).
      // relTol 1e-12: 1e-13 lies below the round-off floor of the residual for P3 with the 1000:1 jump.
      const { A, b } = assembled(degree, m, contrast);
      const { x } = pcgIterations(A, b, 1e-12);
      expect(relativeError(x, direct(A, b))).toBeLessThan(1e-10);
    });
  }

  it('a 1000:1 checkerboard needs at most twice the iterations of k = 1 (P1 and P2, 16k unknowns)', () => {
    // Aggregation-based AMG with a strength measure that cuts the weak couplings across a jump stays robust to
    // the jump (common practice, no source); the factor 2 is the target.
    for (const [degree, m] of [[1, 128], [2, 64]]) {
      const plain = assembled(degree, m), jump = assembled(degree, m, 1000);
      const n1 = pcgIterations(plain.A, plain.b, 1e-10).iterations;
      const n2 = pcgIterations(jump.A, jump.b, 1e-10).iterations;
      expect(n2).toBeLessThanOrEqual(2 * n1);
    }
  });

  it('P1 on right-diagonal triangles stores two exact zeros per interior row; dropping them keeps products exact', () => {
    // The P1 stiffness coupling of an edge is −(cot α + cot β)/2 with α, β the angles opposite it (common practice,
    // no source); both angles opposite a diagonal edge are right angles, so those couplings vanish exactly.
    const { A } = assembled(1, 12);
    const { diag } = scanLevel(A, 0);
    const { operator: F, exactProducts } = finestOperator(A, diag);
    expect(exactProducts).toBe(true);
    const interior = 9 * 9; // rows whose six neighbours are all unknowns (11×11 unknowns, one ring less)
    expect(A.values.length - F.values.length).toBeGreaterThanOrEqual(2 * interior);
    for (const v of F.values) expect(v).not.toBe(0);
    const z = randomVector(A.nRows, 11), y1 = new Float64Array(A.nRows), y2 = new Float64Array(A.nRows);
    spmv(A, z, y1);
    spmv(F, z, y2);
    expect(Array.from(y2)).toEqual(Array.from(y1));
    // So the V-cycle may hand CG its A z.
    expect(amgSetup(A, { symmetric: true }).preconditioner.withProduct?.matrix).toBe(A);
  });

  it('P2: the hierarchy is built without round-off entries and without positive couplings as strong ones', () => {
    const { A } = assembled(2, 12);
    const { diag } = scanLevel(A, 0);
    const { operator: F, exactProducts } = finestOperator(A, diag);
    let dropped = 0, kept = 0;
    for (let i = 0; i < A.nRows; i++) {
      for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) {
        const j = A.colIdx[k];
        if (j === i) continue;
        if (Math.abs(A.values[k]) <= ROUND_OFF_ENTRY * Math.sqrt(diag[i] * diag[j])) dropped++; else kept++;
      }
    }
    expect(dropped).toBeGreaterThan(0);
    expect(F.values.length).toBe(A.nRows + kept);
    // Round-off entries were dropped, so products differ from A's: CG must form A p itself.
    expect(exactProducts).toBe(false);
    expect(amgSetup(A, { symmetric: true }).preconditioner.withProduct).toBeUndefined();
    // P2 vertex–vertex couplings are positive (+k/3 against a diagonal of 4k on this mesh; common practice, no source).
    let positive = 0;
    for (const v of F.values) if (v > 0) positive++;
    expect(positive).toBeGreaterThan(A.nRows);
    const g = strengthGraph(F, diag, 0.08);
    for (let k = 0; k < F.values.length; k++) if (g.strong[k]) expect(F.values[k]).toBeLessThan(0);
  });

  it('the W-cycle below the first coarse level is still a symmetric positive operator', () => {
    const { A } = assembled(2, 16, 1000);
    const { preconditioner: B, stats } = amgSetup(A, { maxCoarseSize: 10 });
    expect(stats.levels).toBeGreaterThanOrEqual(4);
    const u = randomVector(A.nRows, 12), v = randomVector(A.nRows, 13);
    const Bu = new Float64Array(A.nRows), Bv = new Float64Array(A.nRows);
    B.apply(u, Bu);
    B.apply(v, Bv);
    expect(Math.abs(dot(u, Bv) - dot(v, Bu))).toBeLessThan(1e-12 * Math.abs(dot(u, Bv)));
    expect(dot(u, Bu)).toBeGreaterThan(0);
  });

  it('the fused form (z and A z from the same sweeps) agrees with apply and with a product by A', () => {
    const { A } = assembled(1, 48, 1000);
    const { preconditioner: B, stats } = amgSetup(A, { maxCoarseSize: 10 });
    expect(stats.levels).toBeGreaterThanOrEqual(4);
    const u = randomVector(A.nRows, 15);
    const Bu = new Float64Array(A.nRows), z = new Float64Array(A.nRows), Az = new Float64Array(A.nRows), ref = new Float64Array(A.nRows);
    B.apply(u, Bu);
    const rz = B.withProduct!.apply(u, z, Az);
    expect(relativeError(z, Bu)).toBeLessThan(1e-14);
    spmv(A, z, ref);
    expect(relativeError(Az, ref)).toBeLessThan(1e-13);
    expect(Math.abs(rz - dot(u, z))).toBeLessThan(1e-12 * Math.abs(rz));
  });

  it('a node whose only couplings are positive stays in the coarse space', () => {
    // Five-point Laplacian on 30² nodes plus one extra unknown tied to its neighbours by positive entries
    // (SPD: diagonally dominant with positive diagonal; common practice, no source).
    const m = 30, n0 = m * m;
    const base = fivePointLaplacian(m);
    const I: number[] = [], J: number[] = [], V: number[] = [];
    for (let i = 0; i < n0; i++) for (let k = base.rowPtr[i]; k < base.rowPtr[i + 1]; k++) { I.push(i); J.push(base.colIdx[k]); V.push(base.values[k]); }
    const extra = n0;
    for (const j of [0, 1, m]) { I.push(extra, j, j); J.push(j, extra, j); V.push(0.5, 0.5, 0.5); }
    I.push(extra); J.push(extra); V.push(2);
    const A = csrFromTriplets(n0 + 1, n0 + 1, I, J, V);
    const { hierarchy } = amgSetup(A);
    const P = hierarchy.levels[1].P!;
    expect(P.rowPtr[extra + 1] - P.rowPtr[extra]).toBeGreaterThan(0);
    const b = randomVector(A.nRows, 14);
    const { x } = pcgIterations(A, b, 1e-13);
    expect(relativeError(x, direct(A, b))).toBeLessThan(1e-10);
  });
});
