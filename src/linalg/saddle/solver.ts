/** The saddle-point solver: MINRES (minres.ts) with the block-diagonal preconditioner (block-preconditioner.ts) on
 *  K = [[A, Bᵀ], [B, 0]] applied block by block (block-operator.ts), the mean constraint by projections
 *  (constant-pressure.ts); with a pressure block C, K = [[A, Bᵀ], [B, −C]] and the pressure block of the
 *  preconditioner approximates (M/ν + C)⁻¹ (pressure-block.ts). setupSaddlePointSolver builds everything once; solveSaddlePoint is the one-shot form. */
import { RungsInputError } from '../../errors.ts';
import { amgSetup } from '../amg/setup.ts';
import { assertFiniteMatrix, isSymmetric } from '../csr.ts';
import { CG_SYMMETRY_TOL } from '../cg.ts';
import { MINRES_VECTORS, minres, type MinresWorkspace } from '../minres.ts';
import type { Csr } from '../types.ts';
import { allFinite } from '../vector.ts';
import { saddlePointOperator, type SaddleOperator } from './block-operator.ts';
import { BLOCK_PRECONDITIONER_NAME, blockDiagonalPreconditioner, type BlockPreconditioner } from './block-preconditioner.ts';
import { constantPressureIsFree, meanConstraintFor, removeConstant, removeMeanOfDatum } from './constant-pressure.ts';
import { pressureMassApproximation, type MassApproximation } from './pressure-mass.ts';
import {
  PRESSURE_BLOCK_PRECONDITIONER_NAME, checkPressureBlock, constantPressureMode, pressureBlockPreconditioner,
  saddlePointOperatorWithPressureBlock, schurApproximation,
} from './pressure-block.ts';
import type { SaddlePointInput, SaddlePointOptions, SaddlePointResult, SaddlePointSolver } from './types.ts';

const WHERE = 'linalg/saddle';
/** Default tolerance on the preconditioned residual. */
export const SADDLE_DEFAULT_REL_TOL = 1e-10;


function checkBlocks(A: Csr, B: Csr, M: Csr): void {
  const nu = A.nRows, np = B.nRows;
  if (A.nCols !== nu || nu === 0) throw new RungsInputError(`saddle point: A is ${A.nRows}×${A.nCols}; the velocity block must be square and non-empty`, WHERE);
  if (B.nCols !== nu) throw new RungsInputError(`saddle point: B is ${B.nRows}×${B.nCols}; it must have nu = ${nu} columns (rows: pressure unknowns)`, WHERE);
  if (M.nRows !== np || M.nCols !== np) throw new RungsInputError(`saddle point: M is ${M.nRows}×${M.nCols}; the pressure mass matrix must be ${np}×${np}`, WHERE);
  assertFiniteMatrix(A, WHERE);
  assertFiniteMatrix(B, WHERE);
  assertFiniteMatrix(M, WHERE);
  if (!isSymmetric(A, CG_SYMMETRY_TOL)) throw new RungsInputError('saddle point: the velocity block A is not symmetric; MINRES needs [[A, Bᵀ], [B, 0]] symmetric', WHERE);
  if (!isSymmetric(M, CG_SYMMETRY_TOL)) throw new RungsInputError('saddle point: the pressure mass matrix M is not symmetric', WHERE);
}

