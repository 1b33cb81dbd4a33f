/** The saddle-point solver with a pressure block, [[A, Bᵀ], [B, −C]] (C symmetric positive semidefinite): against a
 *  dense LU of the whole matrix, for C = M/λ (nearly incompressible elasticity, the constant pressure then fixed by C
 *  alone), for a pressure pinned at one node (Bᵀ·1 ≠ 0) and for a C that does not see the constant (a pressure
 *  Laplacian, mean constraint); then the MINRES counts uniformly in λ = 1 … 1e8. The system is Taylor–Hood P2–P1
 *  with both velocity components fixed on the whole boundary (test/linalg/helpers/taylor-hood-grid.ts). */
import { describe, expect, it } from 'vitest';
import { csrFromTriplets } from '../../src/linalg/csr.ts';
import { denseLu } from '../../src/linalg/dense/lu.ts';
import { setupSaddlePointSolver, solveSaddlePoint } from '../../src/linalg/saddle/index.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { taylorHoodGrid } from './helpers/taylor-hood-grid.ts';
import { randomVector, relativeError } from './helpers/random-matrices.ts';

const scaled = (M: Csr, s: number): Csr => ({ ...M, values: Float64Array.from(M.values, (v) => v * s) });

/** [[A, Bᵀ, 0], [B, −C, w], [0, wᵀ, 0]] as a dense row-major array (the border only when w is given). */
function dense(A: Csr, B: Csr, C: Csr, w?: Float64Array): { a: Float64Array; n: number } {
  const nu = A.nRows, np = B.nRows, n = nu + np + (w ? 1 : 0);
  const a = new Float64Array(n * n);
  for (let i = 0; i < nu; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) a[i * n + A.colIdx[k]] += A.values[k];
  for (let i = 0; i < np; i++) {
    for (let k = B.rowPtr[i]; k < B.rowPtr[i + 1]; k++) { a[(nu + i) * n + B.colIdx[k]] += B.values[k]; a[B.colIdx[k] * n + nu + i] += B.values[k]; }
    for (let k = C.rowPtr[i]; k < C.rowPtr[i + 1]; k++) a[(nu + i) * n + nu + C.colIdx[k]] -= C.values[k];
  }
  if (w) for (let i = 0; i < np; i++) { a[(nu + i) * n + n - 1] = w[i]; a[(n - 1) * n + nu + i] = w[i]; }
  return { a, n };
}

/** Dense LU with partial pivoting (src/linalg/dense/lu.ts; Golub & Van Loan 2013, §3.4). */
function luSolve(A: Csr, B: Csr, C: Csr, f: Float64Array, g: Float64Array, w?: Float64Array): { u: Float64Array; p: Float64Array } {
  const { a, n } = dense(A, B, C, w);
  const rhs = new Float64Array(n);
  rhs.set(f);
  rhs.set(g, A.nRows);
  const x = new Float64Array(n);
  denseLu(a, n).solve(rhs, x);
  return { u: x.slice(0, A.nRows), p: x.slice(A.nRows, A.nRows + B.nRows) };
}

/** The rows and columns of pressure unknown 0 removed from B and M: the pressure pinned at a corner, Bᵀ·1 ≠ 0. */
function pinFirstPressure(B: Csr, M: Csr): { B: Csr; M: Csr } {
  const keep = B.nRows - 1;
  const br: number[] = [], bc: number[] = [], bv: number[] = [];
  for (let i = 1; i <= keep; i++) for (let k = B.rowPtr[i]; k < B.rowPtr[i + 1]; k++) { br.push(i - 1); bc.push(B.colIdx[k]); bv.push(B.values[k]); }
  const mr: number[] = [], mc: number[] = [], mv: number[] = [];
  for (let i = 1; i <= keep; i++) for (let k = M.rowPtr[i]; k < M.rowPtr[i + 1]; k++) if (M.colIdx[k] >= 1) { mr.push(i - 1); mc.push(M.colIdx[k] - 1); mv.push(M.values[k]); }
  return { B: csrFromTriplets(keep, B.nCols, br, bc, bv), M: csrFromTriplets(keep, keep, mr, mc, mv) };
}

