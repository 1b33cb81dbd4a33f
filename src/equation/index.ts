export type { CoefficientValue, EquationDeclaration, FieldKind, PdeDeclaration, PresetName } from './types.ts';
export { derive, type DeriveInput, type DerivedEquation, type DerivedField, type DerivedProblem } from './derive.ts';
export { diffusionConvectionReaction, heat, linearElasticity, nearlyIncompressibleElasticity, nonlinearDiffusion, stokes } from './presets.ts';
export { manufacture, manufactureDerived, solutionOf, type FormulaInput, type ManufactureOptions } from './manufactured.ts';
export { TENSOR_FUNCTIONS, evaluateExpression, languageVocabulary } from './language.ts';
export { compileBundle, dataBundle, type CompiledData, type RobinData } from './bundle.ts';
export { checkManufactured, type ManufacturedCheckOptions, type NeumannSamples } from './checks.ts';
