// The level folder {out}: rungs creates it and removes stale protocol files before the solver runs, then reads
// back whichever protocol file the solver wrote.
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { parseErrorsCsv, parseErrorsJson, type ReportedErrors } from './errors-file.ts';
import type { ExternalLevelOutput, ExternalOutput } from './types.ts';
import { gridToField, gridToFields, type VtkFieldRequest } from './vtk/to-field.ts';
import { readVtkFile } from './vtk/read.ts';
import { checkOutputSize, outputLimit, type OutputLimit } from './vtk/limits.ts';
import { levelLabel, placeOf, type LevelRef } from './where.ts';

/** File names the solver may write into its level folder, in the order rungs looks for them. */
export const ERRORS_FILES = ['errors.json', 'errors.csv'] as const;
export const SOLUTION_FILES = ['solution.vtk', 'solution.vtu'] as const;

/** The level folder under a study's output folder: <root>/level-<k> (k 1-based). */
export function levelFolder(root: string, index: number): string {
  return join(root, `level-${index + 1}`);
}

/** Creates the level folder and removes protocol files a previous run left, so that stale output is never read. */
export function prepareLevelFolder(dir: string, level?: LevelRef): void {
  try {
    mkdirSync(dir, { recursive: true });
    for (const f of [...ERRORS_FILES, ...SOLUTION_FILES]) rmSync(join(dir, f), { force: true });
  } catch (err) {
    throw new RungsInputError(`${levelLabel(level)}: cannot prepare the output folder ${dir} (${(err as Error).message}); give a writable output folder`, dir);
  }
}

export interface ReadOutputOptions {
  level?: LevelRef;
  /** The level's own h, used when errors.json gives none. */
  h: number;
  /** Error names the study measures (must be in errors files). */
  norms?: readonly string[];
  /** Quantity names the study analyses (must be present; in CSV they mark quantity columns). */
  quantities?: readonly string[];
  degree?: number;
  field?: string;
  /** The fields of a system to read from the VTK file (then `field` is not used). */
  fields?: readonly VtkFieldRequest[];
  /** Text appended to "wrote no … file" messages (the command and its last output lines). */
  context?: string;
  /** Files above this many bytes are refused before they are read (default: from the memory available, see
   *  src/external/vtk/limits.ts). */
  maxOutputBytes?: number;
}

/** A reported h may differ from the largest cell diameter of the solver's own mesh by this fraction before rungs
 *  warns (round-off of a printed h is far smaller; a different definition of h, such as 1/n on triangles, is larger). */
export const H_MISMATCH_FRACTION = 0.01;

/** What a level's solver wrote, with warnings about it that do not stop the level (shown to the user by the caller). */
export type LevelOutput = ExternalLevelOutput & { warnings: string[] };

/** Reads what the solver wrote into `dir` for the given protocol. */
export function readLevelOutput(protocol: ExternalOutput, dir: string, opts: ReadOutputOptions): LevelOutput {
  const ref = opts.level;
  const limit = outputLimit(opts.maxOutputBytes);
  const errorsFile = firstExisting(dir, ERRORS_FILES);
  const readErrors = (file: string, required: boolean): ReportedErrors => {
    const text = readText(file, ref, limit);
    const fileOpts = {
      level: ref,
      quantities: opts.quantities,
      require: required ? opts.norms : undefined,
      requireQuantities: opts.quantities,
    };
    return file.endsWith('.csv') ? parseErrorsCsv(text, file, fileOpts) : parseErrorsJson(text, file, fileOpts);
  };
  if (protocol === 'errors') {
    if (!errorsFile) throw nothingWritten(dir, ERRORS_FILES, ref, opts.context);
    const e = readErrors(errorsFile, true);
    return { kind: 'errors', file: errorsFile, dofs: e.dofs, h: e.h ?? opts.h, cells: e.cells, errors: e.errors, quantities: e.quantities, warnings: [] };
  }
  const solutionFile = firstExisting(dir, SOLUTION_FILES);
  if (!solutionFile) throw nothingWritten(dir, SOLUTION_FILES, ref, opts.context);
  const grid = readVtkFile(solutionFile, ref, { limit });
  const vtk = opts.fields?.length
    ? { system: gridToFields(grid, { fields: opts.fields, degree: opts.degree, level: ref }) }
    : gridToField(grid, { field: opts.field, degree: opts.degree, level: ref });
  const mesh = 'system' in vtk ? vtk.system.mesh : vtk.mesh;
  // An errors file next to the solution may add quantities and the solver's own dof count.
  const extra = errorsFile ? readErrors(errorsFile, false) : null;
  if (!extra && opts.quantities?.length) {
    throw new RungsInputError(
      `${placeOf(ref, join(dir, ERRORS_FILES[0]))}: the study analyses the quantities ${opts.quantities.join(', ')}, but the solver wrote no ` +
        'errors.json next to its VTK solution; write { "dofs": …, "quantities": { … } } there',
      dir,
    );
  }
  // The h the solver reports next to its mesh must be that mesh's h (its largest cell diameter).
  const warnings: string[] = [];
  if (extra && extra.h !== null) {
    const gap = Math.abs(extra.h - mesh.h) / mesh.h;
    if (gap > H_MISMATCH_FRACTION) {
      warnings.push(
        `${placeOf(ref, extra.file)}: h is ${extra.h}, but the largest cell diameter of the mesh in ${solutionFile} is ` +
          `${Number(mesh.h.toPrecision(6))} (${(100 * gap).toFixed(1)}% apart); rungs uses the mesh's h — report the largest cell diameter, or leave h out`,
      );
    }
  }
  if ('system' in vtk) {
    const sys = vtk.system;
    return {
      kind: 'fields', file: solutionFile, mesh, fields: sys.fields, degree: sys.degree,
      dofs: extra?.dofs ?? sys.dofs, h: mesh.h, quantities: extra?.quantities ?? {}, warnings,
    };
  }
  return {
    kind: 'field', file: solutionFile, mesh: vtk.mesh, field: vtk.field, degree: vtk.degree,
    dofs: extra?.dofs ?? vtk.dofs, h: vtk.mesh.h, fieldName: vtk.fieldName, space: vtk.space, quantities: extra?.quantities ?? {}, warnings,
  };
}

function firstExisting(dir: string, names: readonly string[]): string | null {
  for (const n of names) {
    const p = join(dir, n);
    if (existsSync(p)) return p;
  }
  return null;
}

/** A small protocol file as text; above the limit it is refused before it is read. */
function readText(file: string, ref: LevelRef | undefined, limit: OutputLimit): string {
  try {
    checkOutputSize(file, statSync(file).size, limit, ref);
    return readFileSync(file, 'utf8');
  } catch (err) {
    if (err instanceof RungsInputError) throw err;
    throw new RungsInputError(`${placeOf(ref, file)}: cannot read the file (${(err as NodeJS.ErrnoException).code ?? (err as Error).message})`, file);
  }
}

function nothingWritten(dir: string, names: readonly string[], ref: LevelRef | undefined, context = ''): RungsInputError {
  let present: string[] = [];
  try { present = readdirSync(dir); } catch { /* folder gone: say so below */ }
  const holds = present.length ? `the folder holds ${present.slice(0, 8).join(', ')}${present.length > 8 ? ', …' : ''}` : 'the folder is empty';
  const expected = names.map((n) => join(dir, n)).join(' or ');
  return new RungsInputError(`${levelLabel(ref)}: the external solver exited normally but wrote no ${expected} (${holds})${context}`, dir);
}
