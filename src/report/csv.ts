import { stringify } from 'csv-stringify/sync';
import type { StudyResult } from '../study/result.ts';
import { levelNumber } from './numbers.ts';
import { analysisOf, interpolatedNorms, normNames, rateAt } from './series.ts';
import { hasTime } from './time.ts';
import { normOutcomes } from './verdict.ts';

type Cell = string | number | boolean | null | undefined;

/** A text cell that is a plain decimal number ("-0.5", "1e-5") cannot start a formula and is left as it is. */
const PLAIN_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
/** Characters that make a spreadsheet read a cell as a formula (OWASP, "CSV Injection"). */
const FORMULA_START = /^[=+\-@\t\r]/;

/**
 * A text cell (study name, norm, verdict, reasons, labels) that a spreadsheet would run as a formula gets a leading
 * single quote, as the OWASP CSV-injection guidance advises; csv-stringify then quotes it when it holds a comma, a
 * quote or a line break. Numbers are never touched: they are written by `cell` as numbers.
 */
export function neutraliseCsvText(text: string): string {
  return FORMULA_START.test(text) && !PLAIN_NUMBER.test(text) ? `'${text}` : text;
}

/** Numbers as JavaScript prints them (shortest round-trip form); NaN and absent values become empty cells; text is
 *  neutralised against formula injection (neutraliseCsvText). */
function cell(value: Cell): string {
  if (value === null || value === undefined) return '';
  if (typeof value === 'number') return Number.isNaN(value) ? '' : String(value);
  if (typeof value === 'boolean') return String(value);
  return neutraliseCsvText(value);
}

function toCsv(header: string[], rows: Cell[][]): string {
  // Headers hold norm and quantity names, which come from the study or the fitted table: text like any other.
  return stringify([header.map(neutraliseCsvText), ...rows.map((r) => r.map(cell))], { record_delimiter: 'unix' });
}

const BYTES_PER_MIB = 1024 * 1024;

/**
 * One row per level of one study. Columns, in order:
 * - `level` 1-based level number; `n` ladder parameter (cells per unit side, empty when the ladder is given by h);
 *   `h` mesh size; for a study with time only: `steps` the number of equal time steps over [0, T] and `dt` their
 *   size Δt = T/steps; `dofs` degrees of freedom; `cells` mesh cells
 * - per norm, in the study's order: `<norm>_error` error in that norm, `<norm>_rate` observed order between the
 *   previous level and this one (empty on the first level; against Δt when the ladder refines Δt)
 * - per norm that has interpolation errors on some level: `<norm>_interp_error` error of the nodal interpolant
 * - `quasi_optimality` ||u-u_h||_E / ||u-I_h u||_E (empty when not computed)
 * - `solver_method`, `solver_preconditioner`, `solver_iterations`, `solver_residual` (final relative residual),
 *   `solver_stopped_by` (residual, stopWhen — the algebraic error reached its target —, maxIter, breakdown, stagnation
 *   or direct)
 * - `algebraic_error` CG's estimate of the energy norm of the algebraic error, `algebraic_target` the bound it had to
 *   reach (a fraction, default 1e-3, of the interpolation error); empty when not computed
 * - `t_mesh`, `t_assemble`, `t_solve`, `t_errors`, `t_total` wall seconds per phase
 * - `peak_rss_mb` peak resident set size in mebibytes (2^20 bytes), empty when not measured
 * Numbers are written as JavaScript prints them (full precision); NaN and missing values are empty cells;
 * infinities are written `Infinity` / `-Infinity`. Text cells starting with = + - @, a tab or a carriage return get a
 * leading single quote (neutraliseCsvText).
 */
