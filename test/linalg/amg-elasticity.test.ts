import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { galerkinProduct } from '../../src/linalg/amg/galerkin.ts';
import { reducedRigidBodyModes, rigidBodyModes } from '../../src/linalg/amg/rigid-body-modes.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import {
  DEPENDENT_COLUMN, nodeAggregates, smoothTentative, systemOptions, tentativeProlongator, type NodeBlocks,
} from '../../src/linalg/amg/system.ts';
import { spmv, transpose } from '../../src/linalg/csr.ts';
import { directSolve } from '../../src/linalg/direct/direct-solve.ts';
import { solveSystem } from '../../src/linalg/solve.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { clampedLeft, elasticityGrid, removeUnknowns, rollerLeft, type ElasticityGrid } from './elasticity-matrix.ts';
import { randomVector, relativeError } from './helpers/random-matrices.ts';

const maxAbs = (v: ArrayLike<number>): number => { let s = 0; for (let i = 0; i < v.length; i++) s = Math.max(s, Math.abs(v[i])); return s; };

/** Coordinates of the nodes that keep their unknowns (whole nodes eliminated, interleaved by 2). */
function freeNodeCoords(grid: ElasticityGrid, free: Int32Array): Float64Array {
  const coords = new Float64Array(free.length);
  for (let r = 0; r < free.length / 2; r++) {
    const g = free[2 * r] / 2;
    coords[2 * r] = grid.coords[2 * g]; coords[2 * r + 1] = grid.coords[2 * g + 1];
  }
  return coords;
}

function clampedProblem(m: number): { grid: ElasticityGrid; A: Csr; free: Int32Array; modes: Float64Array[] } {
  const grid = elasticityGrid(m);
  const { A, free } = removeUnknowns(grid.A, clampedLeft(grid));
  return { grid, A, free, modes: rigidBodyModes(freeNodeCoords(grid, free), 2, free.length / 2) };
}

function direct(A: Csr, b: Float64Array): Float64Array {
  const x = new Float64Array(A.nRows);
  directSolve(A, b, x);
  return x;
}

describe('rigid-body modes', () => {
  it('lie in the kernel of the unconstrained P1 elasticity matrix (A r = 0 to round-off)', () => {
    // Translations and infinitesimal rotations have zero strain, so a(r, v) = 0 for every v: exact fact (common
    // practice, no source). Round-off: a few ulps of the row sums |A| |r|.
    for (const [lambda, mu] of [[1, 1], [100, 1]]) {
      const grid = elasticityGrid(12, lambda, mu);
      const modes = rigidBodyModes(grid.coords, 2, grid.nNodes);
      expect(modes).toHaveLength(3);
      const Ar = new Float64Array(grid.A.nRows);
      const absA: Csr = { ...grid.A, values: grid.A.values.map(Math.abs) };
      const scale = new Float64Array(grid.A.nRows);
      for (const r of modes) {
        spmv(grid.A, r, Ar);
        spmv(absA, r.map(Math.abs), scale);
        expect(maxAbs(Ar)).toBeLessThan(1e-13 * maxAbs(scale));
        expect(maxAbs(r)).toBeGreaterThan(0.5);
      }
    }
  });

  it('3D: six linearly independent modes, each a linear field with skew gradient (zero strain)', () => {
    // u = t + ω × x is linear with ∇u skew-symmetric: sym ∇u = 0 (common practice, no source). The gradient of a
    // linear field is read exactly from its values at the vertices of the unit tetrahedron.
    const coords = new Float64Array([0.3, 0.2, 0.1, 1.3, 0.2, 0.1, 0.3, 1.2, 0.1, 0.3, 0.2, 1.1]);
    const modes = rigidBodyModes(coords, 3, 4);
    expect(modes).toHaveLength(6);
    for (const r of modes) {
      const grad = (c: number, d: number): number => r[3 * (d + 1) + c] - r[c];
      for (let c = 0; c < 3; c++) for (let d = 0; d < 3; d++) expect(Math.abs(grad(c, d) + grad(d, c))).toBeLessThan(1e-15);
    }
    // Independence: the 6 × 6 Gram matrix is positive definite (its Cholesky pivots stay positive).
    const G = modes.map((a) => modes.map((b) => a.reduce((s, v, i) => s + v * b[i], 0)));
    for (let k = 0; k < 6; k++) {
      expect(G[k][k]).toBeGreaterThan(1e-8);
      for (let i = k + 1; i < 6; i++) {
        const f = G[i][k] / G[k][k];
        for (let j = k; j < 6; j++) G[i][j] -= f * G[k][j];
      }
    }
  });

  it('reducedRigidBodyModes gives the modes on the kept unknowns and the node of each', () => {
    // Restriction of the full modes to the kept rows: an identity of the construction (common practice, no source).
    const grid = elasticityGrid(6);
    const { free } = removeUnknowns(grid.A, rollerLeft(grid));
    const full = rigidBodyModes(grid.coords, 2, grid.nNodes);
    const { nearNullSpace, nodeOf } = reducedRigidBodyModes(grid.coords, 2, grid.nNodes, free);
    let mismatches = 0;
    for (let r = 0; r < free.length; r++) {
      if (nodeOf[r] !== Math.floor(free[r] / 2)) mismatches++;
      for (let j = 0; j < 3; j++) if (nearNullSpace[j][r] !== full[j][free[r]]) mismatches++;
    }
    expect(mismatches).toBe(0);
  });

  it('bad arguments throw RungsInputError naming them', () => {
    expect(() => rigidBodyModes(new Float64Array(5), 2, 3)).toThrow(/coords has length 5/);
    expect(() => rigidBodyModes(new Float64Array(4), 4 as 2, 1)).toThrow(RungsInputError);
    expect(() => reducedRigidBodyModes(new Float64Array(4), 2, 2, new Int32Array([4]))).toThrow(/kept\[0\]/);
  });
});

