// Mixed first- and second-order error model of Roy (2003), "Grid convergence error analysis for mixed-order numerical
// schemes", AIAA J. 41(4), 595–604: φ(h) = φ0 + g1 h + g2 h², the three coefficients from the three finest levels
// (any refinement ratios). For a constant ratio r the solution is, with ε21 = φ2 − φ1 and ε32 = φ3 − φ2 (algebra,
// checked in the tests):  g1 = (r² ε21 − ε32) / (r (r − 1)² h1),  g2 = (ε32 − r ε21) / (r (r − 1)(r² − 1) h1²).
// The uncertainty U = Fs |φ1 − φ0| uses Roache's three-grid factor Fs = 1.25 (Roache 1998); that choice is ours, not
// a value taken from Roy's paper.
import { RungsInputError } from '../errors.ts';
import { SAFETY_FACTOR_THREE_GRIDS } from './gci.ts';
import type { UncertaintyInterval } from './least-squares-uncertainty.ts';

export const MIN_LEVELS_MIXED_ORDER = 3;

export interface MixedOrderFit {
  /** φ0, g1, g2 of φ = φ0 + g1 h + g2 h². */
  extrapolated: number;
  g1: number;
  g2: number;
  /** Levels used, 0-based, finest first (the three finest). */
  levelsUsed: number[];
  /** Estimated error of the finest value, φ1 − φ0 = g1 h1 + g2 h1², and the part of it from the first-order term. */
  error: number;
  firstOrderShare: number;
  safetyFactor: number;
  finest: UncertaintyInterval;
  warnings: string[];
}

/** Solves the 3×3 system by Gaussian elimination with partial pivoting (columns scaled by h1 for conditioning). */
function solve3(a: number[][], b: number[]): number[] {
  const m = a.map((row, i) => [...row, b[i]!]);
  for (let k = 0; k < 3; k++) {
    let piv = k;
    for (let i = k + 1; i < 3; i++) if (Math.abs(m[i]![k]!) > Math.abs(m[piv]![k]!)) piv = i;
    [m[k], m[piv]] = [m[piv]!, m[k]!];
    for (let i = k + 1; i < 3; i++) {
      const f = m[i]![k]! / m[k]![k]!;
      for (let j = k; j < 4; j++) m[i]![j]! -= f * m[k]![j]!;
    }
  }
  const x = [0, 0, 0];
  for (let k = 2; k >= 0; k--) {
    let s = m[k]![3]!;
    for (let j = k + 1; j < 3; j++) s -= m[k]![j]! * x[j]!;
    x[k] = s / m[k]![k]!;
  }
  return x;
}

/** Roy's mixed-order fit through the three finest levels; sizes and values coarse to fine (h decreasing). */
export function mixedOrderFit(h: readonly number[], values: readonly number[], name = 'quantity'): MixedOrderFit {
  const n = values.length;
  if (n < MIN_LEVELS_MIXED_ORDER || h.length !== n) {
    throw new RungsInputError(`quantity '${name}': the mixed-order fit (Roy 2003) needs at least ${MIN_LEVELS_MIXED_ORDER} levels; got ${n} values and ${h.length} sizes`, name);
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(values[i]!)) throw new RungsInputError(`quantity '${name}': level ${i + 1} value ${values[i]} is not finite`, name);
    if (!(h[i]! > 0) || (i > 0 && !(h[i]! < h[i - 1]!))) throw new RungsInputError(`quantity '${name}': sizes must be positive and decrease from level to level`, name);
  }
  const idx = [n - 1, n - 2, n - 3];
  const h1 = h[n - 1]!;
  const s = idx.map((i) => h[i]! / h1);
  const [c0, c1, c2] = solve3(s.map((v) => [1, v, v * v]), idx.map((i) => values[i]!));
  const g1 = c1! / h1;
  const g2 = c2! / (h1 * h1);
  const phi1 = values[n - 1]!;
  const error = phi1 - c0!;
  const t1 = Math.abs(g1 * h1), t2 = Math.abs(g2 * h1 * h1);
  const warnings: string[] = [];
  if (g1 !== 0 && g2 !== 0 && Math.sign(g1) !== Math.sign(g2)) {
    warnings.push('the first- and second-order terms have opposite signs on the finest level: they partly cancel, and the estimate may be small by chance');
  }
  const U = SAFETY_FACTOR_THREE_GRIDS * Math.abs(error);
  return {
    extrapolated: c0!, g1, g2, levelsUsed: idx, error,
    firstOrderShare: t1 + t2 > 0 ? t1 / (t1 + t2) : Number.NaN,
    safetyFactor: SAFETY_FACTOR_THREE_GRIDS,
    finest: { value: phi1, uncertainty: U, low: phi1 - U, high: phi1 + U, coverage: 0.95, basis: `mixed first/second order (Roy 2003), three finest levels, Fs = ${SAFETY_FACTOR_THREE_GRIDS}` },
    warnings,
  };
}
