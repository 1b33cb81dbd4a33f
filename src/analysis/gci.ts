// Grid convergence index following the procedure of Celik, Ghia, Roache, Freitas, Coleman & Raad (2008),
// "Procedure for Estimation and Reporting of Uncertainty Due to Discretization in CFD Applications",
// J. Fluids Eng. 130(7) 078001 (steps 1–5, eqs. 1–10), with Roache's safety factors (Roache 1998: 1.25 with
// three or more grids, 3 with two) and his asymptotic-range check GCI32 ≈ r^p GCI21.
import { RungsInputError } from '../errors.ts';
import { observedOrderThreeLevels, richardsonExtrapolate } from './richardson.ts';

/** Celik et al. (2008) recommend refinement ratios above 1.3 ("based on experience"). */
export const MIN_REFINEMENT_RATIO = 1.3;
export const SAFETY_FACTOR_THREE_GRIDS = 1.25;
export const SAFETY_FACTOR_TWO_GRIDS = 3;

/** Representative cell size h = (V/N)^(1/d) (Celik et al. 2008, eq. 1 with uniform cell volumes summed to V). */
export function representativeSize(volume: number, cells: number, dim: number): number {
  if (!(volume > 0) || !(cells > 0) || !(Number.isInteger(dim) && dim >= 1)) {
    throw new RungsInputError(`representative size needs volume > 0, cells > 0 and dim ≥ 1; got ${volume}, ${cells}, ${dim}`, 'gci');
  }
  return Math.pow(volume / cells, 1 / dim);
}

export type ConvergenceKind = 'monotone' | 'oscillatory' | 'divergent' | 'undetermined';

export interface GciResult {
  /** Representative sizes, finest first. */
  h: [number, number, number];
  r21: number;
  r32: number;
  /** Observed order (Celik et al. 2008, eq. 3); NaN when it cannot be formed. */
  order: number;
  iterations: number;
  orderMethod: 'fixed-point' | 'bisection' | 'none';
  /** Celik's R = ε21/ε32: 0 < R < 1 monotone convergence, R < 0 oscillatory, R > 1 divergence. */
  convergence: ConvergenceKind;
  /** φ_ext21 = (r21^p φ1 - φ2)/(r21^p - 1) and the same for grids 2–3. */
  extrapolated21: number;
  extrapolated32: number;
  /** e_a21 = |(φ1 - φ2)/φ1|, e_a32 = |(φ2 - φ3)/φ2| (fractions, not percent). */
  approxRelError21: number;
  approxRelError32: number;
  /** e_ext21 = |(φ_ext21 - φ1)/φ_ext21| (Celik's eq. 10b writes φ_ext^12 for the same value). */
  extrapolatedRelError21: number;
  /** GCI_fine21 = Fs e_a21 / (r21^p - 1), and GCI for grid 2 as the fine grid of the pair 2–3. */
  gciFine21: number;
  gciFine32: number;
  /** GCI32 / (r21^p GCI21): near 1 in the asymptotic range (Roache 1998). */
  asymptoticRatio: number;
  safetyFactor: number;
  warnings: string[];
}

/**
 * Three-grid GCI. `values` and `h` are finest first (φ1, φ2, φ3 and h1 < h2 < h3), as in Celik et al.
 */
export function gridConvergenceIndex(
  values: readonly [number, number, number] | readonly number[],
  h: readonly [number, number, number] | readonly number[],
  safetyFactor = SAFETY_FACTOR_THREE_GRIDS,
): GciResult {
  if (values.length !== 3 || h.length !== 3) {
    throw new RungsInputError(`GCI needs exactly three values and three sizes, finest first; got ${values.length} and ${h.length}`, 'gci');
  }
  const [f1, f2, f3] = values as [number, number, number];
  const [h1, h2, h3] = h as [number, number, number];
  if (!(h1 > 0 && h2 > h1 && h3 > h2)) {
    throw new RungsInputError(`GCI sizes must be positive and increase from the finest grid: got ${h1}, ${h2}, ${h3}`, 'gci');
  }
  if (![f1, f2, f3].every(Number.isFinite)) {
    throw new RungsInputError(`GCI values must be finite numbers: got ${f1}, ${f2}, ${f3}`, 'gci');
  }
  const r21 = h2 / h1;
  const r32 = h3 / h2;
  const warnings: string[] = [];
  if (r21 < MIN_REFINEMENT_RATIO || r32 < MIN_REFINEMENT_RATIO) {
    warnings.push(
      `refinement ratio below ${MIN_REFINEMENT_RATIO} (r21 = ${r21.toFixed(3)}, r32 = ${r32.toFixed(3)}): ` +
        'differences between grids may be dominated by other errors',
    );
  }
  const e21 = f2 - f1;
  const e32 = f3 - f2;
  let convergence: ConvergenceKind = 'undetermined';
  if (e21 !== 0 && e32 !== 0) {
    const R = e21 / e32;
    convergence = R < 0 ? 'oscillatory' : R < 1 ? 'monotone' : 'divergent';
  }
  if (convergence === 'oscillatory') warnings.push('oscillatory convergence (ε32/ε21 < 0): the observed order and GCI are less reliable');
  if (convergence === 'divergent') warnings.push('divergence: the differences grow with refinement (ε21/ε32 > 1)');
  if (convergence === 'undetermined') warnings.push('two grids give the same value: the observed order cannot be formed');

  const o = observedOrderThreeLevels(f1, f2, f3, r21, r32);
  if (o.method === 'bisection') {
    warnings.push('observed order found by bisection: the fixed-point iteration does not converge for these refinement ratios');
  }
  if (!o.converged && convergence !== 'undetermined') warnings.push('no observed order solves the three-grid equation for these values');
  const p = o.converged ? o.order : Number.NaN;
  const r21p = Math.pow(r21, p);
  const r32p = Math.pow(r32, p);
  const extrapolated21 = richardsonExtrapolate(f1, f2, r21, p);
  const extrapolated32 = richardsonExtrapolate(f2, f3, r32, p);
  const approxRelError21 = Math.abs((f1 - f2) / f1);
  const approxRelError32 = Math.abs((f2 - f3) / f2);
  const gciFine21 = (safetyFactor * approxRelError21) / (r21p - 1);
  const gciFine32 = (safetyFactor * approxRelError32) / (r32p - 1);
  return {
    h: [h1, h2, h3],
    r21,
    r32,
    order: p,
    iterations: o.iterations,
    orderMethod: o.method,
    convergence,
    extrapolated21,
    extrapolated32,
    approxRelError21,
    approxRelError32,
    extrapolatedRelError21: Math.abs((extrapolated21 - f1) / extrapolated21),
    gciFine21,
    gciFine32,
    asymptoticRatio: gciFine32 / (r21p * gciFine21),
    safetyFactor,
    warnings,
  };
}

/** Two-grid GCI with an assumed (not observed) order: Fs = 3 (Roache 1998). */
export function gciTwoGrids(
  fine: number,
  coarse: number,
  ratio: number,
  assumedOrder: number,
  safetyFactor = SAFETY_FACTOR_TWO_GRIDS,
): number {
  return (safetyFactor * Math.abs((fine - coarse) / fine)) / (Math.pow(ratio, assumedOrder) - 1);
}