/** Walks the system hierarchy with the setup's own steps, checking on every level the tentative prolongator. */
function checkTentativeLevels(
  A0: Csr, nodes0: NodeBlocks, B0: Float64Array[],
): { levels: number; worstReproduction: number; worstOrthogonality: number } {
  let A = A0, nodes = nodes0, B = B0;
  let worstReproduction = 0, worstOrthogonality = 0, levels = 0;
  for (let l = 0; A.nRows > 40 && l < 8; l++) {
    const agg = nodeAggregates(A, nodes, 0.08 * 0.5 ** l, l === 0);
    const tent = tentativeProlongator(nodes, agg, B);
    const Pt = tent.P;
    // P̂ B_c = B, column by column.
    const PB = new Float64Array(A.nRows);
    for (let j = 0; j < B.length; j++) {
      spmv(Pt, tent.B[j], PB);
      let err = 0;
      for (let i = 0; i < PB.length; i++) err = Math.max(err, Math.abs(PB[i] - B[j][i]));
      worstReproduction = Math.max(worstReproduction, err / maxAbs(B[j]));
    }
    // P̂ᵀ P̂ = I (orthonormal columns).
    const I: Csr = {
      nRows: Pt.nRows, nCols: Pt.nRows, rowPtr: Int32Array.from({ length: Pt.nRows + 1 }, (_, i) => i),
      colIdx: Int32Array.from({ length: Pt.nRows }, (_, i) => i), values: new Float64Array(Pt.nRows).fill(1),
    };
    const PtP = galerkinProduct(I, Pt, transpose(Pt), false);
    for (let I = 0; I < PtP.nRows; I++) {
      for (let k = PtP.rowPtr[I]; k < PtP.rowPtr[I + 1]; k++) {
        worstOrthogonality = Math.max(worstOrthogonality, Math.abs(PtP.values[k] - (PtP.colIdx[k] === I ? 1 : 0)));
      }
    }
    const diag = new Float64Array(A.nRows);
    for (let i = 0; i < A.nRows; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) if (A.colIdx[k] === i) diag[i] = A.values[k];
    const P = smoothTentative(A, Pt, diag, true);
    A = galerkinProduct(A, P, transpose(P), true);
    nodes = tent.nodes; B = tent.B;
    levels++;
  }
  return { levels, worstReproduction, worstOrthogonality };
}

