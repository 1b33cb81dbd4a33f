import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { csrFromDense, csrFromTriplets } from '../../src/linalg/csr.ts';
import { denseLu } from '../../src/linalg/dense/lu.ts';
import { mulberry32 } from '../../src/linalg/random.ts';
import {
  assertNotSaddlePoint, findZeroDiagonalBlock, pressureMassApproximation, setupSaddlePointSolver, solveSaddlePoint,
} from '../../src/linalg/saddle/index.ts';
import { solveSystem } from '../../src/linalg/solve.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { denseSaddle, taylorHoodGrid } from './helpers/taylor-hood-grid.ts';
import { randomVector, relativeError } from './helpers/random-matrices.ts';

/** Dense LU (src/linalg/dense/lu.ts; Golub & Van Loan 2013, §3.4) of a row array. */
function luSolve(D: number[][], b: Float64Array): Float64Array {
  const n = D.length;
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a[i * n + j] = D[i][j];
  const x = new Float64Array(n);
  denseLu(a, n).solve(b, x);
  return x;
}

/** Reference: the bordered system [[A, Bᵀ, 0], [B, 0, w], [0, wᵀ, 0]] [u; p; λ] = [f; g; 0], nonsingular when Bᵀ has
 *  only the constants as null vectors and wᵀ1 ≠ 0 (a Lagrange multiplier for wᵀp = 0; Elman, Silvester & Wathen
 *  2014, §3.3, from memory). */
function borderedReference(A: Csr, B: Csr, w: Float64Array, f: Float64Array, g: Float64Array) {
  const nu = A.nRows, np = B.nRows, n = nu + np + 1;
  const K = denseSaddle(A, B).map((row) => [...row, 0]);
  K.push(new Array<number>(n).fill(0));
  for (let i = 0; i < np; i++) { K[nu + i][n - 1] = w[i]; K[n - 1][nu + i] = w[i]; }
  const rhs = new Float64Array(n);
  rhs.set(f);
  rhs.set(g, nu);
  const x = luSolve(K, rhs);
  return { u: x.slice(0, nu), p: x.slice(nu, nu + np), lambda: x[n - 1] };
}

/** ||[[A, Bᵀ], [B, 0]] [u; p] − [f; g]|| / ||[f; g]|| from the dense matrix (plain loops). */
function relativeResidual(A: Csr, B: Csr, u: Float64Array, p: Float64Array, f: Float64Array, g: Float64Array): number {
  const K = denseSaddle(A, B);
  const x = [...u, ...p], b = [...f, ...g];
  let rr = 0, bb = 0;
  for (let i = 0; i < K.length; i++) {
    let s = -b[i];
    for (let j = 0; j < K.length; j++) s += K[i][j] * x[j];
    rr += s * s;
    bb += b[i] * b[i];
  }
  return Math.sqrt(rr / bb);
}

const dotW = (w: Float64Array, p: Float64Array): number => { let s = 0; for (let i = 0; i < p.length; i++) s += w[i] * p[i]; return s; };

