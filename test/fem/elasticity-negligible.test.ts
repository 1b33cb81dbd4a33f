import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { singleField } from '../../src/fem/space/space.ts';
import { assembleForm } from '../../src/fem/form/assemble.ts';
import { elasticityForm, multigridMatrix } from '../../src/fem/discretizations/elasticity.ts';
import { eliminate, fixBoundary, noConstraints } from '../../src/fem/constraints/dirichlet.ts';
import { finestOperator, dropNegligibleInPlace } from '../../src/linalg/amg/negligible-entries.ts';
import { reducedRigidBodyModes } from '../../src/linalg/amg/rigid-body-modes.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { denseCholesky } from '../../src/linalg/dense/cholesky.ts';
import { createArena } from '../../src/linalg/kernels/arena.ts';
import { spillingAllocator } from '../../src/linalg/amg/pack.ts';
import type { Csr } from '../../src/linalg/types.ts';

// The elasticity discretization solves with its reduced matrix stripped of exact zeros and round-off entries
// (multigridMatrix), so that the multigrid's last sweep hands CG the product with the matrix it solves with.
const input = {
  lambda: (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 2; },
  mu: (x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 1 + 0.5 * x; },
  source: (x: number, y: number, _z: number, out: Float64Array) => { out[0] = 1 + y; out[1] = -1 + x * y; },
  hints: { coefficients: 1, source: 2 },
};

function reducedSystem(m: number, dropNegligible = false) {
  const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
  const scalar = lagrangeSpace(mesh, 2);
  const space = singleField('u', scalar, 2);
  const { A, b } = assembleForm(space, elasticityForm(space, input, 2));
  const cons = noConstraints(space.nDofs);
  fixBoundary(space, cons, 0, ['left', 'bottom'], (_x, _y, _z, out) => { out[0] = 0; out[1] = 0; });
  return { ...eliminate(A, b, cons, { inPlace: dropNegligible, dropNegligible }), scalar };
}

const copy = (A: Csr): Csr => ({ ...A, rowPtr: A.rowPtr.slice(), colIdx: A.colIdx.slice(), values: A.values.slice() });
const dense = (A: Csr): Float64Array => {
  const D = new Float64Array(A.nRows * A.nCols);
  for (let r = 0; r < A.nRows; r++) for (let s = A.rowPtr[r]; s < A.rowPtr[r + 1]; s++) D[r * A.nCols + A.colIdx[s]] += A.values[s];
  return D;
};
const norm = (v: Float64Array): number => Math.sqrt(v.reduce((s, x) => s + x * x, 0));

