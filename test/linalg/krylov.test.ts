import { Matrix, solve } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { bicgstab } from '../../src/linalg/bicgstab.ts';
import { cg } from '../../src/linalg/cg.ts';
import { csrFromDense } from '../../src/linalg/csr.ts';
import { gmres } from '../../src/linalg/gmres.ts';
import { identityPreconditioner } from '../../src/linalg/iteration-control.ts';
import { ic0Preconditioner } from '../../src/linalg/precond/ic0.ts';
import { ilu0Preconditioner } from '../../src/linalg/precond/ilu0.ts';
import { jacobiPreconditioner } from '../../src/linalg/precond/jacobi.ts';
import { ssorPreconditioner } from '../../src/linalg/precond/ssor.ts';
import type { Csr, Preconditioner } from '../../src/linalg/types.ts';
import { randomDiagonallyDominant, randomSpd, randomVector, relativeError } from './helpers/random-matrices.ts';

// Reference solutions: ml-matrix dense solve (LU with partial pivoting), a general-purpose library.
function denseSolve(D: number[][], b: Float64Array): number[] {
  return solve(new Matrix(D), Matrix.columnVector(Array.from(b))).getColumn(0);
}

const spdPreconditioners: [string, (A: Csr) => Preconditioner][] = [
  ['none', () => identityPreconditioner],
  ['jacobi', jacobiPreconditioner],
  ['ssor', (A) => ssorPreconditioner(A)],
  ['ssor ω=1.4', (A) => ssorPreconditioner(A, 1.4)],
  ['ic0', ic0Preconditioner],
  ['amg', (A) => amgSetup(A, { maxCoarseSize: 20 }).preconditioner],
];

describe('CG on random sparse SPD systems A = B Bᵀ + n I (reference: ml-matrix solve)', () => {
  for (const [n, density, seed] of [[60, 0.05, 11], [150, 0.02, 12]] as const) {
    const D = randomSpd(n, density, seed);
    const A = csrFromDense(D);
    const b = randomVector(n, seed + 1);
    const ref = denseSolve(D, b);
    for (const [name, make] of spdPreconditioners) {
      it(`n = ${n}, preconditioner ${name}: agrees to 1e-10`, () => {
        const x = new Float64Array(n);
        const stats = cg(A, b, x, { preconditioner: make(A) });
        expect(stats.converged).toBe(true);
        expect(stats.stoppedBy).toBe('residual');
        expect(stats.relativeResidual).toBeLessThanOrEqual(1e-12);
        expect(relativeError(x, ref)).toBeLessThan(1e-10);
      });
    }
  }

  it('uses the initial guess and returns at once when it already solves the system', () => {
    const D = randomSpd(40, 0.1, 13);
    const A = csrFromDense(D);
    const b = randomVector(40, 14);
    const x = Float64Array.from(denseSolve(D, b));
    const stats = cg(A, b, x);
    expect(stats.iterations).toBe(0);
    expect(stats.converged).toBe(true);
  });
});

const generalPreconditioners: [string, (A: Csr) => Preconditioner][] = [
  ['none', () => identityPreconditioner],
  ['jacobi', jacobiPreconditioner],
  ['ilu0', ilu0Preconditioner],
];

