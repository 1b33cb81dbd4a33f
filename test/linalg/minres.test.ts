import { describe, expect, it } from 'vitest';
import { RungsInputError, RungsNumericalError } from '../../src/errors.ts';
import { csrFromDense } from '../../src/linalg/csr.ts';
import { denseLu } from '../../src/linalg/dense/lu.ts';
import { minres, minresWorkspace } from '../../src/linalg/minres.ts';
import { mulberry32 } from '../../src/linalg/random.ts';
import type { Preconditioner } from '../../src/linalg/types.ts';
import { randomVector, relativeError } from './helpers/random-matrices.ts';

/** Reference: dense LU with partial pivoting (Golub & Van Loan 2013, §3.4), src/linalg/dense/lu.ts. */
function luSolve(D: number[][], b: Float64Array): Float64Array {
  const n = D.length;
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) a[i * n + j] = D[i][j];
  const x = new Float64Array(n);
  denseLu(a, n).solve(b, x);
  return x;
}

/** Sparse random symmetric matrix, indefinite and nonsingular by construction: off-diagonal entries in [−1, 1]
 *  (about two per row), diagonal entries ±(r_i + 1 + u) with r_i the row's off-diagonal sum of moduli, half of each
 *  sign. Every Gershgorin disc then keeps at least 1 from 0, so every eigenvalue has |λ| ≥ 1, and the discs on each
 *  side hold as many eigenvalues as they have centres (Gershgorin 1931; Horn & Johnson 2013, Matrix Analysis, 2nd ed.,
 *  Thm 6.1.1 and 6.1.3, from memory). */
function gershgorinIndefinite(n: number, seed: number): { D: number[][]; kappaBound: number } {
  const rand = mulberry32(seed);
  const D = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) if (rand() < 2 / n) { const v = rand() * 2 - 1; D[i][j] = v; D[j][i] = v; }
  }
  let maxAbs = 0;
  for (let i = 0; i < n; i++) {
    let off = 0;
    for (let j = 0; j < n; j++) if (j !== i) off += Math.abs(D[i][j]);
    D[i][i] = (i % 2 === 0 ? 1 : -1) * (off + 1 + rand());
    maxAbs = Math.max(maxAbs, Math.abs(D[i][i]) + off);
  }
  return { D, kappaBound: maxAbs / 1 };
}

/** Random orthogonal Q (columns from modified Gram–Schmidt, done twice; Golub & Van Loan 2013, §5.2.8). */
function randomOrthogonal(n: number, seed: number): number[][] {
  const rand = mulberry32(seed);
  const Q = Array.from({ length: n }, () => Array.from({ length: n }, () => rand() * 2 - 1)); // Q[col][row]
  for (let pass = 0; pass < 2; pass++) {
    for (let c = 0; c < n; c++) {
      for (let d = 0; d < c; d++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += Q[c][i] * Q[d][i];
        for (let i = 0; i < n; i++) Q[c][i] -= s * Q[d][i];
      }
      let s = 0;
      for (let i = 0; i < n; i++) s += Q[c][i] ** 2;
      s = Math.sqrt(s);
      for (let i = 0; i < n; i++) Q[c][i] /= s;
    }
  }
  return Q;
}

/** A = Σ_k λ_k q_k q_kᵀ and the map b ↦ Σ_{λ_k ≠ 0} q_k (q_kᵀ b)/λ_k (the pseudo-inverse, exact by construction). */
function spectralMatrix(Q: number[][], lambda: number[]): { D: number[][]; pinv: (b: Float64Array) => Float64Array } {
  const n = lambda.length;
  const D = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let k = 0; k < n; k++) {
    if (lambda[k] === 0) continue;
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) D[i][j] += lambda[k] * Q[k][i] * Q[k][j];
  }
  // Symmetric to the last bit: the two triangles from one sum.
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) D[j][i] = D[i][j];
  const pinv = (b: Float64Array): Float64Array => {
    const x = new Float64Array(n);
    for (let k = 0; k < n; k++) {
      if (lambda[k] === 0) continue;
      let s = 0;
      for (let i = 0; i < n; i++) s += Q[k][i] * b[i];
      for (let i = 0; i < n; i++) x[i] += (s / lambda[k]) * Q[k][i];
    }
    return x;
  };
  return { D, pinv };
}

/** z = r ./ d for positive d: a symmetric positive definite diagonal preconditioner. */
function diagonalPreconditioner(d: Float64Array): Preconditioner {
  return { name: 'diag', apply(r, z) { for (let i = 0; i < d.length; i++) z[i] = r[i] / d[i]; } };
}

function positiveDiagonal(n: number, seed: number): Float64Array {
  const rand = mulberry32(seed);
  return Float64Array.from({ length: n }, () => 0.2 + 5 * rand());
}

