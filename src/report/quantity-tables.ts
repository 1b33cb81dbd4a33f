// The quantities of interest as plain rows of text, shared by the terminal, Markdown, LaTeX and HTML writers so that a
// number reads the same everywhere: the GCI from the three finest levels, the least-squares uncertainty over every
// level, Roy's mixed-order fit, and one interval statement per quantity in the style of ASME V&V 20-2009.
import type { QuantityReport } from '../analysis/quantities.ts';
import { describeFit, type UncertaintyInterval } from '../analysis/least-squares-uncertainty.ts';
import { fixed, intervalText } from './numbers.ts';

/** Shown beside every table of uncertainties that a reader might take for a margin. */
export const QUANTITY_CAUTION =
  'These intervals estimate the numerical (discretization) uncertainty of the computed values only. Verifying a code ' +
  'or a solution is not validating a model: they say nothing about whether the equations describe the physical system, ' +
  'and engineering decisions about a structure, a component or a safety margin follow local codes and licensed practice.';

export interface TextTable {
  title: string;
  header: string[];
  rows: string[][];
  /** One line under the table explaining symbols. */
  legend: string;
}

const dash = '—';
export const sig = (x: number | null | undefined, digits = 7): string =>
  x === null || x === undefined || !Number.isFinite(x) ? dash : Number(x.toPrecision(digits)).toString();
const pct = (x: number | null | undefined): string => (x === null || x === undefined || !Number.isFinite(x) ? dash : `${(100 * x).toPrecision(3)}%`);
const short = (x: number): string => (Number.isFinite(x) ? Number(x.toPrecision(3)).toString() : dash);

/**
 * "1.0432 ± 0.0021": U with two significant digits and the value to the same last digit (GUM, JCGM 100:2008, 7.2.6);
 * in exponent form when the value is very large or small.
 */
export function plusMinus(value: number, uncertainty: number): string {
  if (!Number.isFinite(value) || !Number.isFinite(uncertainty)) return `${sig(value)} ± ${sig(uncertainty)}`;
  if (uncertainty === 0) return `${sig(value)} ± 0`;
  // Below about 1e-12 of the value, U is round-off: the value keeps its own digits.
  if (Math.abs(uncertainty) < 1e-12 * Math.abs(value)) return `${sig(value)} ± ${uncertainty.toExponential(1)}`;
  const decimals = 1 - Math.floor(Math.log10(Math.abs(uncertainty)));
  const big = Math.max(Math.abs(value), Math.abs(uncertainty));
  if (decimals >= 0 && decimals <= 10 && big < 1e7 && big >= 1e-4) return `${value.toFixed(decimals)} ± ${uncertainty.toFixed(decimals)}`;
  return `${value.toExponential(Math.max(1, Math.floor(Math.log10(Math.abs(value) || 1)) + decimals))} ± ${uncertainty.toExponential(1)}`;
}

/** The interval a quantity is best stated with: least squares when it ran, else the GCI, else the mixed-order fit. */
export function quantityInterval(q: QuantityReport): UncertaintyInterval | null {
  if (q.leastSquares) return q.leastSquares.finest;
  if (q.gci !== null && Number.isFinite(q.gci)) {
    const U = q.gci * Math.abs(q.finest);
    const grids = q.levelsUsed.length === 3 ? 'three finest levels' : 'two finest levels, assumed order';
    return { value: q.finest, uncertainty: U, low: q.finest - U, high: q.finest + U, coverage: 0.95, basis: `GCI (Celik et al. 2008), ${grids}, Fs = ${q.safetyFactor}` };
  }
  return q.mixedOrder?.finest ?? null;
}

/** "heat_flux = 1.0432 ± 0.0021 on the finest level (U_num, 95% coverage intended; least squares …)". */
export function intervalStatement(name: string, iv: UncertaintyInterval): string {
  return `${name} = ${plusMinus(iv.value, iv.uncertainty)} on the finest level (U_num, ${Math.round(100 * iv.coverage)}% coverage intended; ${iv.basis})`;
}

export function gciTable(reports: readonly QuantityReport[]): TextTable {
  const order = (q: QuantityReport): string => (q.order === null ? dash : `${q.order.toFixed(2)}${q.orderKind === 'assumed' ? ' (assumed)' : ''}`);
  const grids = Math.max(...reports.map((q) => q.levelsUsed.length));
  return {
    title: `Grid convergence index from the ${grids === 3 ? 'three' : 'two'} finest levels (Celik et al. 2008)`,
    header: ['quantity', 'finest value', 'order', 'extrapolated', 'e_a', 'e_ext', 'GCI', 'Fs', 'convergence'],
    rows: reports.map((q) => [
      q.name, sig(q.finest), order(q), sig(q.extrapolated), pct(q.approxRelError), pct(q.extrapolatedRelError), pct(q.gci),
      String(q.safetyFactor), q.convergence,
    ]),
    legend: 'e_a = |φ1 − φ2| / |φ1|, e_ext = |φ_ext − φ1| / |φ_ext|, GCI = Fs·e_a / (r^p − 1) on the finest level',
  };
}

