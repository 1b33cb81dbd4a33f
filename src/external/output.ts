// The level folder {out}: rungs creates it and removes stale protocol files before the solver runs, then reads
// back whichever protocol file the solver wrote.
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { basename, join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { parseErrorsCsv, parseErrorsJson, type ReportedErrors } from './errors-file.ts';
import type { ExternalLevelOutput, ExternalOutput } from './types.ts';
import { gridToField, gridToFields, type VtkField, type VtkFieldRequest, type VtkFields } from './vtk/to-field.ts';
import { readVtkFile } from './vtk/read.ts';
import { checkOutputSize, outputLimit, type OutputLimit } from './vtk/limits.ts';
import { levelLabel, placeOf, type LevelRef } from './where.ts';

/** File names the solver may write into its level folder, in the order rungs looks for them. */
export const ERRORS_FILES = ['errors.json', 'errors.csv'] as const;
export const SOLUTION_FILES = ['solution.vtk', 'solution.vtu'] as const;

/** A study with time: the solution at time level k (t_k = k·Δt, k = 0 … steps) as `solution-<k>.vtk` or `.vtu`. k is
 *  the decimal integer after the '-' (leading zeros allowed: solution-007.vtk is level 7); other names are not part of
 *  the series. */
export const SERIES_FILE = /^solution-(\d+)\.(vtk|vtu)$/;

/** The level folder under a study's output folder: <root>/level-<k> (k 1-based). */
export function levelFolder(root: string, index: number): string {
  return join(root, `level-${index + 1}`);
}

/** Creates the level folder and removes protocol files a previous run left, so that stale output is never read. */
export function prepareLevelFolder(dir: string, level?: LevelRef): void {
  try {
    mkdirSync(dir, { recursive: true });
    for (const f of [...ERRORS_FILES, ...SOLUTION_FILES]) rmSync(join(dir, f), { force: true });
    for (const f of readdirSync(dir)) if (SERIES_FILE.test(f)) rmSync(join(dir, f), { force: true });
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
  /** A study with time: the level's number of steps. The solution at T is then solution.vtk / .vtu or, when the code
   *  wrote a series (SERIES_FILE), its file for k = steps; never both (see solutionSeries). */
  steps?: number;
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
  const solutionFile = finalSolutionFile(dir, opts.steps, ref, opts.context);
  const vtk = readSolutionFile(solutionFile, opts, limit);
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

/** What one VTK solution file holds: the scalar field of today's equation, or the fields of a pde (`fields`). */
export type SolutionFileContent = VtkField | { system: VtkFields };

/** Reads one VTK solution file (the solution at T, or one time level of a series) into a mesh and its field(s), as
 *  the study's options ask (field or fields, degree, size limit). */
export function readSolutionFile(
  file: string, opts: Pick<ReadOutputOptions, 'level' | 'degree' | 'field' | 'fields' | 'maxOutputBytes'>, limit: OutputLimit = outputLimit(opts.maxOutputBytes),
): SolutionFileContent {
  const ref = opts.level;
  const grid = readVtkFile(file, ref, { limit });
  return opts.fields?.length
    ? { system: gridToFields(grid, { fields: opts.fields, degree: opts.degree, level: ref }) }
    : gridToField(grid, { field: opts.field, degree: opts.degree, level: ref });
}

/** The files of a series of time levels in a level folder (SERIES_FILE). */
export interface SolutionSeries {
  dir: string;
  steps: number;
  /** files[k]: the file name of time level k (k = 0 … steps), or undefined where the code wrote none. */
  files: (string | undefined)[];
  /** The time levels without a file, in increasing order. */
  missing: number[];
}

/**
 * The series of time levels the solver wrote into `dir` (SERIES_FILE), or null when it wrote none. Refused, each with
 * one message naming the folder: two files for one time level (solution-7.vtk and solution-007.vtk, or a .vtk and a
 * .vtu) and a time level beyond `steps` (the code took more steps than {steps}).
 */
export function solutionSeries(dir: string, steps: number, ref?: LevelRef): SolutionSeries | null {
  let names: string[];
  try { names = readdirSync(dir); } catch { return null; }
  const files: (string | undefined)[] = new Array<string | undefined>(steps + 1).fill(undefined);
  let any = false;
  for (const name of names.sort()) {
    const m = SERIES_FILE.exec(name);
    if (!m) continue;
    any = true;
    const k = Number(m[1]);
    if (k > steps) {
      throw new RungsInputError(
        `${placeOf(ref, join(dir, name))}: time level ${m[1]} is beyond the level's ${steps} steps; a series holds ` +
          `solution-<k>.vtk (or .vtu) for k = 0 … ${steps} (t_k = k·Δt, k = ${steps} the final time): take {steps} steps of Δt = {dt}`,
        dir,
      );
    }
    const before = files[k];
    if (before !== undefined) {
      throw new RungsInputError(
        `${placeOf(ref, dir)}: time level ${k} has two files, ${before} and ${name}; write one file per time level ` +
          `(solution-<k>.vtk or .vtu, with or without leading zeros, not both)`,
        dir,
      );
    }
    files[k] = name;
  }
  if (!any) return null;
  const missing: number[] = [];
  for (let k = 0; k <= steps; k++) if (files[k] === undefined) missing.push(k);
  return { dir, steps, files, missing };
}

/** "1, 3–5, 9": time levels as increasing runs. */
export function levelRuns(levels: readonly number[]): string {
  const parts: string[] = [];
  for (let i = 0; i < levels.length;) {
    let j = i;
    while (j + 1 < levels.length && levels[j + 1] === levels[j]! + 1) j++;
    parts.push(j === i ? String(levels[i]) : j === i + 1 ? `${levels[i]}, ${levels[j]}` : `${levels[i]}–${levels[j]}`);
    i = j + 1;
  }
  return parts.join(', ');
}

/** The file holding the solution at the final time: solution.vtk / .vtu; in a study with time, or the series' file of
 *  k = steps. A folder holding both a single solution file and a series is refused (which one is the solution at T
 *  would be a guess), and so is a series without its final time level. */
function finalSolutionFile(dir: string, steps: number | undefined, ref: LevelRef | undefined, context?: string): string {
  const single = firstExisting(dir, SOLUTION_FILES);
  const series = steps !== undefined ? solutionSeries(dir, steps, ref) : null;
  if (single && series) {
    const some = series.files.find((f) => f !== undefined)!;
    throw new RungsInputError(
      `${placeOf(ref, dir)}: the solver wrote both ${basename(single)} and a series of time levels (${some}, …); ` +
        `write either the solution at the final time as ${SOLUTION_FILES.join(' or ')}, or every time level as solution-<k>.vtk (k = 0 … ${steps}, ` +
        `the last one the final time), not both`,
      dir,
    );
  }
  if (single) return single;
  if (series) {
    const last = series.files[series.steps];
    if (last === undefined) {
      throw new RungsInputError(
        `${placeOf(ref, dir)}: the series of time levels has no file for the final time level k = ${series.steps} ` +
          `(missing time levels: ${levelRuns(series.missing)} of 0 … ${series.steps}); write solution-<k>.vtk (or .vtu) for every time level ` +
          `t_k = k·Δt, k = 0 … ${series.steps}, the last one at the final time T`,
        dir,
      );
    }
    return join(dir, last);
  }
  const names = steps !== undefined ? [...SOLUTION_FILES, `solution-<k>.vtk (k = 0 … ${steps})`] : SOLUTION_FILES;
  throw nothingWritten(dir, names, ref, context);
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