describe('MINRES on symmetric indefinite systems (reference: dense LU, src/linalg/dense/lu.ts)', () => {
  for (const [n, seed] of [[60, 21], [200, 22]] as const) {
    const { D, kappaBound } = gershgorinIndefinite(n, seed);
    const A = csrFromDense(D);
    const b = randomVector(n, seed + 100);
    const ref = luSolve(D, b);
    for (const [name, M] of [['none', undefined], ['diagonal SPD', diagonalPreconditioner(positiveDiagonal(n, seed + 200))]] as const) {
      it(`n = ${n}, preconditioner ${name}: agrees to 1e-10`, () => {
        const x = new Float64Array(n);
        const stats = minres(A, b, x, { relTol: 1e-13, preconditioner: M });
        expect(stats).toMatchObject({ method: 'minres', converged: true, stoppedBy: 'residual' });
        expect(stats.relativeResidual).toBeLessThanOrEqual(1e-13);
        // κ(A) ≤ kappaBound (Gershgorin, above) and the error is at most κ_M times the M⁻¹-residual, κ_M ≤ κ(A)·κ(M)
        // for the diagonal M (common practice, no source); κ(M) ≤ 26 here.
        expect(kappaBound).toBeLessThan(10);
        expect(relativeError(x, ref)).toBeLessThan(1e-13 * kappaBound * 26 * 10);
      });
    }
  }

  it('a dense, ill-placed spectrum (eigenvalues in [−10, −0.1] ∪ [0.1, 10]): the exact inverse by construction', () => {
    const n = 80;
    const rand = mulberry32(31);
    const lambda = Array.from({ length: n }, (_, k) => (k % 2 ? -1 : 1) * 10 ** (-1 + 2 * rand()));
    const { D, pinv } = spectralMatrix(randomOrthogonal(n, 32), lambda);
    const b = randomVector(n, 33);
    for (const M of [undefined, diagonalPreconditioner(positiveDiagonal(n, 34))]) {
      const x = new Float64Array(n);
      const stats = minres(csrFromDense(D), b, x, { relTol: 1e-13, preconditioner: M });
      expect(stats.converged).toBe(true);
      // κ = 100: the error bound is κ · residual (common practice).
      expect(relativeError(x, pinv(b))).toBeLessThan(1e-9);
      expect(relativeError(x, luSolve(D, b))).toBeLessThan(1e-9);
    }
  });

  it('starts from x0, and returns at once when x0 already solves the system', () => {
    const { D } = gershgorinIndefinite(50, 41);
    const A = csrFromDense(D);
    const b = randomVector(50, 42);
    const ref = luSolve(D, b);
    const x = Float64Array.from(ref);
    expect(minres(A, b, x).iterations).toBe(0);
    const near = Float64Array.from(ref, (v, i) => v + (i % 3 === 0 ? 0.5 : 0));
    const stats = minres(A, b, near, { relTol: 1e-13 });
    expect(stats.converged).toBe(true);
    expect(relativeError(near, ref)).toBeLessThan(1e-10);
  });

  it('one workspace serves many right-hand sides', () => {
    const { D } = gershgorinIndefinite(40, 51);
    const A = csrFromDense(D);
    const ws = minresWorkspace(40);
    for (let s = 0; s < 3; s++) {
      const b = randomVector(40, 52 + s);
      const x = new Float64Array(40);
      expect(minres(A, b, x, { workspace: ws, relTol: 1e-13 }).converged).toBe(true);
      expect(relativeError(x, luSolve(D, b))).toBeLessThan(1e-10);
    }
  });
});

