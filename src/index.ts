// The public API that study files import (`import { defineStudy, rectangle, lagrange } from 'rungs'`).
export { defineStudy, lagrange, custom, NORM_NAMES } from './study/declaration.ts';
export type {
  StudyDeclaration, DomainSpec, Discretization, LagrangeDiscretization, CustomDiscretization, LevelSolution, NormName,
} from './study/declaration.ts';
export type { LevelContext } from './study/context.ts';
export { interval, rectangle, lShape, box, customDomain } from './study/domain.ts';
export { external } from './external/types.ts';
// The `scheduler` field of external(): where an external study's levels run (Slurm jobs or local processes) and what
// each level's job asks for.
export type { SchedulerSettings, PerLevel } from './scheduler/types.ts';
// The PDE as data: presets written in the equation language, and the types of a pde of your own.
export { diffusionConvectionReaction, heat, linearElasticity, nearlyIncompressibleElasticity, nonlinearDiffusion, stokes } from './equation/presets.ts';
export type { PdeDeclaration, EquationDeclaration, FieldKind, CoefficientValue } from './equation/types.ts';
export type { StudyResult, LevelResult } from './study/result.ts';
export type { DiscreteField, ExactSolution } from './norms/types.ts';

// Building blocks for a user's own discretization.
export { lagrangeSpace } from './fem/dofmap/dofmap.ts';
export { assembleSystem, expandSolution } from './fem/assemble/system.ts';
export { solveLagrange } from './fem/discretizations/lagrange.ts';
export { lagrangeField, interpolate } from './fem/field/lagrange-field.ts';
export { errorNorms } from './norms/errors.ts';
export { solveSystem } from './linalg/index.ts';
export { ruleFor } from './fem/quadrature/index.ts';
export { lagrangeElement } from './fem/element/index.ts';