describe('solveSaddlePoint against a dense LU of the bordered system (Taylor–Hood P2–P1, no-slip on the whole boundary)', () => {
  for (const [N, pressureMass] of [[4, 'chebyshev'], [6, 'chebyshev'], [6, 'diagonal']] as const) {
    it(`N = ${N}, pressure block ${pressureMass}, multigrid with a real hierarchy`, () => {
      const P = taylorHoodGrid(N);
      const f = randomVector(P.nu, 100 + N);
      // g with a non-zero sum on purpose: the bordered system removes 1ᵀg/1ᵀw·w through its multiplier, the solver the same.
      const g = randomVector(P.np, 200 + N);
      const ref = borderedReference(P.A, P.B, P.w, f, g);
      const res = solveSaddlePoint({
        A: P.A, B: P.B, M: P.M, f, g, meanConstraint: P.w, pressureMass, relTol: 1e-12, amg: { maxCoarseSize: 20 },
      });
      expect(res.stats).toMatchObject({ method: 'minres', preconditioner: 'block-diagonal(amg, mass)', converged: true });
      expect(res.amg.levels).toBeGreaterThan(1);
      // Condition of the Stokes matrix is modest at these sizes: 1e-12 in the preconditioned norm gives ≲ 1e-9 (common practice).
      expect(relativeError(res.u, ref.u)).toBeLessThan(1e-9);
      expect(relativeError(res.p, ref.p)).toBeLessThan(1e-9);
      // wᵀp = 0 exactly up to round-off, and the removed mean is the multiplier λ = 1ᵀg/1ᵀw (exact algebra: 1ᵀB = 0).
      let scale = 0;
      for (let i = 0; i < P.np; i++) scale += Math.abs(P.w[i] * res.p[i]);
      expect(Math.abs(dotW(P.w, res.p))).toBeLessThan(1e-14 * scale);
      expect(res.removedMean).toBeCloseTo(ref.lambda, 10);
    });
  }

  it('a viscosity ν: A = ν·Laplacian, Schur approximation M/ν; same solution as the dense reference', () => {
    const nu = 1e-2;
    const P = taylorHoodGrid(4, nu);
    const f = randomVector(P.nu, 7);
    const g = randomVector(P.np, 8);
    const ref = borderedReference(P.A, P.B, P.w, f, g);
    const res = solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, meanConstraint: P.w, viscosity: nu, relTol: 1e-12 });
    expect(res.stats.converged).toBe(true);
    expect(relativeError(res.u, ref.u)).toBeLessThan(1e-9);
    expect(relativeError(res.p, ref.p)).toBeLessThan(1e-9);
  });

  it('a pressure fixed by the equations (Bᵀ·1 ≠ 0): no constraint, same as the dense LU of [[A, Bᵀ], [B, 0]]', () => {
    // Dropping one pressure row leaves B (np−1)×nu of full row rank with Bᵀ·1 ≠ 0 (the constant no longer in
    // null(Bᵀ)); the system is nonsingular (exact algebra: A SPD, B full row rank).
    const P = taylorHoodGrid(4);
    const keep = P.np - 1;
    const rows: number[] = [], cols: number[] = [], vals: number[] = [];
    for (let i = 1; i <= keep; i++) for (let k = P.B.rowPtr[i]; k < P.B.rowPtr[i + 1]; k++) { rows.push(i - 1); cols.push(P.B.colIdx[k]); vals.push(P.B.values[k]); }
    const B = csrFromTriplets(keep, P.nu, rows, cols, vals);
    const mr: number[] = [], mc: number[] = [], mv: number[] = [];
    for (let i = 1; i <= keep; i++) for (let k = P.M.rowPtr[i]; k < P.M.rowPtr[i + 1]; k++) if (P.M.colIdx[k] >= 1) { mr.push(i - 1); mc.push(P.M.colIdx[k] - 1); mv.push(P.M.values[k]); }
    const M = csrFromTriplets(keep, keep, mr, mc, mv);
    const f = randomVector(P.nu, 11), g = randomVector(keep, 12);
    const ref = luSolve(denseSaddle(P.A, B), Float64Array.from([...f, ...g]));
    const res = solveSaddlePoint({ A: P.A, B, M, f, g, relTol: 1e-12, pressureDeterminedUpToConstant: false });
    expect(res.stats.converged).toBe(true);
    expect(res.removedMean).toBeUndefined();
    expect(relativeError(res.u, ref.subarray(0, P.nu))).toBeLessThan(1e-9);
    expect(relativeError(res.p, ref.subarray(P.nu))).toBeLessThan(1e-9);
    expect(() => solveSaddlePoint({ A: P.A, B, M, f, g, meanConstraint: new Float64Array(keep).fill(1) })).toThrow(/already determined/);
    expect(() => solveSaddlePoint({ A: P.A, B, M, f, g, pressureDeterminedUpToConstant: true })).toThrow(/Bᵀ·1 ≠ 0/);
  });
});

