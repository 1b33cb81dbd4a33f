/** Public API of the sparse linear algebra module. */
export type { Csr, Preconditioner, SolveOptions, SolveStats } from './types.ts';
export {
  spmv, csrFromDense, csrFromTriplets, transpose, diagonal, diagonalPositions, isSymmetric,
  residual, residualNorm, relativeResidualNorm,
} from './csr.ts';
export { spgemm } from './spgemm.ts';
export { dot, norm2, axpy } from './vector.ts';
export { cg } from './cg.ts';
export { bicgstab } from './bicgstab.ts';
export { gmres, DEFAULT_RESTART } from './gmres.ts';
export { DEFAULT_REL_TOL, defaultMaxIter, identityPreconditioner } from './iteration-control.ts';
export { jacobiPreconditioner } from './precond/jacobi.ts';
export { ssorPreconditioner } from './precond/ssor.ts';
export { ic0Preconditioner, type Ic0Preconditioner } from './precond/ic0.ts';
export { ilu0Preconditioner, type Ilu0Preconditioner } from './precond/ilu0.ts';
export { amgSetup } from './amg/setup.ts';
export type { AmgOptions, AmgStats, AmgSetupResult, AmgHierarchy, AmgLevel } from './amg/types.ts';
export { directSolve, directFactor, type DirectFactor } from './direct/direct-solve.ts';
export { reverseCuthillMcKee } from './direct/rcm.ts';
export {
  solveSystem, createLinearSolver, autoChoice, AUTO_DIRECT_MAX_N, AUTO_AMG_MIN_N, METHODS, PRECONDITIONERS,
  type SolveSystemOptions, type SolveSystemResult, type MethodName, type PreconditionerName, type LinearSolver,
} from './solve.ts';
export { mulberry32 } from './random.ts';
export { minres, minresWorkspace, type MinresOptions, type MinresWorkspace, type SymmetricOperator } from './minres.ts';
export {
  solveSaddlePoint, setupSaddlePointSolver, SADDLE_DEFAULT_REL_TOL, assertNotSaddlePoint, findZeroDiagonalBlock,
  DEFAULT_CHEBYSHEV_STEPS,
  type SaddlePointInput, type SaddlePointOptions, type SaddlePointResult, type SaddlePointSolver, type PressureMassSolve,
} from './saddle/index.ts';
export { rigidBodyModes, reducedRigidBodyModes } from './amg/rigid-body-modes.ts';