/** The graph Laplacian on M's pattern, C_ij = −|m_ij| (i ≠ j), C_ii = Σ_{j≠i} |m_ij|: symmetric, diagonally
 *  dominant with a non-negative diagonal, hence positive semidefinite, and C·1 = 0 (Gershgorin; common practice, no
 *  source): a stabilising pressure block that leaves the constant free. */
function pressureLaplacian(M: Csr): Csr {
  const r: number[] = [], c: number[] = [], v: number[] = [];
  for (let i = 0; i < M.nRows; i++) {
    let d = 0;
    for (let k = M.rowPtr[i]; k < M.rowPtr[i + 1]; k++) {
      if (M.colIdx[k] === i) continue;
      r.push(i); c.push(M.colIdx[k]); v.push(-Math.abs(M.values[k])); d += Math.abs(M.values[k]);
    }
    r.push(i); c.push(i); v.push(d);
  }
  return csrFromTriplets(M.nRows, M.nRows, r, c, v);
}

describe('[[A, Bᵀ], [B, −C]] against a dense LU of the whole matrix', () => {
  // With C positive definite the matrix is nonsingular (uᵀAu + pᵀCp = 0 on its null space forces u = 0, p = 0;
  // exact algebra), so the LU solution is the solution. Tolerances: relTol 1e-12 on the preconditioned residual of a
  // matrix of modest condition gives ≲ 1e-8 (common practice, no source).
  for (const lambda of [1, 1e4, 1e8]) {
    it(`C = M/λ, λ = ${lambda}, velocity fixed everywhere (the constant pressure seen by C alone, treated apart)`, () => {
      const P = taylorHoodGrid(6);
      const C = scaled(P.M, 1 / lambda);
      const f = randomVector(P.nu, 10), g = randomVector(P.np, 11);
      const ref = luSolve(P.A, P.B, C, f, g);
      const res = solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, pressureBlock: C, relTol: 1e-12, amg: { maxCoarseSize: 20 } });
      expect(res.stats).toMatchObject({ method: 'minres', preconditioner: 'block-diagonal(amg, M/ν + C)', converged: true });
      expect(res.constantPressureApart).toBe(true);
      expect(res.removedMean).toBeUndefined();
      expect(relativeError(res.u, ref.u)).toBeLessThan(1e-8);
      expect(relativeError(res.p, ref.p)).toBeLessThan(1e-8);
    });
  }

  it('C = M/λ with the pressure pinned at a corner (Bᵀ·1 ≠ 0): no constant apart, same as LU', () => {
    const P = taylorHoodGrid(4);
    const { B, M } = pinFirstPressure(P.B, P.M);
    const C = scaled(M, 1e-3);
    const f = randomVector(P.nu, 20), g = randomVector(B.nRows, 21);
    const ref = luSolve(P.A, B, C, f, g);
    const res = solveSaddlePoint({ A: P.A, B, M, f, g, pressureBlock: C, viscosity: 2, relTol: 1e-12 });
    expect(res.stats.converged).toBe(true);
    expect(res.constantPressureApart).toBe(false);
    expect(relativeError(res.u, ref.u)).toBeLessThan(1e-8);
    expect(relativeError(res.p, ref.p)).toBeLessThan(1e-8);
  });

  it('a C with C·1 = 0 (pressure Laplacian): the constant stays free, the mean constraint fixes it, as the bordered LU', () => {
    // Bordered system [[A, Bᵀ, 0], [B, −C, w], [0, wᵀ, 0]]: nonsingular when the constant is the only null vector
    // of [[A, Bᵀ], [B, −C]] and wᵀ1 ≠ 0 (a Lagrange multiplier for wᵀp = 0; Elman, Silvester & Wathen 2014, §3.3,
    // from memory). The solver removes the mean of g as the multiplier does.
    const P = taylorHoodGrid(4);
    const C = scaled(pressureLaplacian(P.M), 10);
    const f = randomVector(P.nu, 30), g = randomVector(P.np, 31);
    const ref = luSolve(P.A, P.B, C, f, g, P.w);
    const res = solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, pressureBlock: C, meanConstraint: P.w, relTol: 1e-12 });
    expect(res.stats.converged).toBe(true);
    expect(res.constantPressureApart).toBe(false);
    expect(relativeError(res.u, ref.u)).toBeLessThan(1e-8);
    expect(relativeError(res.p, ref.p)).toBeLessThan(1e-8);
    let wp = 0, scale = 0;
    for (let i = 0; i < P.np; i++) { wp += P.w[i] * res.p[i]; scale += Math.abs(P.w[i] * res.p[i]); }
    expect(Math.abs(wp)).toBeLessThan(1e-14 * scale);
  });

  it('refusals: a mean constraint when C fixes the constant, a negative or misshapen C, C = −M/λ', () => {
    const P = taylorHoodGrid(4);
    const f = randomVector(P.nu, 40), g = randomVector(P.np, 41);
    const C = scaled(P.M, 1e-2);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, pressureBlock: C, meanConstraint: P.w })).toThrow(/pressure block C already determines/);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, pressureBlock: C, pressureDeterminedUpToConstant: true })).toThrow(/C fixes the constant/);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, pressureBlock: scaled(P.M, -1e-2) })).toThrow(/give C, not −C/);
    const small = csrFromTriplets(2, 2, [0, 1], [0, 1], [1, 1]);
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, pressureBlock: small })).toThrow(/pressureBlock C is 2×2/);
    // A C that leaves the constant free still needs the mean constraint.
    expect(() => solveSaddlePoint({ A: P.A, B: P.B, M: P.M, f, g, pressureBlock: pressureLaplacian(P.M) })).toThrow(/only up to a constant/);
  });
});

