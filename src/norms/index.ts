export type { DiscreteField, ExactSolution, NormValues } from './types.ts';
export { lagrangeField, interpolate } from '../fem/field/lagrange-field.ts';
export { errorNorms, exactNorms, ERROR_RULE_EXTRA, ERROR_RULE_EXTRA_MAPPED, errorRuleDegree, perCellArrays } from './errors.ts';
export type { ExactField } from './types.ts';
export { vectorLagrangeField, interpolateVector, type ComponentsFn } from '../fem/field/vector-field.ts';
export { fieldErrors, exactFieldNorms, type FieldErrorOptions, type FieldNormValues } from './field-errors.ts';