export function levelsCsv(result: StudyResult): string {
  const norms = normNames(result);
  const interpolated = interpolatedNorms(result);
  const phases = ['mesh', 'assemble', 'solve', 'errors', 'total'];
  // Steady studies keep exactly the columns they always had.
  const time = hasTime(result);
  const header = [
    'level',
    'n',
    'h',
    ...(time ? ['steps', 'dt'] : []),
    'dofs',
    'cells',
    ...norms.flatMap((n) => [`${n}_error`, `${n}_rate`]),
    ...interpolated.map((n) => `${n}_interp_error`),
    'quasi_optimality',
    'solver_method',
    'solver_preconditioner',
    'solver_iterations',
    'solver_residual',
    'solver_stopped_by',
    'algebraic_error',
    'algebraic_target',
    ...phases.map((p) => `t_${p}`),
    'peak_rss_mb',
  ];
  const rows = result.levels.map((level, i): Cell[] => [
    levelNumber(level.index),
    level.n,
    level.h,
    ...(time ? [level.steps, level.dt] : []),
    level.dofs,
    level.cells,
    ...norms.flatMap((n) => [level.errors[n], rateAt(result, n, i)]),
    ...interpolated.map((n) => level.interpolationErrors?.[n]),
    level.quasiOptimality,
    level.solver?.method,
    level.solver?.preconditioner,
    level.solver?.iterations,
    level.solver?.relativeResidual,
    level.solver?.stoppedBy,
    level.algebraic?.estimate,
    level.algebraic?.target,
    ...phases.map((p) => level.seconds[p]),
    level.peakRssBytes === undefined ? undefined : level.peakRssBytes / BYTES_PER_MIB,
  ]);
  return toCsv(header, rows);
}

/** Columns of summaryCsv, in order. */
export const SUMMARY_COLUMNS = [
  'study',
  'norm',
  'expected',
  'fitted',
  'ci_low',
  'ci_high',
  'stderr',
  'fit_levels',
  'tolerance',
  'floor_from',
  'verdict',
  'expected_verdict',
  'as_expected',
  'reasons',
] as const;

/** Columns summaryCsv adds after SUMMARY_COLUMNS when some study of the run has time. */
export const SUMMARY_TIME_COLUMNS = [
  'axis',
  'space_expected',
  'space_order',
  'space_ci_low',
  'space_ci_high',
  'space_verdict',
  'time_expected',
  'time_order',
  'time_ci_low',
  'time_ci_high',
  'time_verdict',
] as const;

/**
 * One row per study and analysed norm. Columns: `study`; `norm`; `expected` expected order (empty when none);
 * `fitted` fitted order; `ci_low`, `ci_high` its 95% confidence interval; `stderr` its standard error (empty with two
 * points); `fit_levels` 1-based levels used in the fit, space-separated; `tolerance` allowed |fitted - expected|;
 * `floor_from` first 1-based level on an error floor (empty when none); `verdict`; `expected_verdict` what the study
 * declared for this norm; `as_expected` true/false; `reasons` the analysis' reasons joined with '; '.
 * When some study of the run has time, SUMMARY_TIME_COLUMNS follow (empty for a steady study): `axis` what the
 * ladder refines (h, dt, coupled, grid; the fitted order above is in that variable, in h for a coupled path); for a
 * two-axis design the joint fit e = C_h h^p + C_t Δt^q: `space_expected`, `space_order` p, `space_ci_low`,
 * `space_ci_high` its 95% interval, `space_verdict`, and the same for q as `time_*`; its reasons are in `reasons`.
 */
export function summaryCsv(results: readonly StudyResult[]): string {
  const rows: Cell[][] = [];
  const withTime = results.some(hasTime);
  for (const result of results) {
    for (const o of normOutcomes(result)) {
      const a = analysisOf(result, o.norm)!;
      const fit = a.fit;
      const joint = o.twoAxis;
      const reasons = joint ? [...joint.reasons, ...a.reasons.filter((r) => !joint.reasons.includes(r))] : a.reasons;
      const timeCells: Cell[] = !withTime
        ? []
        : [
            result.time?.axis,
            joint?.expected.space,
            joint?.fit?.p,
            joint?.fit?.pInterval[0],
            joint?.fit?.pInterval[1],
            joint?.verdict.space,
            joint?.expected.time,
            joint?.fit?.q,
            joint?.fit?.qInterval[0],
            joint?.fit?.qInterval[1],
            joint?.verdict.time,
          ];
      rows.push([
        result.study,
        o.norm,
        a.expected,
        fit?.order,
        fit?.ciLow,
        fit?.ciHigh,
        fit?.stderr,
        fit?.levels.map(levelNumber).join(' '),
        a.tolerance,
        a.floorFrom === null ? null : levelNumber(a.floorFrom),
        a.verdict,
        o.expectedVerdict,
        o.asExpected,
        reasons.join('; '),
        ...timeCells,
      ]);
    }
  }
  return toCsv([...SUMMARY_COLUMNS, ...(withTime ? SUMMARY_TIME_COLUMNS : [])], rows);
}

