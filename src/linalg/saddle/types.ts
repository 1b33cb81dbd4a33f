/** Inputs, options and results of the saddle-point solver for [[A, Bᵀ], [B, 0]] [u; p] = [f; g], or
 *  [[A, Bᵀ], [B, −C]] with a pressure block C. */
import type { AmgOptions, AmgStats } from '../amg/types.ts';
import type { Csr, SolveOptions, SolveStats } from '../types.ts';
import type { PressureMassSolve } from './pressure-mass.ts';

export interface SaddlePointOptions {
  /** Stop when the preconditioned residual norm has fallen by this factor (default 1e-10; see minres.ts). */
  relTol?: number;
  maxIter?: number;
  /** Settings of the multigrid cycle for the velocity block A. */
  amg?: AmgOptions;
  /** ν of the Schur complement approximation M/ν (default 1). */
  viscosity?: number;
  /** w with wᵀp = 0 asked of the solution (e.g. the integrals of the pressure basis functions); required exactly
   *  when the pressure is fixed only up to a constant (Bᵀ·1 = 0), refused otherwise. */
  meanConstraint?: Float64Array;
  /** The caller's word on whether Bᵀ·1 = 0 (velocity fixed on the whole boundary). Checked against B; when absent
   *  it is read from B alone. */
  pressureDeterminedUpToConstant?: boolean;
  /** How the pressure mass matrix is inverted inside the preconditioner: 'chebyshev' (default) or 'diagonal'. */
  pressureMass?: PressureMassSolve;
  /** Chebyshev steps for 'chebyshev' (default DEFAULT_CHEBYSHEV_STEPS). */
  chebyshevSteps?: number;
  /** Extra stopping test after each MINRES iteration (x is the block vector [u; p]). */
  stopWhen?: SolveOptions['stopWhen'];
  /** C, np × np, symmetric positive semidefinite: the system is [[A, Bᵀ], [B, −C]] (C = M/λ for nearly
   *  incompressible elasticity). The pressure block of the preconditioner then approximates (M/ν + C)⁻¹
   *  (pressure-block.ts). When C·1 ≠ 0 it fixes the constant pressure: no meanConstraint. Absent: C = 0. */
  pressureBlock?: Csr;
  /** With a pressure block that alone sees the constant pressure (Bᵀ·1 = 0, C·1 ≠ 0): treat the constant apart in
   *  the preconditioner (default true; false only to show why: MINRES counts then grow with 1ᵀC1's smallness). */
  separateConstantPressure?: boolean;
}

export interface SaddlePointInput extends SaddlePointOptions {
  /** Velocity block, nu × nu, symmetric positive definite. */
  A: Csr;
  /** Discrete divergence, np × nu (rows: pressure unknowns). */
  B: Csr;
  /** Pressure mass matrix, np × np, symmetric positive definite. */
  M: Csr;
  f: Float64Array;
  g: Float64Array;
  /** Initial guess (not modified); zero when absent. */
  x0?: { u: Float64Array; p: Float64Array };
}

export interface SaddlePointResult {
  u: Float64Array;
  p: Float64Array;
  /** method 'minres', preconditioner 'block-diagonal(amg, mass)'; relativeResidual is the preconditioned one. */
  stats: SolveStats;
  /** Seconds spent setting up (multigrid, Chebyshev interval; 0 for the later solves of one solver object) and solving. */
  seconds: { setup: number; solve: number };
  /** With a mean constraint: 1ᵀg / 1ᵀw, the mean of the datum g that was removed to make the system consistent
   *  (round-off, or the quadrature error of compatible data; large when the data do not satisfy ∫ ∇·u = ∫ g). */
  removedMean?: number;
  /** Figures of the velocity multigrid hierarchy. */
  amg: AmgStats;
  /** With a pressure block only: whether the preconditioner treated the constant pressure apart. */
  constantPressureApart?: boolean;
}

/** Set up once (multigrid, pressure block, checks), then solve for many right-hand sides (Newton, time steps). */
export interface SaddlePointSolver {
  nu: number;
  np: number;
  amg: AmgStats;
  /** Which pressure block is used, e.g. 'chebyshev(4)'. */
  pressureMass: string;
  /** True when the preconditioner treats the constant pressure apart (a pressure block C alone fixes it). */
  constantPressureApart: boolean;
  solve(f: Float64Array, g: Float64Array, x0?: { u: Float64Array; p: Float64Array }): SaddlePointResult;
  /** Frees the multigrid memory; the solver cannot be used afterwards. */
  dispose(): void;
}
