// Solution verification of a quantity of interest without an exact solution: the grid convergence index of
// Celik, Ghia, Roache, Freitas, Coleman & Raad (2008), J. Fluids Eng. 130(7) 078001, from the three finest levels,
// with Roache's safety factors (1998: 1.25 for three or more grids; 3 for two grids with an assumed order); with four
// or more levels the least-squares uncertainty of Eça & Hoekstra (2014) for every level, and from three levels Roy's
// (2003) mixed first/second-order fit.
import { RungsInputError } from '../errors.ts';
import {
  gciTwoGrids, gridConvergenceIndex, MIN_REFINEMENT_RATIO, SAFETY_FACTOR_THREE_GRIDS, SAFETY_FACTOR_TWO_GRIDS, type ConvergenceKind,
} from './gci.ts';
import { leastSquaresUncertainty, MIN_LEVELS_LEAST_SQUARES, type LeastSquaresUncertainty } from './least-squares-uncertainty.ts';
import { mixedOrderFit, MIN_LEVELS_MIXED_ORDER, type MixedOrderFit } from './mixed-order.ts';
import { richardsonExtrapolate } from './richardson.ts';

/** The solution-verification procedures for a quantity, and how many levels each needs. */
export type QuantityProcedure = 'gci' | 'least-squares' | 'mixed-order';
export const QUANTITY_PROCEDURES: readonly QuantityProcedure[] = ['gci', 'least-squares', 'mixed-order'];
export const MIN_LEVELS: Readonly<Record<QuantityProcedure, number>> = {
  gci: 2, 'least-squares': MIN_LEVELS_LEAST_SQUARES, 'mixed-order': MIN_LEVELS_MIXED_ORDER,
};
export const PROCEDURE_TITLES: Readonly<Record<QuantityProcedure, string>> = {
  gci: 'the grid convergence index (Celik et al. 2008)',
  'least-squares': 'the least-squares uncertainty (Eça & Hoekstra 2014)',
  'mixed-order': 'the mixed-order fit (Roy 2003)',
};

/** "--uncertainty" text: "gci,least-squares" → the procedures; unknown names are a RungsInputError naming the valid ones. */
export function parseProcedures(text: string, option = '--uncertainty'): QuantityProcedure[] {
  const names = text.split(',').map((s) => s.trim()).filter(Boolean);
  if (names.length === 0) throw new RungsInputError(`${option}: name one or more of ${QUANTITY_PROCEDURES.join(', ')}`, option);
  for (const n of names) {
    if (!(QUANTITY_PROCEDURES as readonly string[]).includes(n)) {
      throw new RungsInputError(`${option}: unknown procedure '${n}'; valid: ${QUANTITY_PROCEDURES.join(', ')}`, option);
    }
  }
  return [...new Set(names)] as QuantityProcedure[];
}

export interface QuantityReport {
  name: string;
  /** Values per level, coarse to fine, and the sizes they belong to. */
  values: number[];
  h: number[];
  /** 'h' from the table, or 'representative' (1/N)^(1/d) from dofs (Celik et al. 2008, eq. 1, volume 1). */
  sizeKind: 'h' | 'representative';
  /** Levels used, 0-based, finest first. */
  levelsUsed: number[];
  /** The finest value φ1. */
  finest: number;
  /** Order p: observed from three grids (eq. 3), or assumed for two; null when neither is available. */
  order: number | null;
  orderKind: 'observed' | 'assumed' | null;
  expected: number | null;
  /** φ_ext21 (eq. 4), e_a21 = |(φ1 − φ2)/φ1| and e_ext21 = |(φ_ext21 − φ1)/φ_ext21| (fractions). */
  extrapolated: number | null;
  approxRelError: number;
  extrapolatedRelError: number | null;
  /** GCI_fine21 = Fs e_a21 / (r21^p − 1) (fraction), and the same for grids 2–3 (three grids only). */
  gci: number | null;
  gci32: number | null;
  /** GCI32 / (r21^p GCI21), near 1 in the asymptotic range (Roache 1998); three grids only. */
  asymptoticRatio: number | null;
  safetyFactor: number;
  /** r21 (and r32 with three grids). */
  refinementRatios: number[];
  convergence: ConvergenceKind;
  oscillatory: boolean;
  /** A refinement ratio is below 1.3 (Celik et al. 2008 recommend more). */
  smallRatio: boolean;
  /** Eça & Hoekstra (2014) over every level (four or more), or null when not applied (see notApplied). */
  leastSquares?: LeastSquaresUncertainty | null;
  /** Roy (2003) through the three finest levels, or null when not applied. */
  mixedOrder?: MixedOrderFit | null;
  /** Procedures left out, each with the reason ("least squares: needs 4 levels, 3 given"). */
  notApplied?: string[];
  warnings: string[];
}

export interface QuantityOptions {
  /** Order for a two-grid GCI (Fs = 3), or to compare with the observed one. */
  expected?: number | null;
  /** Allowed |observed − expected| before a warning (default 0.1). */
  tolerance?: number;
  sizeKind?: 'h' | 'representative';
  /** Procedures asked for: each one must have the levels it needs (else RungsInputError). Default: every procedure
   *  the number of levels allows. */
  procedures?: readonly QuantityProcedure[];
}