/** Columns of quantitiesCsv, in order. */
export const QUANTITY_COLUMNS = [
  'quantity', 'level', 'h', 'value',
  'ls_fitted', 'ls_error', 'ls_uncertainty', 'ls_low', 'ls_high',
  'gci_order', 'gci_extrapolated', 'gci', 'gci_uncertainty', 'gci_safety_factor', 'gci_convergence',
  'ls_model', 'ls_weighted', 'ls_order', 'ls_order_low', 'ls_order_high', 'ls_extrapolated', 'ls_std', 'ls_data_range',
  'ls_safety_factor', 'ls_convergence',
  'mixed_extrapolated', 'mixed_g1', 'mixed_g2', 'mixed_uncertainty',
  'coverage',
] as const;

/**
 * One row per quantity and level, coarse to fine. Per level: `quantity`; `level` 1-based among the levels that reported
 * the quantity; `h`; `value`; `ls_fitted` the least-squares fit there, `ls_error` its fitted error φ_fit − φ0,
 * `ls_uncertainty` U of that level, `ls_low`, `ls_high` = value ∓ U. Per quantity (the same on each of its rows):
 * `gci_order`, `gci_extrapolated`, `gci` (fraction of the finest value), `gci_uncertainty` (= gci · |finest value|),
 * `gci_safety_factor`, `gci_convergence` of the three finest levels (Celik et al. 2008); `ls_model` (observed, first,
 * second, first-second), `ls_weighted`, `ls_order` and its 95% interval `ls_order_low`, `ls_order_high`,
 * `ls_extrapolated` φ0, `ls_std` U_s, `ls_data_range` Δφ, `ls_safety_factor`, `ls_convergence` of the least-squares
 * procedure (Eça & Hoekstra 2014; empty with fewer than four levels); `mixed_extrapolated`, `mixed_g1`, `mixed_g2`,
 * `mixed_uncertainty` of Roy's mixed-order fit (2003) through the three finest levels; `coverage` 0.95, the coverage
 * the intervals aim at. Empty without quantities.
 */
export function quantitiesCsv(result: StudyResult): string {
  const rows: Cell[][] = [];
  for (const q of result.quantities ?? []) {
    const ls = q.leastSquares ?? null;
    const m = q.mixedOrder ?? null;
    const shared: Cell[] = [
      q.order, q.extrapolated, q.gci, q.gci === null ? null : q.gci * Math.abs(q.finest), q.safetyFactor, q.convergence,
      ls?.chosen.model, ls?.chosen.weighted, ls?.observedOrder, ls?.orderInterval?.[0], ls?.orderInterval?.[1], ls?.chosen.extrapolated,
      ls?.chosen.std, ls?.dataRange, ls?.safetyFactor, ls?.convergence,
      m?.extrapolated, m?.g1, m?.g2, m?.finest.uncertainty,
      0.95,
    ];
    q.values.forEach((v, i) => {
      const U = ls?.uncertainty[i];
      rows.push([
        q.name, i + 1, q.h[i], v,
        ls?.chosen.fitted[i], ls?.errors[i], U, U === undefined ? undefined : v - U, U === undefined ? undefined : v + U,
        ...shared,
      ]);
    });
  }
  return toCsv([...QUANTITY_COLUMNS], rows);
}