describe('MINRES counts with the pressure block (M/ν + C)⁻¹ do not grow with λ', () => {
  // Theory: for an inf-sup stable pair the Schur complement B A⁻¹ Bᵀ + M/λ is spectrally equivalent to
  // (1/ν + 1/λ) M on mean-free pressures and to M/λ on the constant, with constants independent of λ and h, so the
  // preconditioned spectrum lies in λ-independent intervals and MINRES counts are bounded uniformly in λ (Mardal &
  // Winther 2011, Numer. Linear Algebra Appl. 18, §5, from memory; Elman, Silvester & Wathen 2014, Thm 4.7, numbering
  // from memory). As λ → ∞ the system becomes Stokes, so the Stokes count on the same grid is the reference scale:
  // counts above 1.3 times it are not "bounded uniformly" in any useful sense (a loose bound, common practice, no
  // source). Without treating the constant apart, the preconditioned matrix has an eigenvalue near ν/λ, which
  // MINRES must resolve: the counts then grow with λ.
  const LAMBDAS = [1, 1e2, 1e4, 1e6, 1e8];
  for (const N of [16, 32]) {
    it(`${N}×${N} squares, λ = ${LAMBDAS.join(', ')}`, () => {
      const P = taylorHoodGrid(N);
      const f = randomVector(P.nu, N), g = randomVector(P.np, N + 1);
      const count = (opts: Parameters<typeof setupSaddlePointSolver>[3]): number => {
        const s = setupSaddlePointSolver(P.A, P.B, P.M, { relTol: 1e-8, ...opts });
        const r = s.solve(f, g);
        s.dispose();
        if (!r.stats.converged) throw new Error(`not converged: ${r.stats.message}`);
        return r.stats.iterations;
      };
      const stokes = count({ meanConstraint: P.w });
      const apart = LAMBDAS.map((l) => count({ pressureBlock: scaled(P.M, 1 / l) }));
      const together = LAMBDAS.map((l) => count({ pressureBlock: scaled(P.M, 1 / l), separateConstantPressure: false }));
      const report = `Stokes ${stokes}; constant apart ${apart.join(', ')}; not apart ${together.join(', ')}`;
      expect(Math.max(...apart), report).toBeLessThanOrEqual(Math.ceil(1.3 * stokes));
      // Not apart: strictly growing from λ = 1e2 on, and beyond every count of the robust preconditioner at 1e8.
      const growing = together.slice(1).every((c, i, a) => i === 0 || c > a[i - 1]);
      expect(growing && together[LAMBDAS.length - 1] > Math.max(...apart), report).toBe(true);
    });
  }
});
