// `rungs fit TABLE.csv`: the convergence analysis of a table someone else produced. Error columns go through the same
// analyseSeries as a study's norms, so every report writer works on the result; quantity columns get the grid
// convergence index.
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { analyseSeries, DEFAULT_FIT_WINDOW, DEFAULT_TOLERANCE } from '../analysis/index.ts';
import type { Verdict } from '../analysis/types.ts';
import { RungsInputError } from '../errors.ts';
import type { LevelResult, StudyResult } from '../study/result.ts';
import { packageVersions } from '../study/versions.ts';
import { parseCsvTable } from '../csv/read.ts';
import { expectationFor, parseExpectations, type Expectations } from './expectations.ts';
import {
  analyseQuantity, MIN_LEVELS, parseProcedures, PROCEDURE_TITLES, type QuantityProcedure, type QuantityReport,
} from '../analysis/quantities.ts';
import { readFitData, type ColumnChoice } from './table.ts';

export interface FitOptions extends ColumnChoice {
  /** File name for messages and the result (default 'table.csv'). */
  file?: string;
  /** Name of the result (default: the file name without its extension). */
  study?: string;
  /** Expected order for every error column, per column ("L2=2,H1semi=1" or an object), quantities by name only. */
  expect?: Expectations | string;
  /** Spatial dimension: needed to fit in dofs and for representative sizes from dofs. */
  dim?: number;
  tolerance?: number;
  fitWindow?: number;
  /** Procedures for the quantity columns ("gci,least-squares,mixed-order" or a list); each must have the levels it
   *  needs. Default: every one the number of levels allows. */
  procedures?: readonly QuantityProcedure[] | string;
}

export interface FitOutcome {
  result: StudyResult;
  quantities: QuantityReport[];
}

// Above-order is not a pass: an error falling faster than the best approximation allows is measured wrongly or the
// expected order is wrong (README, How the verdict is reached).
const ACCEPTABLE: Verdict[] = ['on-order', 'exact'];

/** Reads a table file as text; a missing or unreadable file is a RungsInputError naming it. */
export function readTableFile(path: string): string {
  try {
    return readFileSync(path, 'utf8');
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    throw new RungsInputError(`${path}: cannot read the table (${code === 'ENOENT' ? 'no such file' : code ?? (err as Error).message})`, path);
  }
}