describe('tentative prolongator of the system path', () => {
  it('reproduces the near-null space exactly on every level (P̂ B_c = B) with orthonormal columns: clamped, blockSize 2', () => {
    // P̂ B_c = Q R = B on each aggregate: an exact identity of the construction (common practice, no source);
    // round-off of Gram–Schmidt applied twice: a few ulps.
    const { A, modes } = clampedProblem(40);
    const sys = systemOptions(A.nRows, { blockSize: 2, nearNullSpace: modes })!;
    const r = checkTentativeLevels(A, sys.nodes, sys.nearNullSpace);
    expect(r.levels).toBeGreaterThanOrEqual(2);
    expect(r.worstReproduction).toBeLessThan(1e-12);
    expect(r.worstOrthogonality).toBeLessThan(1e-12);
  });

  it('the same with nodeOf for a roller (some components of a node eliminated), and a lone node keeps 2 of 3 modes', () => {
    const grid = elasticityGrid(40);
    const { A, free } = removeUnknowns(grid.A, rollerLeft(grid));
    const { nearNullSpace, nodeOf } = reducedRigidBodyModes(grid.coords, 2, grid.nNodes, free);
    const sys = systemOptions(A.nRows, { blockSize: 2, nearNullSpace, nodeOf })!;
    const r = checkTentativeLevels(A, sys.nodes, sys.nearNullSpace);
    expect(r.levels).toBeGreaterThanOrEqual(2);
    expect(r.worstReproduction).toBeLessThan(1e-12);
    expect(r.worstOrthogonality).toBeLessThan(1e-12);
    // A single node with 2 unknowns cannot carry 3 independent columns: one is dropped, B stays reproduced
    // (the dropped column lies in the span of the kept ones). Exact fact: rank ≤ number of rows.
    const lone: NodeBlocks = { count: 1, ptr: new Int32Array([0, 2]), dofs: new Int32Array([0, 1]), nodeOf: new Int32Array([0, 0]) };
    const B = rigidBodyModes(new Float64Array([0.25, 0.5]), 2, 1);
    const t = tentativeProlongator(lone, { aggregateOf: new Int32Array([0]), count: 1 }, B);
    expect(t.P.nCols).toBe(2);
    expect(t.nodes.count).toBe(1);
    const PB = new Float64Array(2);
    for (let j = 0; j < 3; j++) { spmv(t.P, t.B[j], PB); expect(Math.abs(PB[0] - B[j][0]) + Math.abs(PB[1] - B[j][1])).toBeLessThan(10 * DEPENDENT_COLUMN); }
  });
});