describe('the solver object: set up once, many right-hand sides', () => {
  const P = taylorHoodGrid(4);
  it('three right-hand sides, an initial guess, and dispose', () => {
    const solver = setupSaddlePointSolver(P.A, P.B, P.M, { meanConstraint: P.w, relTol: 1e-12, amg: { maxCoarseSize: 20 } });
    expect(solver.pressureMass).toBe('chebyshev(4)');
    for (let s = 0; s < 3; s++) {
      const f = randomVector(P.nu, 300 + s), g = randomVector(P.np, 400 + s);
      const ref = borderedReference(P.A, P.B, P.w, f, g);
      const res = solver.solve(f, g);
      expect(res.stats.converged).toBe(true);
      expect(relativeError(res.u, ref.u)).toBeLessThan(1e-9);
      expect(relativeError(res.p, ref.p)).toBeLessThan(1e-9);
      // Started from the solution, it stops at once (common practice: a zero initial residual).
      expect(solver.solve(f, g, { u: ref.u, p: ref.p }).stats.iterations).toBeLessThanOrEqual(1);
    }
    solver.dispose();
    expect(() => solver.solve(new Float64Array(P.nu), new Float64Array(P.np))).toThrow(/disposed/);
  });

  it('an initial guess with a pressure constant added: the result still has wᵀp = 0 and the same residual', () => {
    const f = randomVector(P.nu, 501), g = randomVector(P.np, 502);
    const ref = borderedReference(P.A, P.B, P.w, f, g);
    const p0 = Float64Array.from(ref.p, (v) => v + 3);
    const res = solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, meanConstraint: P.w, relTol: 1e-12, x0: { u: ref.u, p: p0 } });
    expect(relativeError(res.p, ref.p)).toBeLessThan(1e-9);
  });
});

describe('refusals', () => {
  const P = taylorHoodGrid(4);
  const f = new Float64Array(P.nu).fill(1), g = new Float64Array(P.np);

  it('a pressure fixed only up to a constant without meanConstraint', () => {
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g })).toThrow(RungsInputError);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g })).toThrow(/only up to a constant.*meanConstraint/);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, pressureDeterminedUpToConstant: false })).toThrow(/Bᵀ·1 = 0/);
  });

  it('a mean constraint orthogonal to the constant, wrong lengths, a bad viscosity', () => {
    const w0 = Float64Array.from(P.w, (_, i) => (i === 0 ? 1 : i === 1 ? -1 : 0));
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, meanConstraint: w0 })).toThrow(/1ᵀw = 0/);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, meanConstraint: new Float64Array(3) })).toThrow(/length 3/);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f: new Float64Array(2), g, meanConstraint: P.w })).toThrow(/f has length 2/);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, meanConstraint: P.w, viscosity: 0 })).toThrow(/viscosity/);
  });

  it('CG asked for a saddle-point matrix: solveSystem refuses and names MINRES / solveSaddlePoint', () => {
    const K = csrFromDense(denseSaddle(P.A, P.B));
    const b = new Float64Array(K.nRows).fill(1);
    expect(findZeroDiagonalBlock(K)).toEqual({ rows: P.np, first: P.nu });
    expect(() => solveSystem(K, b, { symmetric: true, method: 'cg' })).toThrow(RungsInputError);
    expect(() => solveSystem(K, b, { symmetric: true, method: 'cg' })).toThrow(/zero diagonal block.*saddle-point.*solveSaddlePoint/);
    expect(() => assertNotSaddlePoint(K, 'here', 'test')).toThrow(/here: the matrix has a zero diagonal block/);
    // 'auto' resolves to CG for a symmetric matrix above AUTO_DIRECT_MAX_N (531 unknowns here): refused the same way.
    const big = taylorHoodGrid(8);
    const K8 = csrFromDense(denseSaddle(big.A, big.B));
    expect(() => solveSystem(K8, new Float64Array(K8.nRows).fill(1), { symmetric: true })).toThrow(/saddle-point/);
  });

  it('a single zero diagonal entry is not called a saddle point (it keeps its own message)', () => {
    const D = [[0, 1, 0], [1, 2, 1], [0, 1, 2]];
    expect(findZeroDiagonalBlock(csrFromDense(D))).toBeNull();
    // Two zero diagonals coupled to each other are not the [[A, Bᵀ], [B, 0]] shape either.
    expect(findZeroDiagonalBlock(csrFromDense([[0, 1, 1], [1, 0, 1], [1, 1, 2]]))).toBeNull();
  });
});

