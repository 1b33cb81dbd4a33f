// Codes not written in TypeScript: run an external solver per level and read back its errors or its solution.
export { external, type ExternalDiscretization, type ExternalFieldArray, type ExternalOutput, type ExternalLevelOutput, type ExternalLevelRun } from './types.ts';
export {
  runLevelCommand, levelArgv, showArgv, runLevelsInParallel, DEFAULT_TIMEOUT_SECONDS, KILL_GRACE_SECONDS,
  type CommandSpec, type CommandRun, type CommandOptions,
} from './command.ts';
export { splitCommandWords } from './words.ts';
export { substituteWord, substituteWords, levelEnvironment, PLACEHOLDERS, type LevelValues } from './placeholders.ts';
export { runExternalLevel, type ExternalLevelInput } from './level.ts';
export { levelFolder, prepareLevelFolder, readLevelOutput, ERRORS_FILES, SOLUTION_FILES, type ReadOutputOptions } from './output.ts';
export { parseErrorsJson, parseErrorsCsv, errorsFileSchema, type ReportedErrors, type ErrorsFileOptions } from './errors-file.ts';
export { externalDiscretizationSchema, quantityNamesSchema } from './schema.ts';
export { parseLegacyVtk } from './vtk/legacy.ts';
export { parseVtu } from './vtk/vtu.ts';
export { parseVtkText, readVtkFile } from './vtk/read.ts';
export {
  gridToField, gridToFields, MID_NODE_TOLERANCE, VALUE_ROUND_OFF,
  type VtkField, type VtkFieldOptions, type VtkFieldRequest, type VtkFields, type VtkFieldsOptions, type VtkSystemField,
} from './vtk/to-field.ts';
export { VTK_CELL_TYPES, vtkCellTypeName, type VtkCellType } from './vtk/cell-types.ts';
export type { VtkGrid, VtkPointArray } from './vtk/grid.ts';
export { tetrahedronBoundaryFacets } from '../mesh/boundary-faces.ts';
export { levelLabel, placeOf, type LevelRef } from './where.ts';