describe('smoothed aggregation for elasticity', () => {
  it('agrees with the direct solver to 1e-9 (clamped, blockSize 2 and the rigid-body modes)', () => {
    // Reference: the exact banded LU of src/linalg/direct (checked against ml-matrix in direct.test.ts).
    const { A, modes } = clampedProblem(24);
    const b = randomVector(A.nRows, 11);
    const r = solveSystem(A, b, { symmetric: true, method: 'cg', preconditioner: 'amg', relTol: 1e-13, amg: { blockSize: 2, nearNullSpace: modes } });
    expect(r.stats.converged).toBe(true);
    expect(r.amg?.levels).toBeGreaterThanOrEqual(2);
    expect(r.amg?.nearNullSpace).toBe(3);
    expect(relativeError(r.x, direct(A, b))).toBeLessThan(1e-9);
  });

  it('roller with nodeOf agrees with the direct solver to 1e-9', () => {
    const grid = elasticityGrid(24);
    const { A, free } = removeUnknowns(grid.A, rollerLeft(grid));
    const b = randomVector(A.nRows, 12);
    const r = solveSystem(A, b, { symmetric: true, method: 'cg', preconditioner: 'amg', relTol: 1e-12, amg: { blockSize: 2, ...reducedRigidBodyModes(grid.coords, 2, grid.nNodes, free) } });
    expect(r.stats.converged).toBe(true);
    expect(relativeError(r.x, direct(A, b))).toBeLessThan(1e-9);
  });

  it('WebAssembly and JavaScript kernels give the same bits; nodeOf of whole nodes gives the bits of blockSize', () => {
    // Both kernel paths transcribe the same loops in the same order, and whole nodes given by nodeOf are the
    // nodes of blockSize 2 (identities of the construction, common practice, no source).
    const { A, modes } = clampedProblem(32);
    const b = randomVector(A.nRows, 13);
    const nodeOf = Int32Array.from({ length: A.nRows }, (_, u) => 1000 + (u >> 1));
    const run = (amg: object): Float64Array =>
      solveSystem(A, b, { symmetric: true, method: 'cg', preconditioner: 'amg', relTol: 1e-10, amg: { nearNullSpace: modes, ...amg } }).x;
    const wasm = run({ blockSize: 2, kernels: 'wasm' });
    const js = run({ blockSize: 2, kernels: 'javascript' });
    const byNode = run({ nodeOf, kernels: 'wasm' });
    let differ = 0;
    for (let i = 0; i < wasm.length; i++) { if (!Object.is(wasm[i], js[i])) differ++; if (!Object.is(wasm[i], byNode[i])) differ++; }
    expect(differ).toBe(0);
    const w = amgSetup(A, { blockSize: 2, nearNullSpace: modes, kernels: 'wasm', symmetric: true });
    const j = amgSetup(A, { blockSize: 2, nearNullSpace: modes, kernels: 'javascript', symmetric: true });
    expect(w.stats.kernels).toBe('wasm');
    expect(w.stats.perLevel).toEqual(j.stats.perLevel);
    let levelDiffs = 0;
    w.hierarchy.levels.forEach((L, l) => {
      const M = j.hierarchy.levels[l];
      for (let k = 0; k < L.A.values.length; k++) if (!Object.is(L.A.values[k], M.A.values[k])) levelDiffs++;
      if (L.P && M.P) for (let k = 0; k < L.P.values.length; k++) if (!Object.is(L.P.values[k], M.P.values[k])) levelDiffs++;
    });
    expect(levelDiffs).toBe(0);
    w.preconditioner.dispose?.();
  });

  it('pure traction (no Dirichlet data): a load orthogonal to the rigid-body modes still converges', () => {
    // A is symmetric positive semidefinite with kernel = the rigid-body modes, so A x = b is consistent for
    // b ⊥ ker A and CG stays in the range (common practice, no source).
    const grid = elasticityGrid(24);
    const modes = rigidBodyModes(grid.coords, 2, grid.nNodes);
    const b = randomVector(grid.A.nRows, 14);
    const q = modes.map((v) => Float64Array.from(v));
    const dotv = (a: Float64Array, c: Float64Array): number => a.reduce((s, v, i) => s + v * c[i], 0);
    for (let j = 0; j < q.length; j++) {
      for (let i = 0; i < j; i++) { const c = dotv(q[i], q[j]); q[j].forEach((v, u) => { q[j][u] = v - c * q[i][u]; }); }
      const s = Math.sqrt(dotv(q[j], q[j]));
      q[j].forEach((v, u) => { q[j][u] = v / s; });
    }
    for (const v of q) { const c = dotv(v, b); b.forEach((x, u) => { b[u] = x - c * v[u]; }); }
    const r = solveSystem(grid.A, b, { symmetric: true, method: 'cg', preconditioner: 'amg', relTol: 1e-10, amg: { blockSize: 2, nearNullSpace: modes } });
    expect(r.stats.converged).toBe(true);
    expect(r.stats.message).toMatch(/singular/);
    const Ax = new Float64Array(b.length);
    spmv(grid.A, r.x, Ax);
    expect(relativeError(Ax, b)).toBeLessThan(1e-9);
  });
});

describe('system options: bad input', () => {
  const { A, modes } = clampedProblem(4);
  const n = A.nRows;
  const cases: [string, object, RegExp][] = [
    ['blockSize that does not divide n', { blockSize: 3 }, /not whole nodes of blockSize 3.*nodeOf/],
    ['blockSize not an integer', { blockSize: 1.5 }, /blockSize must be a positive integer/],
    ['nearNullSpace of the wrong length', { blockSize: 2, nearNullSpace: [new Float64Array(n + 1)] }, /nearNullSpace\[0\] must be a Float64Array of length/],
    ['empty nearNullSpace', { nearNullSpace: [] }, /nearNullSpace must be a non-empty array/],
    ['NaN in nearNullSpace', { blockSize: 2, nearNullSpace: [modes[0], Float64Array.from(modes[1], (v, i) => (i === 3 ? NaN : v))] }, /nearNullSpace\[1\]\[3\] is NaN/],
    ['nodeOf without nearNullSpace', { nodeOf: new Int32Array(n) }, /nodeOf needs nearNullSpace/],
    ['nodeOf of the wrong length', { nodeOf: new Int32Array(2), nearNullSpace: modes }, /nodeOf must be an Int32Array with one node index per unknown/],
    ['negative node index', { nodeOf: new Int32Array(n).fill(-1), nearNullSpace: modes }, /nodeOf\[0\] is -1/],
    ['node with more unknowns than blockSize', { blockSize: 2, nodeOf: new Int32Array(n), nearNullSpace: modes }, /more than blockSize 2/],
  ];
  for (const [name, opts, message] of cases) {
    it(name, () => {
      expect(() => amgSetup(A, { symmetric: true, ...opts })).toThrow(RungsInputError);
      expect(() => amgSetup(A, { symmetric: true, ...opts })).toThrow(message);
    });
  }
});
