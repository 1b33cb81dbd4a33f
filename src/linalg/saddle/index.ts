/** Saddle-point systems [[A, Bᵀ], [B, 0]] [u; p] = [f; g] (Taylor–Hood Stokes) and [[A, Bᵀ], [B, −C]] (mixed
 *  nearly incompressible elasticity): MINRES with a block-diagonal preconditioner, the mean-pressure constraint,
 *  and the refusal of CG for such matrices. */
export { setupSaddlePointSolver, solveSaddlePoint, SADDLE_DEFAULT_REL_TOL } from './solver.ts';
export type { SaddlePointInput, SaddlePointOptions, SaddlePointResult, SaddlePointSolver } from './types.ts';
export { saddlePointOperator } from './block-operator.ts';
export { blockDiagonalPreconditioner, BLOCK_PRECONDITIONER_NAME, type BlockPreconditioner } from './block-preconditioner.ts';
export { pressureMassApproximation, chebyshevInterval, DEFAULT_CHEBYSHEV_STEPS, type PressureMassSolve, type MassApproximation } from './pressure-mass.ts';
export {
  constantInKernelOf, constantPressureIsFree, meanConstraintFor, removeConstant, removeMeanOfDatum, CONSTANT_MODE_TOL, type MeanConstraint,
} from './constant-pressure.ts';
export { assertNotSaddlePoint, findZeroDiagonalBlock, type ZeroDiagonalBlock } from './zero-diagonal-block.ts';
export {
  checkPressureBlock, constantPressureMode, pressureBlockPreconditioner, saddlePointOperatorWithPressureBlock,
  schurApproximation, PRESSURE_BLOCK_PRECONDITIONER_NAME, type ConstantPressureMode, type PressureBlockPreconditioner,
} from './pressure-block.ts';