/** Fits every error column of a CSV table and computes the GCI of every quantity column. */
export function fitTable(csvText: string, opts: FitOptions = {}): FitOutcome {
  const t0 = performance.now();
  const startedAt = new Date().toISOString();
  const file = opts.file ?? 'table.csv';
  const table = parseCsvTable(csvText, file);
  const data = readFitData(table, file, opts);
  const expect = typeof opts.expect === 'string' ? parseExpectations(opts.expect) : opts.expect;
  const tolerance = opts.tolerance ?? DEFAULT_TOLERANCE;
  const fitWindow = opts.fitWindow ?? DEFAULT_FIT_WINDOW;
  const dim = opts.dim;
  if (dim !== undefined && !(dim === 1 || dim === 2 || dim === 3)) {
    throw new RungsInputError(`--dim must be 1, 2 or 3, got ${dim}`, '--dim');
  }
  const needsDim = data.by === 'dofs' || (!data.h && data.quantities.length > 0);
  if (needsDim && dim === undefined) {
    throw new RungsInputError(`${file}: ${data.by === 'dofs' ? 'fitting in dofs' : 'sizes from dofs'} needs the spatial dimension; give --dim 1, 2 or 3`, '--dim');
  }
  if (expect && typeof expect === 'object') {
    const known = new Set([...data.errors.flatMap((s) => [s.name, s.column]), ...data.quantities.map((q) => q.name)]);
    for (const name of Object.keys(expect)) {
      if (!known.has(name)) {
        throw new RungsInputError(`--expect names '${name}', which is not an analysed column; the analysed columns are ${[...known].join(', ') || 'none'}`, '--expect');
      }
    }
  }
  const warnings: string[] = [];
  if (data.reordered) warnings.push(`rows sorted from coarse to fine by ${data.by === 'h' ? 'decreasing h' : 'increasing dofs'}`);

  const count = data.lines.length;
  const d = dim ?? 2;
  // Sizes for reports and for the GCI: h from the table, or the representative size (1/N)^(1/d) (Celik et al. 2008, eq. 1).
  const h = data.h ?? data.dofs!.map((N) => Math.pow(1 / N, 1 / d));
  const levels: LevelResult[] = Array.from({ length: count }, (_, i) => ({
    index: i,
    n: data.n[i] ?? null,
    h: h[i]!,
    dofs: data.dofs ? data.dofs[i]! : Number.NaN,
    cells: data.cells ? data.cells[i]! : Number.NaN,
    errors: Object.fromEntries(data.errors.map((s) => [s.name, s.values[i]!])),
    seconds: {},
  }));
  // Without dofs, floors are judged with N ≈ h^-d (round-off grows mildly with the unknowns; only the scale matters).
  // Capped at 2^53: an h near the subnormal range would give N = Infinity, which the analysis refuses as a dof count
  // the table never had.
  const dofsForAnalysis = data.dofs ?? h.map((v) => Math.min(Number.MAX_SAFE_INTEGER, Math.max(1, Math.round(Math.pow(1 / v, d)))));
  const analyses = data.errors.map((s) => analyseSeries({
    name: s.name,
    h: data.by === 'h' ? data.h : null,
    dofs: dofsForAnalysis,
    dim: d,
    errors: s.values,
    expected: expectationFor(expect, s.name, s.column, true),
    tolerance,
    fitWindow,
  }));
  const procedures = typeof opts.procedures === 'string' ? parseProcedures(opts.procedures) : opts.procedures;
  for (const q of data.quantities) {
    for (const p of procedures ?? []) {
      if (count < MIN_LEVELS[p]) {
        throw new RungsInputError(`${file}, column '${q.column}': ${PROCEDURE_TITLES[p]} needs at least ${MIN_LEVELS[p]} levels; the table has ${count}`, file);
      }
    }
  }
  const quantities = data.quantities.map((q) => analyseQuantity(q.name, h, q.values, {
    expected: expectationFor(expect, q.name, q.column, false),
    tolerance,
    sizeKind: data.h ? 'h' : 'representative',
    procedures,
  }));
  for (const q of quantities) for (const w of q.warnings) warnings.push(`${q.name}: ${w}`);

  const study = opts.study ?? (basename(file).replace(/\.[^.]*$/, '') || 'table');
  const result: StudyResult = {
    study,
    file,
    description: 'convergence table',
    dim: d,
    expectation: { verdict: 'pass' },
    levels,
    analyses,
    asExpected: analyses.every((a) => ACCEPTABLE.includes(a.verdict)),
    warnings,
    inputs: {
      source: 'table',
      fitIn: data.by,
      dim: dim ?? 'not given (2 assumed for reports)',
      columns: { errors: data.errors.map((s) => s.column), quantities: data.quantities.map((q) => q.column), unused: data.unused },
      expected: Object.fromEntries(analyses.map((a) => [a.name, a.expected])),
      tolerance,
      fitWindow,
      quantities: Object.fromEntries(data.quantities.map((q) => [q.name, q.values])),
      ...(procedures ? { procedures } : {}),
      lines: data.lines,
    },
    versions: packageVersions(),
    startedAt,
    seconds: (performance.now() - t0) / 1e3,
  };
  return { result, quantities };
}

/** readTableFile + fitTable, with the path as the file name. */
export function fitTableFile(path: string, opts: Omit<FitOptions, 'file'> = {}): FitOutcome {
  return fitTable(readTableFile(path), { ...opts, file: path });
}