describe('MINRES on singular symmetric systems', () => {
  const n = 70;
  const rand = mulberry32(61);
  // Three zero eigenvalues; the others in ±[0.5, 5].
  const lambda = Array.from({ length: n }, (_, k) => (k < 3 ? 0 : (k % 2 ? -1 : 1) * (0.5 + 4.5 * rand())));
  const Q = randomOrthogonal(n, 62);
  const { D, pinv } = spectralMatrix(Q, lambda);
  const A = csrFromDense(D);
  const c = randomVector(n, 63);
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) b[i] += D[i][j] * c[j]; // consistent: b ∈ range(A)

  it('consistent, from x0 = 0: the minimum-norm (pseudo-inverse) solution', () => {
    // Every Krylov vector A^j b lies in range(A) = null(A)^⊥, so x does too: the solution of least norm (exact algebra;
    // Choi, Paige & Saunders 2011, SIAM J. Sci. Comput. 33, 1810–1836, §1, from memory).
    const x = new Float64Array(n);
    const stats = minres(A, b, x, { relTol: 1e-12 });
    expect(stats.converged).toBe(true);
    expect(relativeError(x, pinv(b))).toBeLessThan(1e-9);
  });

  it('consistent, diagonal preconditioner M: the solution M-orthogonal to the null space', () => {
    // x ∈ K(M⁻¹A, M⁻¹b) ⊂ M⁻¹ range(A), so N ᵀ M x = Nᵀ A y = 0 for the null vectors N (exact algebra). That solution
    // is x = x† − N (NᵀMN)⁻¹ NᵀM x†, computed here from the construction.
    const d = positiveDiagonal(n, 64);
    const x = new Float64Array(n);
    const stats = minres(A, b, x, { relTol: 1e-12, preconditioner: diagonalPreconditioner(d) });
    expect(stats.converged).toBe(true);
    const xd = pinv(b);
    const G = new Float64Array(9), rhs = new Float64Array(3), y = new Float64Array(3);
    for (let k = 0; k < 3; k++) {
      for (let l = 0; l < 3; l++) { let s = 0; for (let i = 0; i < n; i++) s += Q[k][i] * d[i] * Q[l][i]; G[k * 3 + l] = s; }
      let s = 0;
      for (let i = 0; i < n; i++) s += Q[k][i] * d[i] * xd[i];
      rhs[k] = s;
    }
    denseLu(G, 3).solve(rhs, y);
    for (let k = 0; k < 3; k++) for (let i = 0; i < n; i++) xd[i] -= y[k] * Q[k][i];
    expect(relativeError(x, xd)).toBeLessThan(1e-9);
  });

  it('inconsistent: stops at the least-squares residual, no throw, the message names a singular system', () => {
    const bad = Float64Array.from(b);
    for (let i = 0; i < n; i++) bad[i] += Q[0][i]; // a unit null-space component: no solution exists
    const x = new Float64Array(n);
    const stats = minres(A, bad, x, { relTol: 1e-12, maxIter: 2000 });
    expect(stats.converged).toBe(false);
    expect(stats.stoppedBy).toBe('stagnation');
    expect(stats.message).toMatch(/singular and inconsistent/);
    // The least residual is the null-space part of b, of norm 1 by construction (b ⟂ null(A)): ||r||/||b|| = 1/||bad||.
    let bb = 0;
    for (let i = 0; i < n; i++) bb += bad[i] ** 2;
    expect(stats.relativeResidual).toBeCloseTo(1 / Math.sqrt(bb), 8);
    // and the iterate stayed bounded (a least-squares solution; it did not grow along the null space).
    let xx = 0;
    for (let i = 0; i < n; i++) xx += x[i] ** 2;
    expect(Math.sqrt(xx)).toBeLessThan(10 * Math.sqrt(n));
  });
});

describe('MINRES: input and failures', () => {
  it('refuses a non-symmetric matrix', () => {
    const A = csrFromDense([[1, 2], [0, 1]]);
    expect(() => minres(A, new Float64Array([1, 1]), new Float64Array(2))).toThrow(RungsInputError);
    expect(() => minres(A, new Float64Array([1, 1]), new Float64Array(2))).toThrow(/not symmetric/);
  });

  it('refuses wrong lengths and bad tolerances', () => {
    const A = csrFromDense([[2, 1], [1, -3]]);
    expect(() => minres(A, new Float64Array(3), new Float64Array(2))).toThrow(/length 3, expected 2/);
    expect(() => minres(A, new Float64Array(2), new Float64Array(2), { relTol: 2 })).toThrow(/relTol/);
    expect(() => minres(A, new Float64Array([NaN, 1]), new Float64Array(2))).toThrow(/NaN/);
  });

  it('an indefinite preconditioner is a numerical error naming it', () => {
    const A = csrFromDense([[2, 1], [1, -3]]);
    const bad: Preconditioner = { name: 'minus-identity', apply(r, z) { for (let i = 0; i < r.length; i++) z[i] = -r[i]; } };
    expect(() => minres(A, new Float64Array([1, 2]), new Float64Array(2), { preconditioner: bad })).toThrow(RungsNumericalError);
    expect(() => minres(A, new Float64Array([1, 2]), new Float64Array(2), { preconditioner: bad })).toThrow(/minus-identity.*not positive definite/);
  });

  it('maxIter reached: converged false with a message, no throw', () => {
    const { D } = gershgorinIndefinite(100, 71);
    const stats = minres(csrFromDense(D), randomVector(100, 72), new Float64Array(100), { maxIter: 3, relTol: 1e-14 });
    expect(stats).toMatchObject({ converged: false, stoppedBy: 'maxIter', iterations: 3 });
    expect(stats.message).toMatch(/not converged after 3 iterations/);
  });

  it('b = 0 gives x = 0 at once', () => {
    const x = new Float64Array([1, 2]);
    const stats = minres(csrFromDense([[2, 1], [1, -3]]), new Float64Array(2), x);
    expect(Array.from(x)).toEqual([0, 0]);
    expect(stats.iterations).toBe(0);
  });

  it('a 2×2 indefinite system is solved in at most 2 steps (Krylov dimension; exact arithmetic, common practice)', () => {
    const D = [[2, 1], [1, -3]];
    const b = new Float64Array([1, 2]);
    const x = new Float64Array(2);
    const stats = minres(csrFromDense(D), b, x, { relTol: 1e-14 });
    expect(stats.iterations).toBeLessThanOrEqual(2);
    // Closed form: det = −7, x = (1/−7)·[[−3, −1], [−1, 2]]·b = (5/7, −3/7).
    expect(x[0]).toBeCloseTo(5 / 7, 14);
    expect(x[1]).toBeCloseTo(-3 / 7, 14);
  });
});