describe('the pressure block: Chebyshev steps on the P1 mass matrix', () => {
  const P = taylorHoodGrid(8);
  const np = P.np;
  const M = P.M;
  const Mx = (x: Float64Array): Float64Array => {
    const y = new Float64Array(np);
    for (let i = 0; i < np; i++) for (let k = M.rowPtr[i]; k < M.rowPtr[i + 1]; k++) y[i] += M.values[k] * x[M.colIdx[k]];
    return y;
  };
  const dot = (a: Float64Array, b: Float64Array): number => { let s = 0; for (let i = 0; i < a.length; i++) s += a[i] * b[i]; return s; };

  it('the interval lies within Wathen\'s bounds [1/2, 2] for D⁻¹M of P1 triangles (b inflated by at most 5 %)', () => {
    // Wathen (1987), IMA J. Numer. Anal. 7, 449–457: λ(D⁻¹M) ∈ [1/2, 2] for linear triangles (from memory).
    const cheb = pressureMassApproximation(M, 'chebyshev', 4);
    const [a, b] = cheb.interval!;
    expect(a).toBeGreaterThanOrEqual(0.5 - 1e-9);
    expect(b).toBeLessThanOrEqual(2 * 1.05 + 1e-9);
  });

  it('k steps reduce the M-norm error by the Chebyshev bound 1/T_k((b+a)/(b−a)), symmetric and positive', () => {
    // Classical bound for the Chebyshev semi-iteration when the spectrum lies in [a, b] (Saad 2003, §12.3.1, from
    // memory); the interval is a Lanczos estimate, so 2 % slack covers eigenvalues just outside it.
    const rand = mulberry32(5);
    const xTrue = Float64Array.from({ length: np }, () => rand() - 0.5);
    const r = Mx(xTrue);
    for (const k of [1, 2, 4, 8]) {
      const cheb = pressureMassApproximation(M, 'chebyshev', k);
      const [a, b] = cheb.interval!;
      const z = new Float64Array(np);
      cheb.apply(r, z);
      const e = Float64Array.from(z, (v, i) => v - xTrue[i]);
      const ratio = Math.sqrt(dot(e, Mx(e)) / dot(xTrue, Mx(xTrue)));
      const bound = 1 / Math.cosh(k * Math.acosh((b + a) / (b - a)));
      expect(ratio).toBeLessThanOrEqual(1.02 * bound);
      // Symmetric and positive definite (what MINRES needs): xᵀC y = yᵀC x, xᵀC x > 0.
      const x = randomVector(np, 10 + k), y = randomVector(np, 20 + k);
      const Cx = new Float64Array(np), Cy = new Float64Array(np);
      cheb.apply(x, Cx);
      cheb.apply(y, Cy);
      expect(Math.abs(dot(y, Cx) - dot(x, Cy))).toBeLessThan(1e-12 * Math.abs(dot(y, Cx)) + 1e-12 * Math.sqrt(dot(x, Cx) * dot(y, Cy)));
      expect(dot(x, Cx)).toBeGreaterThan(0);
    }
  });
});
