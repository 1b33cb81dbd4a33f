// An external level's output as a study level result: the errors the solver reported, or (for a VTK solution)
// the errors of its field(s) integrated with src/norms like any rungs field, with those of the nodal interpolants on
// the file's own nodes.
import { basename, dirname, join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { errorNorms, type ErrorOptions, perCellArrays } from '../norms/errors.ts';
import { fieldErrors, type FieldErrorOptions, type FieldNormValues } from '../norms/field-errors.ts';
import { interpolate, lagrangeField } from '../fem/field/lagrange-field.ts';
import { interpolateVector, vectorLagrangeField } from '../fem/field/vector-field.ts';
import type { PointData } from '../fem/form/terms/types.ts';
import type { DiscreteField, ExactField, ExactSolution, NormValues } from '../norms/types.ts';
import type { ExternalLevelRun, VtkSystemField } from '../external/index.ts';
import type { PresetName } from '../equation/types.ts';
import type { LevelResult } from './result.ts';
import type { LevelErrorCells } from './where.ts';
import { levelRuns, readSolutionFile, solutionSeries, SOLUTION_FILES, type ReadOutputOptions } from '../external/output.ts';
import { outputLimit } from '../external/vtk/limits.ts';
import { levelLabel } from '../external/where.ts';
import { firstComponent, scalarOf } from './discretizations/system-common.ts';
import { TIME_NORMS } from './discretizations/system-norms.ts';
import { timeNormSums } from './discretizations/time-norms.ts';
import { inverseLambdaPressureNorms, shearEnergyOptions } from './discretizations/mixed-elasticity.ts';

/** What rungs needs to measure the fields of a system read from VTK: the exact field of each, which are mean-free,
 *  and the preset with its Lamé coefficients for the elasticity energy norms. */
export interface SystemMeasure {
  exact: Readonly<Record<string, ExactField>>;
  /** Fields fixed only up to a constant (their norms are those of the error less its mean). */
  meanFree: readonly string[];
  preset?: PresetName;
  /** A pde with one scalar field names its norms without a suffix (L2, H1semi, …); otherwise L2_u, L2_p, …. */
  lone: boolean;
  /** λ and μ of the elasticity presets. */
  lambda?: PointData;
  mu?: PointData;
}

export interface ExternalResultOptions {
  /** 0-based level index and ladder parameter. */
  index: number;
  n: number | null;
  /** The exact solution; absent for a study that reports only quantities of interest. */
  exact?: ExactSolution;
  norms: readonly string[];
  /** Conductivity / reaction for the energy norm, and an optional quadrature degree. */
  errorOptions?: ErrorOptions;
  /** Also measure the nodal interpolant on the solver's nodes (VTK protocol; default true). */
  interpolation?: boolean;
  /** Symmetric problem: report ||u − u_h||_E / ||u − I_h u||_E (Céa's lemma bounds it by 1). */
  symmetric?: boolean;
  /** The fields of a system (VTK output read with fields). */
  system?: SystemMeasure;
  /** A study with time whose norms include the norms over time (TIME_NORMS): the code's series of VTK files. */
  overTime?: SeriesMeasure;
}

/** What measures the norms over time of a lone scalar field from the solver's series of VTK files, one per time level
 *  (src/external/output.ts SERIES_FILE): every file against u(·, t_k), t_k = k·Δt, the last one (k = steps) being the
 *  file already read for the final time. */
export interface SeriesMeasure {
  steps: number;
  dt: number;
  /** The exact field at time t. */
  exactAt(t: number): ExactField;
  /** How each file is read: as the file of the final time (the study, level, degree, array, size limit). */
  read: Pick<ReadOutputOptions, 'level' | 'degree' | 'field' | 'fields' | 'maxOutputBytes'>;
}

/** A LevelResult row for an external level, and the quantities the solver reported. */
export function externalLevelResult(level: ExternalLevelRun, opts: ExternalResultOptions): { level: LevelResult; quantities: Record<string, number>; errorCells?: LevelErrorCells } {
  const out = level.output;
  const pick = (v: Record<string, number>) => Object.fromEntries(opts.norms.map((nm) => [nm, v[nm]!]));
  const t = performance.now();
  let errors: Record<string, number>;
  let interpolationErrors: Record<string, number> | undefined;
  let quasiOptimality: number | null = null;
  let cells: number;
  let errorCells: LevelErrorCells | undefined;
  if (out.kind === 'errors') {
    // The code's own errors, under the norm names the study declares (built-in names or its own).
    errors = pick(out.errors);
    cells = out.cells ?? Number.NaN;
  } else if (out.kind === 'fields') {
    cells = out.mesh.nCells;
    if (!opts.system) throw new Error('internal: the fields of a system were read without what measures them');
    const m = systemErrors(out.fields, opts.system, opts.interpolation ?? true);
    if (m.cells) errorCells = { ...m.cells, mesh: out.mesh };
    if (opts.overTime && opts.norms.some((nm) => TIME_NORMS.includes(nm))) {
      Object.assign(m.errors, seriesNorms(out.file, out.fields, opts.overTime));
      if (m.interpolation) Object.assign(m.interpolation, { Linf_L2: Number.NaN, L2_H1: Number.NaN });
    }
    errors = pick(m.errors);
    interpolationErrors = m.interpolation ? pick(m.interpolation) : undefined;
    quasiOptimality = m.quasiOptimality;
  } else if (!opts.exact) {
    errors = {};
    cells = out.mesh.nCells;
  } else {
    const exact = opts.exact;
    // The errors per cell of the code's own mesh, in the same pass (src/study/where.ts; the totals are the same bits).
    const perCell = perCellArrays(out.mesh.nCells);
    const errs: NormValues = errorNorms(out.field, exact, { ...opts.errorOptions, perCell });
    errorCells = { perCell, field: out.field, exact: exact.u, norms: { L2: 'L2', H1semi: 'H1semi' }, mesh: out.mesh };
    errors = pick(errs as unknown as Record<string, number>);
    cells = out.mesh.nCells;
    if (opts.interpolation ?? true) {
      const interp = errorNorms(lagrangeField(out.space, interpolate(out.space, exact.u)), exact, opts.errorOptions);
      interpolationErrors = pick(interp as unknown as Record<string, number>);
      if (opts.symmetric && interp.energy > 0) quasiOptimality = errs.energy / interp.energy;
    }
  }
  const tErrors = (performance.now() - t) / 1e3;
  return {
    level: {
      index: opts.index,
      n: opts.n,
      h: out.h,
      dofs: out.dofs,
      cells,
      errors,
      interpolationErrors,
      quasiOptimality,
      solver: null,
      seconds: { mesh: 0, assemble: 0, solve: level.seconds.solve, read: level.seconds.read, errors: tErrors, total: level.seconds.solve + level.seconds.read + tErrors },
    },
    quantities: { ...out.quantities },
    errorCells,
  };
}

/**
 * The norms of a system's fields as rungs's own elements measure them (src/study/discretizations/elasticity.ts,
 * stokes.ts, mixed-elasticity.ts): per field the L2, H1 seminorm, H1 and largest nodal errors, the divergence of a
 * vector field, mean-free norms for a mean-free field (the two-pass integral of fieldErrors), the energy norm of
 * linear elasticity (with its Céa ratio against the interpolant) and the mixed energy norm of nearly incompressible
 * elasticity; each field with the same quadrature as the built-in route (2k + ERROR_RULE_EXTRA for its own degree k).
 * The interpolants are those of the exact fields on the file's own nodes, in each field's own space (a pressure read
 * from the corners: its P1 interpolant).
 */
export function systemErrors(
  fields: readonly VtkSystemField[], sys: SystemMeasure, withInterpolant: boolean,
): { errors: Record<string, number>; interpolation: Record<string, number> | null; quasiOptimality: number | null; cells: LevelErrorCells } {
  const errors: Record<string, number> = {};
  // Where the first field's error lives (src/study/where.ts), from the same cell sums as its totals (same bits).
  const first = fields[0]!;
  const nCells = first.field.mesh.nCells;
  const perCell = perCellArrays(nCells);
  const firstSuffix = sys.lone ? '' : `_${first.name}`;
  const firstExactField = sys.exact[first.name]!;
  const firstExact = (x: number, y: number, z: number, o: Float64Array) => firstExactField.value(x, y, z, o);
  const cells: LevelErrorCells = {
    perCell, field: first.field,
    exact: first.kind === 'scalar' ? scalarOf(firstExact) : firstComponent(firstExact, first.components),
    norms: { L2: `L2${firstSuffix}`, H1semi: `H1semi${firstSuffix}` },
  };
  const interp: Record<string, number> = {};
  const interpolants = new Map<string, DiscreteField>();
  const elastic = sys.preset === 'linear-elasticity' || sys.preset === 'nearly-incompressible-elasticity';
  let energyU: [number, number] | null = null;
  for (const f of fields) {
    const exact = sys.exact[f.name];
    if (!exact) throw new Error(`internal: no exact field for ${f.name}`);
    const opts: FieldErrorOptions = { meanFree: sys.meanFree.includes(f.name) };
    if (f === first) opts.perCell = perCell;
    if (f.kind === 'vector') opts.divergence = true;
    if (elastic && f.name === 'u') {
      if (!sys.lambda || !sys.mu) throw new Error('internal: the elasticity norms need λ and μ');
      opts.elasticity = sys.preset === 'linear-elasticity' ? { lambda: scalarOf(sys.lambda), mu: scalarOf(sys.mu) } : shearEnergyOptions(sys.mu);
    }
    const list = [f.field];
    if (withInterpolant) {
      const i = f.kind === 'scalar'
        ? lagrangeField(f.space, interpolate(f.space, scalarOf(exact.value)))
        : vectorLagrangeField(f.space, f.components, interpolateVector(f.space, f.components, exact.value));
      interpolants.set(f.name, i);
      list.push(i);
    }
    const [e, i] = fieldErrors(list, exact, opts);
    const suffix = sys.lone ? '' : `_${f.name}`;
    name(errors, e!, suffix);
    if (i) name(interp, i, suffix);
    if (elastic && f.name === 'u') energyU = [e!.energy!, i?.energy ?? Number.NaN];
  }
  let quasiOptimality: number | null = null;
  if (sys.preset === 'linear-elasticity' && energyU) {
    errors.energy = energyU[0];
    interp.energy = energyU[1];
    // Céa's lemma in the energy norm (Braess 2007, ch. II §4): the Galerkin solution is the best approximation.
    quasiOptimality = withInterpolant && energyU[1] > 0 ? energyU[0] / energyU[1] : null;
  } else if (sys.preset === 'nearly-incompressible-elasticity' && energyU) {
    // (∫ 2μ ε(e_u):ε(e_u) + (1/λ) e_p²)^(1/2), as mixed-elasticity.ts measures it; no Céa ratio (indefinite system).
    const p = fields.find((f) => f.name === 'p');
    if (p && sys.lambda) {
      const list = withInterpolant ? [p.field, interpolants.get('p')!] : [p.field];
      const [pw, ipw] = inverseLambdaPressureNorms(list, sys.exact.p!, sys.lambda);
      errors.energy = Math.sqrt(energyU[0] * energyU[0] + pw! * pw!);
      interp.energy = ipw !== undefined ? Math.sqrt(energyU[1] * energyU[1] + ipw * ipw) : Number.NaN;
    }
  }
  return { errors, interpolation: withInterpolant ? interp : null, quasiOptimality, cells };
}

function name(into: Record<string, number>, v: FieldNormValues, suffix: string): void {
  into[`L2${suffix}`] = v.L2;
  into[`H1semi${suffix}`] = v.H1semi;
  into[`H1${suffix}`] = v.H1;
  into[`maxNodal${suffix}`] = v.maxNodal;
  if (v.div !== undefined) into[`div${suffix}`] = v.div;
}

/**
 * Linf_L2 and L2_H1 of a lone scalar field from the series of VTK files in the level folder of `finalFile`, with the
 * same sums as rungs's own heat stepper (time-norms.ts): time level k = 0 … steps read one file at a time, measured
 * against u(·, k·Δt) with fieldErrors' default rule (as heat.ts measures its own levels) and dropped before the next
 * is read; level `steps` is the field already read for the final time. A series with a gap, or a single solution file,
 * is refused naming the level folder, the missing time levels and what to write.
 */
export function seriesNorms(finalFile: string, finalFields: readonly VtkSystemField[], m: SeriesMeasure): { Linf_L2: number; L2_H1: number } {
  const dir = dirname(finalFile);
  const series = solutionSeries(dir, m.steps, m.read.level);
  const label = levelLabel(m.read.level);
  const asked = `the study measures the norms over time (${TIME_NORMS.join(', ')}), which need the solution at every time level`;
  const howTo = `write solution-<k>.vtk (or .vtu) for every time level t_k = k·Δt, k = 0 … ${m.steps} (Δt = ${m.dt}), ` +
    `k = 0 the initial data and k = ${m.steps} the final time`;
  if (!series) {
    throw new RungsInputError(
      `${label}: ${dir}: ${asked}, but the solver wrote only the final time (${basename(finalFile)}); ${howTo}, in place of ${SOLUTION_FILES.join(' / ')}`,
      dir,
    );
  }
  if (series.missing.length) {
    throw new RungsInputError(
      `${label}: ${dir}: ${asked}, but the series lacks time level${series.missing.length > 1 ? 's' : ''} ${levelRuns(series.missing)} ` +
        `of 0 … ${m.steps}; ${howTo}`,
      dir,
    );
  }
  if (finalFields.length !== 1 || finalFields[0]!.kind !== 'scalar') throw new Error('internal: the norms over time are measured for one scalar field');
  const sums = timeNormSums(m.dt);
  const limit = outputLimit(m.read.maxOutputBytes);
  for (let k = 0; k <= m.steps; k++) {
    let field: DiscreteField;
    if (k === m.steps) {
      field = finalFields[0]!.field;
    } else {
      const content = readSolutionFile(join(dir, series.files[k]!), m.read, limit);
      field = 'system' in content ? content.system.fields[0]!.field : content.field;
    }
    const [e] = fieldErrors([field], m.exactAt(k * m.dt));
    sums.add(k, e!);
  }
  return sums.values();
}