/** GCI of one quantity over levels ordered coarse to fine (h decreasing). */
export function analyseQuantity(name: string, h: readonly number[], values: readonly number[], opts: QuantityOptions = {}): QuantityReport {
  const report = gciReport(name, h, values, opts);
  const n = values.length;
  const asked = opts.procedures;
  for (const p of asked ?? []) {
    if (n < MIN_LEVELS[p]) {
      throw new RungsInputError(`quantity '${name}': ${PROCEDURE_TITLES[p]} needs at least ${MIN_LEVELS[p]} levels; ${n} given`, name);
    }
  }
  const wants = (p: QuantityProcedure) => (asked ? asked.includes(p) : n >= MIN_LEVELS[p]);
  const notApplied: string[] = [];
  for (const p of ['least-squares', 'mixed-order'] as const) {
    if (!asked && n < MIN_LEVELS[p]) notApplied.push(`${PROCEDURE_TITLES[p]} needs at least ${MIN_LEVELS[p]} levels; ${n} given`);
  }
  report.leastSquares = wants('least-squares') ? leastSquaresUncertainty(h, values, { name }) : null;
  report.mixedOrder = wants('mixed-order') ? mixedOrderFit(h, values, name) : null;
  report.notApplied = notApplied;
  for (const w of report.leastSquares?.warnings ?? []) report.warnings.push(`least squares: ${w}`);
  for (const w of report.mixedOrder?.warnings ?? []) report.warnings.push(`mixed order: ${w}`);
  return report;
}

function gciReport(name: string, h: readonly number[], values: readonly number[], opts: QuantityOptions): QuantityReport {
  const n = values.length;
  if (n < 2 || h.length !== n) {
    throw new RungsInputError(`quantity '${name}': the grid convergence index needs at least 2 levels with one size each (got ${n} values, ${h.length} sizes)`, name);
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(values[i]!)) throw new RungsInputError(`quantity '${name}': level ${i + 1} value ${values[i]} is not finite`, name);
    if (!(h[i]! > 0) || (i > 0 && !(h[i]! < h[i - 1]!))) throw new RungsInputError(`quantity '${name}': sizes must be positive and decrease from level to level`, name);
  }
  const expected = opts.expected ?? null;
  const tolerance = opts.tolerance ?? 0.1;
  const base: Pick<QuantityReport, 'name' | 'values' | 'h' | 'sizeKind' | 'expected'> = { name, values: [...values], h: [...h], sizeKind: opts.sizeKind ?? 'h', expected };
  if (n >= 3) {
    const f = [values[n - 1]!, values[n - 2]!, values[n - 3]!];
    const s = [h[n - 1]!, h[n - 2]!, h[n - 3]!];
    const g = gridConvergenceIndex(f, s, SAFETY_FACTOR_THREE_GRIDS);
    const ok = Number.isFinite(g.order);
    const warnings = [...g.warnings];
    if (ok && expected !== null && Math.abs(g.order - expected) > tolerance) {
      warnings.push(`observed order ${g.order.toFixed(2)} differs from the expected ${expected} by more than ${tolerance}`);
    }
    return {
      ...base,
      levelsUsed: [n - 1, n - 2, n - 3],
      finest: f[0]!,
      order: ok ? g.order : null,
      orderKind: ok ? 'observed' : null,
      extrapolated: ok ? g.extrapolated21 : null,
      approxRelError: g.approxRelError21,
      extrapolatedRelError: ok ? g.extrapolatedRelError21 : null,
      gci: ok ? g.gciFine21 : null,
      gci32: ok ? g.gciFine32 : null,
      asymptoticRatio: ok ? g.asymptoticRatio : null,
      safetyFactor: g.safetyFactor,
      refinementRatios: [g.r21, g.r32],
      convergence: g.convergence,
      oscillatory: g.convergence === 'oscillatory',
      smallRatio: g.r21 < MIN_REFINEMENT_RATIO || g.r32 < MIN_REFINEMENT_RATIO,
      warnings,
    };
  }
  const [f1, f2] = [values[1]!, values[0]!];
  const r = h[0]! / h[1]!;
  const warnings: string[] = [];
  if (r < MIN_REFINEMENT_RATIO) warnings.push(`refinement ratio ${r.toFixed(3)} is below ${MIN_REFINEMENT_RATIO}`);
  const approx = Math.abs((f1 - f2) / f1);
  if (expected === null) {
    warnings.push('two levels: no observed order can be formed; give an expected order for this quantity (e.g. --expect NAME=2) for a two-grid GCI with Fs = 3');
    return {
      ...base, levelsUsed: [1, 0], finest: f1, order: null, orderKind: null, extrapolated: null, approxRelError: approx,
      extrapolatedRelError: null, gci: null, gci32: null, asymptoticRatio: null, safetyFactor: SAFETY_FACTOR_TWO_GRIDS,
      refinementRatios: [r], convergence: 'undetermined', oscillatory: false, smallRatio: r < MIN_REFINEMENT_RATIO, warnings,
    };
  }
  const ext = richardsonExtrapolate(f1, f2, r, expected);
  warnings.push(`two levels: the order ${expected} is assumed, not observed; the GCI uses the safety factor ${SAFETY_FACTOR_TWO_GRIDS}`);
  return {
    ...base, levelsUsed: [1, 0], finest: f1, order: expected, orderKind: 'assumed', extrapolated: ext, approxRelError: approx,
    extrapolatedRelError: Math.abs((ext - f1) / ext), gci: gciTwoGrids(f1, f2, r, expected), gci32: null, asymptoticRatio: null,
    safetyFactor: SAFETY_FACTOR_TWO_GRIDS, refinementRatios: [r], convergence: 'undetermined', oscillatory: false,
    smallRatio: r < MIN_REFINEMENT_RATIO, warnings,
  };
}
