export type { DiscreteField, ExactSolution, NormValues } from './types.ts';
export { lagrangeField, interpolate } from '../fem/field/lagrange-field.ts';
export { errorNorms, exactNorms, ERROR_RULE_EXTRA } from './errors.ts';