describe('elasticity matrix without negligible entries', () => {
  it('keeps exactly the entries the multigrid keeps for its finest level, in place', () => {
    const { A } = reducedSystem(12);
    const full = copy(A);
    const diag = new Float64Array(full.nRows);
    for (let i = 0; i < full.nRows; i++) for (let s = full.rowPtr[i]; s < full.rowPtr[i + 1]; s++) if (full.colIdx[s] === i) diag[i] = full.values[s];
    const ref = finestOperator(full, diag).operator;
    const { A: dropped, dropped: count } = dropNegligibleInPlace(A);
    expect(count).toBeGreaterThan(0);
    expect(dropped.colIdx.buffer).toBe(A.colIdx.buffer);
    expect(Array.from(dropped.rowPtr)).toEqual(Array.from(ref.rowPtr));
    expect(Array.from(dropped.colIdx)).toEqual(Array.from(ref.colIdx));
    expect(Array.from(dropped.values)).toEqual(Array.from(ref.values));
  });

  it('is what the elimination leaves when it drops them in the same pass (same entries, same right-hand side)', () => {
    const plain = reducedSystem(10);
    const fused = reducedSystem(10, true);
    const dropped = multigridMatrix(copy(plain.A));
    expect(dropped.rowPtr[dropped.nRows]).toBeLessThan(plain.A.rowPtr[plain.A.nRows]);
    expect(Array.from(fused.A.rowPtr)).toEqual(Array.from(dropped.rowPtr));
    expect(Array.from(fused.A.colIdx)).toEqual(Array.from(dropped.colIdx));
    expect(Array.from(fused.A.values)).toEqual(Array.from(dropped.values));
    expect(Array.from(fused.b)).toEqual(Array.from(plain.b));
  });

  it("gives the multigrid's finest operator in WebAssembly memory as the same arrays as on the heap", () => {
    const A = multigridMatrix(reducedSystem(10).A);
    const diag = new Float64Array(A.nRows);
    for (let i = 0; i < A.nRows; i++) for (let s = A.rowPtr[i]; s < A.rowPtr[i + 1]; s++) if (A.colIdx[s] === i) diag[i] = A.values[s];
    const heap = finestOperator(A, diag);
    expect(heap.operator).toBe(A); // nothing left to drop
    const arena = createArena(1 << 24);
    if (!arena) return; // no WebAssembly here: nothing to compare
    const wasm = finestOperator(A, diag, spillingAllocator(arena));
    expect(arena.owns(wasm.operator.values)).toBe(true);
    expect(wasm.exactProducts).toBe(true);
    expect(Array.from(wasm.operator.rowPtr)).toEqual(Array.from(A.rowPtr));
    expect(Array.from(wasm.operator.colIdx)).toEqual(Array.from(A.colIdx));
    expect(Array.from(wasm.operator.values)).toEqual(Array.from(A.values));
    expect(Array.from(wasm.diagPos)).toEqual(Array.from(heap.diagPos));
    arena.release();
  });

  it('lets the multigrid hand CG its products: nothing left to drop, so no copy of A', () => {
    const sys = reducedSystem(12);
    const amg = { blockSize: 2, ...reducedRigidBodyModes(sys.scalar.dofCoords, 2, sys.scalar.nDofs, sys.free) };
    const before = amgSetup(copy(sys.A), { ...amg, symmetric: true });
    expect(before.hierarchy.exactProducts).toBe(false);
    expect(before.preconditioner.withProduct).toBeUndefined();
    const after = amgSetup(multigridMatrix(sys.A), { ...amg, symmetric: true });
    expect(after.hierarchy.exactProducts).toBe(true);
    expect(after.preconditioner.withProduct).toBeDefined();
    before.preconditioner.dispose?.(); after.preconditioner.dispose?.();
  });

  it('moves the solution by no more than perturbation theory allows for the dropped entries', () => {
    // Higham 2002, Accuracy and Stability of Numerical Algorithms, 2nd ed., Thm 7.2 (from memory): for
    // (A + ΔA) x̃ = b with ‖ΔA‖ ≤ ε‖A‖ and κ ε < 1, ‖x̃ − x‖/‖x‖ ≤ κ ε / (1 − κ ε), κ = ‖A‖‖A⁻¹‖ (2-norms). The two
    // dense Cholesky solves add their own rounding, bounded by c n u κ (Higham 2002, Thm 10.4): both are allowed for
    // with ε + 4 n u. ‖ΔA‖₂ ≤ ‖ΔA‖_F; κ from power iteration on A and on A⁻¹ (converged to 1e-3, then doubled).
    const sys = reducedSystem(6);
    const n = sys.A.nRows;
    const D = dense(sys.A);
    const dropped = multigridMatrix(copy(sys.A));
    const Dt = dense(dropped);
    let dF = 0, aF = 0;
    for (let e = 0; e < n * n; e++) { dF += (D[e] - Dt[e]) ** 2; aF += D[e] ** 2; }
    expect(dF).toBeGreaterThan(0);
    const chol = denseCholesky(D.slice(), n), cholT = denseCholesky(Dt.slice(), n);
    const x = new Float64Array(n), xt = new Float64Array(n);
    chol.solve(sys.b, x); cholT.solve(sys.b, xt);
    const power = (apply: (v: Float64Array, out: Float64Array) => void): number => {
      let v = new Float64Array(n).map((_, i) => 1 + ((i * 37) % 11) / 11), lam = 0;
      for (let it = 0; it < 500; it++) {
        const w = new Float64Array(n); apply(v, w);
        const next = norm(w) / norm(v);
        v = w.map((t) => t / norm(w));
        if (Math.abs(next - lam) < 1e-3 * next) { lam = next; break; }
        lam = next;
      }
      return lam;
    };
    const lamMax = power((v, out) => { for (let i = 0; i < n; i++) { let s = 0; for (let j = 0; j < n; j++) s += D[i * n + j] * v[j]; out[i] = s; } });
    const invMax = power((v, out) => chol.solve(v, out));
    const kappa = 2 * lamMax * invMax;
    const eps = Math.sqrt(dF) / Math.sqrt(aF) + 4 * n * 2 ** -53;
    expect(kappa * eps).toBeLessThan(0.5);
    const diff = norm(x.map((v, i) => v - xt[i])) / norm(x);
    expect(diff).toBeLessThanOrEqual(kappa * eps / (1 - kappa * eps));
  });
});
