export { generateCode, generatePrepared, prepareBundle, type GeneratedFile } from './generate.ts';
export { LANGUAGES, FILE_NAMES, checkLanguage, type Language } from './languages.ts';
export { formulaText, POWER_STYLES, type PowerStyle } from './formula-text.ts';
export { nameProblem } from './names.ts';
export { SELF_TEST_TOLERANCE, type CodegenOptions, type SampleBox } from './samples.ts';
export { POINT_ARGUMENTS, NORMAL_ARGUMENTS, type Argument, type DataBundle, type GeneratedFunction } from './types.ts';