describe('GMRES(m) and BiCGStab on random non-symmetric diagonally dominant systems (reference: ml-matrix solve)', () => {
  for (const [n, density, seed] of [[50, 0.1, 21], [140, 0.03, 22]] as const) {
    const D = randomDiagonallyDominant(n, density, seed);
    const A = csrFromDense(D);
    const b = randomVector(n, seed + 1);
    const ref = denseSolve(D, b);
    for (const [name, make] of generalPreconditioners) {
      it(`n = ${n}, gmres + ${name}: agrees to 1e-10`, () => {
        const x = new Float64Array(n);
        const stats = gmres(A, b, x, { preconditioner: make(A) });
        expect(stats.converged).toBe(true);
        expect(stats.relativeResidual).toBeLessThanOrEqual(1e-12);
        expect(relativeError(x, ref)).toBeLessThan(1e-10);
      });
      it(`n = ${n}, bicgstab + ${name}: agrees to 1e-10`, () => {
        const x = new Float64Array(n);
        const stats = bicgstab(A, b, x, { preconditioner: make(A) });
        expect(stats.converged).toBe(true);
        expect(stats.relativeResidual).toBeLessThanOrEqual(1e-12);
        expect(relativeError(x, ref)).toBeLessThan(1e-10);
      });
    }
  }

  it('GMRES with a short restart still converges, over several cycles', () => {
    const D = randomDiagonallyDominant(120, 0.05, 23);
    const A = csrFromDense(D);
    const b = randomVector(120, 24);
    const x = new Float64Array(120);
    const stats = gmres(A, b, x, { restart: 5 });
    expect(stats.converged).toBe(true);
    expect(stats.iterations).toBeGreaterThan(5);
    expect(relativeError(x, denseSolve(D, b))).toBeLessThan(1e-10);
  });

  it('GMRES and BiCGStab agree with ml-matrix on a random SPD system too', () => {
    const D = randomSpd(70, 0.05, 25);
    const A = csrFromDense(D);
    const b = randomVector(70, 26);
    const ref = denseSolve(D, b);
    for (const run of [gmres, bicgstab]) {
      const x = new Float64Array(70);
      expect(run(A, b, x).converged).toBe(true);
      expect(relativeError(x, ref)).toBeLessThan(1e-10);
    }
  });
});

describe('stopping rules', () => {
  const D = randomSpd(80, 0.05, 31);
  const A = csrFromDense(D);
  const b = randomVector(80, 32);

  it('maxIter: converged = false and a message, no exception', () => {
    for (const run of [cg, gmres, bicgstab]) {
      const x = new Float64Array(80);
      const stats = run(A, b, x, { maxIter: 2 });
      expect(stats.converged).toBe(false);
      expect(stats.stoppedBy).toBe('maxIter');
      expect(stats.iterations).toBe(2);
      expect(stats.message).toMatch(/not converged/);
    }
  });

  it('stopWhen receives the iterate and stops the solve', () => {
    for (const run of [cg, gmres, bicgstab]) {
      const x = new Float64Array(80);
      const seen: number[] = [];
      const stats = run(A, b, x, {
        stopWhen: ({ iteration, relativeResidual, x: xi }) => { seen.push(iteration); expect(xi.length).toBe(80); return relativeResidual < 1e-3; },
      });
      expect(stats.stoppedBy).toBe('stopWhen');
      expect(stats.relativeResidual).toBeLessThan(1e-3);
      expect(stats.relativeResidual).toBeGreaterThan(1e-12);
      expect(seen[0]).toBe(1);
    }
  });

  it('b = 0 gives x = 0 without iterating', () => {
    const x = randomVector(80, 33);
    const stats = cg(A, new Float64Array(80), x);
    expect(stats.iterations).toBe(0);
    expect(Array.from(x).every((v) => v === 0)).toBe(true);
  });
});

describe('non-finite values', () => {
  it('a NaN entry makes every solver throw a clear error instead of looping', () => {
    const D = randomSpd(30, 0.1, 41);
    D[4][4] = NaN;
    const A = csrFromDense(D);
    const b = randomVector(30, 42);
    expect(() => cg(A, b, new Float64Array(30))).toThrow(/entry \(4, 4\) is NaN/);
    expect(() => cg(A, b, new Float64Array(30), { skipSymmetryCheck: true })).toThrow(/non-finite \(NaN or Inf\) at iteration/);
    expect(() => gmres(A, b, new Float64Array(30))).toThrow(/non-finite/);
    expect(() => bicgstab(A, b, new Float64Array(30))).toThrow(/non-finite/);
  });
});