export function leastSquaresTable(reports: readonly QuantityReport[]): TextTable | null {
  const qs = reports.filter((q) => q.leastSquares);
  if (qs.length === 0) return null;
  return {
    title: 'Least-squares uncertainty over every level (Eça & Hoekstra 2014)',
    header: ['quantity', 'levels', 'error model', 'p [95% CI]', 'φ0', 'U_s', 'Δφ', 'Fs', 'data', 'finest ± U'],
    rows: qs.map((q) => {
      const ls = q.leastSquares!;
      const ci = ls.orderInterval ? ` ${intervalText(ls.orderInterval[0], ls.orderInterval[1])}` : '';
      return [
        q.name, String(ls.values.length), describeFit(ls.chosen), ls.observedOrder === null ? dash : `${fixed(ls.observedOrder)}${ci}`,
        sig(ls.chosen.extrapolated), short(ls.chosen.std), short(ls.dataRange), String(ls.safetyFactor), ls.convergence,
        plusMinus(ls.finest.value, ls.finest.uncertainty),
      ];
    }),
    legend: 'U_i = Fs|ε_i| + U_s + |φ_i − φ_fit| when U_s < Δφ, else 3(U_s/Δφ)(|ε_i| + U_s + |φ_i − φ_fit|); U_s the standard deviation of the fit, Δφ = (φ_max − φ_min)/(n − 1)',
  };
}

/** Per level of one quantity: value, fitted value, fitted error and U (coarse to fine, levels numbered from 1). */
export function leastSquaresLevelTable(q: QuantityReport): TextTable | null {
  const ls = q.leastSquares;
  if (!ls) return null;
  return {
    title: `${q.name}: uncertainty of every level`,
    header: ['level', 'h', 'value', 'fitted', 'ε (fitted error)', 'U', 'U / |value|', 'value ± U'],
    rows: ls.values.map((v, i) => [
      String(i + 1), short(ls.h[i]!), sig(v), sig(ls.chosen.fitted[i]), short(ls.errors[i]!), short(ls.uncertainty[i]!),
      v === 0 ? dash : pct(ls.uncertainty[i]! / Math.abs(v)), plusMinus(v, ls.uncertainty[i]!),
    ]),
    legend: 'levels are those that reported the quantity, coarse to fine',
  };
}

export function mixedOrderTable(reports: readonly QuantityReport[]): TextTable | null {
  const qs = reports.filter((q) => q.mixedOrder);
  if (qs.length === 0) return null;
  return {
    title: 'Mixed first/second-order fit φ = φ0 + g1·h + g2·h² through the three finest levels (Roy 2003)',
    header: ['quantity', 'φ0', 'g1', 'g2', 'first-order share', 'finest ± U'],
    rows: qs.map((q) => {
      const m = q.mixedOrder!;
      return [q.name, sig(m.extrapolated), sig(m.g1, 4), sig(m.g2, 4), pct(m.firstOrderShare), plusMinus(m.finest.value, m.finest.uncertainty)];
    }),
    legend: 'first-order share = |g1 h1| / (|g1 h1| + |g2 h1²|) on the finest level; U = 1.25 |φ1 − φ0|',
  };
}

/** Every table for a set of quantities, in reading order. */
export function quantityTables(reports: readonly QuantityReport[], perLevel = true): TextTable[] {
  if (reports.length === 0) return [];
  const out: TextTable[] = [gciTable(reports)];
  const ls = leastSquaresTable(reports);
  if (ls) out.push(ls);
  if (perLevel) for (const q of reports) { const t = leastSquaresLevelTable(q); if (t) out.push(t); }
  const mixed = mixedOrderTable(reports);
  if (mixed) out.push(mixed);
  return out;
}

/** One interval statement per quantity (ASME V&V 20-2009 style: value ± U with the coverage stated). */
export function quantityStatements(reports: readonly QuantityReport[]): string[] {
  return reports.flatMap((q) => {
    const iv = quantityInterval(q);
    return iv ? [intervalStatement(q.name, iv)] : [`${q.name}: no uncertainty could be formed (${q.warnings[0] ?? 'too few levels'})`];
  });
}