export function setupSaddlePointSolver(A: Csr, B: Csr, M: Csr, opts: SaddlePointOptions = {}): SaddlePointSolver {
  const t0 = performance.now();
  checkBlocks(A, B, M);
  const nu = A.nRows, np = B.nRows;
  const viscosity = opts.viscosity ?? 1;
  if (!(viscosity > 0 && Number.isFinite(viscosity))) {
    throw new RungsInputError(`saddle point: viscosity must be a positive number (it scales the Schur approximation M/ν), got ${viscosity}`, WHERE);
  }
  const C = opts.pressureBlock;
  if (C) checkPressureBlock(C, np);
  const constraint = meanConstraintFor(B, opts.meanConstraint, opts.pressureDeterminedUpToConstant, C);
  let mass: MassApproximation, K: SaddleOperator, amg: ReturnType<typeof amgSetup>, P: BlockPreconditioner;
  let constantApart = false;
  if (!C) {
    // C = 0 (Stokes): unchanged, bit for bit.
    mass = pressureMassApproximation(M, opts.pressureMass ?? 'chebyshev', opts.chebyshevSteps);
    amg = amgSetup(A, { ...opts.amg, symmetric: true, operatorCopy: false });
    K = saddlePointOperator(A, B, undefined, { vectors: MINRES_VECTORS, kernels: opts.amg?.kernels });
    P = blockDiagonalPreconditioner(nu, np, amg.preconditioner, mass, viscosity, constraint);
  } else {
    // [[A, Bᵀ], [B, −C]]: Chebyshev on M/ν + C, the constant apart when only C sees it (pressure-block.ts).
    mass = pressureMassApproximation(schurApproximation(M, C, viscosity), opts.pressureMass ?? 'chebyshev', opts.chebyshevSteps);
    amg = amgSetup(A, { ...opts.amg, symmetric: true, operatorCopy: false });
    K = saddlePointOperatorWithPressureBlock(A, B, C, { vectors: MINRES_VECTORS, kernels: opts.amg?.kernels });
    constantApart = !constraint && opts.separateConstantPressure !== false && constantPressureIsFree(B);
    const constant = constantApart ? constantPressureMode(M, C) : null;
    P = pressureBlockPreconditioner(nu, np, amg.preconditioner, mass, constraint, constant);
  }
  // MINRES's vectors in the operator's arena, so that its products need no staging copies (block-operator.ts).
  const workspace: MinresWorkspace = { n: nu + np, vectors: Array.from({ length: MINRES_VECTORS }, () => K.vector()) };
  const b = new Float64Array(nu + np);
  let setupSeconds = (performance.now() - t0) / 1000;
  let disposed = false;

  return {
    nu, np, amg: amg.stats, pressureMass: mass.name, constantPressureApart: constantApart,
    solve(f, g, x0) {
      if (disposed) throw new RungsInputError('saddle point: this solver was disposed; set up a new one', WHERE);
      const t1 = performance.now();
      if (f.length !== nu) throw new RungsInputError(`saddle point: f has length ${f.length}, expected nu = ${nu}`, WHERE);
      if (g.length !== np) throw new RungsInputError(`saddle point: g has length ${g.length}, expected np = ${np}`, WHERE);
      if (!allFinite(f) || !allFinite(g)) throw new RungsInputError('saddle point: f or g holds NaN or Inf; check the load vectors', WHERE);
      b.set(f);
      b.set(g, nu);
      const x = new Float64Array(nu + np);
      if (x0) {
        if (x0.u.length !== nu || x0.p.length !== np) {
          throw new RungsInputError(`saddle point: x0 has lengths (${x0.u.length}, ${x0.p.length}), expected (${nu}, ${np})`, WHERE);
        }
        x.set(x0.u);
        x.set(x0.p, nu);
      }
      let removedMean: number | undefined;
      const bp = b.subarray(nu), xp = x.subarray(nu);
      if (constraint) {
        removedMean = removeMeanOfDatum(constraint, bp) / constraint.wSum;
        removeConstant(constraint, xp); // x0 into Y (see block-preconditioner.ts)
      }
      const stats = minres(K, b, x, {
        relTol: opts.relTol ?? SADDLE_DEFAULT_REL_TOL, maxIter: opts.maxIter, preconditioner: P, workspace,
        stopWhen: opts.stopWhen,
      });
      // wᵀp = 0 exactly: the iterates lie in Y up to round-off; Π does not change the residual.
      if (constraint) removeConstant(constraint, xp);
      stats.preconditioner = C ? PRESSURE_BLOCK_PRECONDITIONER_NAME : BLOCK_PRECONDITIONER_NAME;
      stats.setupSeconds = setupSeconds;
      const notes = [stats.message, ...amg.stats.notes].filter(Boolean);
      if (notes.length > 0) stats.message = notes.join('; ');
      const result: SaddlePointResult = {
        u: x.slice(0, nu), p: x.slice(nu), stats,
        seconds: { setup: setupSeconds, solve: (performance.now() - t1) / 1000 },
        amg: amg.stats,
        ...(removedMean !== undefined ? { removedMean } : {}),
        ...(C ? { constantPressureApart: constantApart } : {}),
      };
      setupSeconds = 0;
      return result;
    },
    dispose() {
      if (disposed) return;
      disposed = true;
      P.releaseVectors();
      K.dispose();
      amg.preconditioner.dispose?.();
    },
  };
}

/** Solves [[A, Bᵀ], [B, 0]] [u; p] = [f; g] (or [[A, Bᵀ], [B, −C]] with opts.pressureBlock) once (set up, solve, free the multigrid memory). */
export function solveSaddlePoint(input: SaddlePointInput): SaddlePointResult {
  const { A, B, M, f, g, x0, ...opts } = input;
  const solver = setupSaddlePointSolver(A, B, M, opts);
  try {
    return solver.solve(f, g, x0);
  } finally {
    solver.dispose();
  }
}
