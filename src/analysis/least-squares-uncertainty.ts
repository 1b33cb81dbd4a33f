// Numerical uncertainty of a quantity of interest from four or more levels with scatter: the least-squares procedure of
// Eça & Hoekstra (2014), "A procedure for the estimation of the numerical uncertainty of CFD calculations based on grid
// refinement studies", J. Comput. Phys. 262, 104–130. Everything below that is attributed to that paper is written
// from memory, not re-read from it; the places where our reading may differ from the paper are marked.
//
// Error models, each fitted by least squares to φ_i = φ0 + δ(h_i), weighted and unweighted, and the one of the two with
// the smaller standard deviation kept:
//   observed      δ = α h^p            (φ0, α, p)
//   first         δ = α h              (φ0, α)
//   second        δ = α h²             (φ0, α)
//   first-second  δ = α1 h + α2 h²     (φ0, α1, α2)
// Weights w_i = (1/h_i) / Σ_j (1/h_j) favour the finer levels; the standard deviation of a fit with n_p parameters over
// n levels is U_s = sqrt(n Σ w_i r_i² / (n − n_p)) (w_i = 1/n unweighted, which is the plain sqrt(Σ r_i² / (n − n_p))).
// Choice of the error estimate by the observed order p of the 'observed' fit (from memory):
//   0.5 ≤ p < 2.1  the observed-order fit;
//   p ≥ 2.1        the second-order or the first+second-order fit, the one with the smaller U_s;
//   0 < p < 0.5    and no convergence at all (p ≤ 0, or no fit): first, second or first+second, smallest U_s.
// Data range Δφ = (φ_max − φ_min)/(n − 1). With U_s < Δφ the fit is "good":
//   U_i = Fs |ε_i| + U_s + |φ_i − φ_fit,i|,                 Fs = 1.25 (observed order in range, monotone data), else 3;
// otherwise
//   U_i = 3 (U_s/Δφ) (|ε_i| + U_s + |φ_i − φ_fit,i|),
// where ε_i = φ_fit,i − φ0 is the fitted error of level i. For p ≥ 2.1 the uncertainty is at least 1.25 Δ_M,
// Δ_M = φ_max − φ_min (from memory; it keeps an apparent order above the design order from shrinking U).
// The paper aims at intervals φ_i ± U_i that hold the exact value with about 95% coverage.
import { RungsInputError } from '../errors.ts';
import { tQuantileTwoSided } from './tquantile.ts';

export type ErrorModel = 'observed' | 'first' | 'second' | 'first-second';

/** Levels the least-squares procedure needs: three parameters and at least one degree of freedom. */
export const MIN_LEVELS_LEAST_SQUARES = 4;
/** Range of observed orders in which the observed-order fit is trusted (Eça & Hoekstra 2014, from memory). */
export const OBSERVED_ORDER_RANGE: readonly [number, number] = [0.5, 2.1];
export const SAFETY_FACTOR_GOOD_FIT = 1.25;
export const SAFETY_FACTOR_POOR_FIT = 3;
/** Observed orders searched: divergence (p < 0) is found, not assumed away. */
const ORDER_SEARCH: readonly [number, number] = [-8, 12];
const ORDER_STEP = 0.01;

export interface ErrorFit {
  model: ErrorModel;
  /** Fitted with the weights (1/h_i)/Σ(1/h_j) (true) or with equal weights. */
  weighted: boolean;
  /** φ0, the estimate of the exact value. */
  extrapolated: number;
  /** α, or α1 and α2 for first-second: the coefficients of δ(h). */
  coefficients: number[];
  /** p of δ = α h^p (fitted for 'observed', 1 or 2 when fixed, null for first-second). */
  order: number | null;
  /** U_s, the standard deviation of the fit. */
  std: number;
  /** φ_fit at every level, coarse to fine. */
  fitted: number[];
  parameters: number;
}

export interface UncertaintyInterval {
  /** The value the interval is about (here: the finest level's value φ1). */
  value: number;
  /** Half-width U, in the quantity's units. */
  uncertainty: number;
  low: number;
  high: number;
  /** The coverage the procedure aims at (0.95), as ASME V&V 20-2009 asks to state with every interval. */
  coverage: number;
  /** What U is: the procedure and its safety factor. */
  basis: string;
}

export type LeastSquaresRegime = 'observed-order' | 'high-order' | 'low-order' | 'no-convergence';
export type LeastSquaresConvergence = 'monotone' | 'oscillatory' | 'divergent';

export interface LeastSquaresUncertainty {
  /** Sizes and values, coarse to fine, as given. */
  h: number[];
  values: number[];
  /** Every fit, each the better of its weighted and unweighted versions. */
  fits: ErrorFit[];
  /** The fit whose error estimate is used. */
  chosen: ErrorFit;
  /** Which rule chose it (by the observed order p). */
  regime: LeastSquaresRegime;
  /** p of the observed-order fit (null when that fit fails) and its 95% profile-likelihood interval, the union of the
   *  weighted and unweighted fits' intervals. */
  observedOrder: number | null;
  orderInterval: [number, number] | null;
  /** Sign changes of φ_{i+1} − φ_i: any one makes the data oscillatory (ratio R < 0 of a triplet, Stern et al. 2001). */
  signChanges: number;
  convergence: LeastSquaresConvergence;
  /** Δφ = (φ_max − φ_min)/(n − 1) and Δ_M = φ_max − φ_min. */
  dataRange: number;
  maxDifference: number;
  /** U_s < Δφ. */
  goodFit: boolean;
  safetyFactor: number;
  /** ε_i = φ_fit,i − φ0 and U_i for every level, coarse to fine. */
  errors: number[];
  uncertainty: number[];
  /** φ_i ± U_i for every level, coarse to fine; the last one is the result. */
  intervals: UncertaintyInterval[];
  finest: UncertaintyInterval;
  warnings: string[];
}

export interface LeastSquaresOptions {
  /** Name for messages. */
  name?: string;
}

// ---------------------------------------------------------------- small weighted least squares

interface LinearFit {
  coef: number[];
  fitted: number[];
  /** Σ w_i r_i² with the normalised weights. */
  wssr: number;
}

/**
 * Weighted linear least squares by Householder QR of the rows scaled by √w (Golub & Van Loan, Matrix Computations,
 * 4th ed. 2013, §5.3): never forms the normal equations, so columns 1, h, h² stay well resolved.
 */
export function weightedLinearFit(columns: readonly (readonly number[])[], y: readonly number[], w: readonly number[]): LinearFit {
  const n = y.length;
  const m = columns.length;
  const a: number[][] = Array.from({ length: n }, (_, i) => columns.map((c) => Math.sqrt(w[i]!) * c[i]!));
  const b = y.map((v, i) => Math.sqrt(w[i]!) * v);
  for (let k = 0; k < m; k++) {
    let norm = 0;
    for (let i = k; i < n; i++) norm += a[i]![k]! ** 2;
    norm = Math.sqrt(norm);
    if (norm === 0) continue;
    const alpha = a[k]![k]! > 0 ? -norm : norm;
    const v = new Array<number>(n).fill(0);
    for (let i = k; i < n; i++) v[i] = a[i]![k]!;
    v[k]! -= alpha;
    let vv = 0;
    for (let i = k; i < n; i++) vv += v[i]! ** 2;
    if (vv === 0) continue;
    for (let j = k; j < m; j++) {
      let s = 0;
      for (let i = k; i < n; i++) s += v[i]! * a[i]![j]!;
      const f = (2 * s) / vv;
      for (let i = k; i < n; i++) a[i]![j]! -= f * v[i]!;
    }
    let s = 0;
    for (let i = k; i < n; i++) s += v[i]! * b[i]!;
    const f = (2 * s) / vv;
    for (let i = k; i < n; i++) b[i]! -= f * v[i]!;
  }
  const coef = new Array<number>(m).fill(0);
  for (let k = m - 1; k >= 0; k--) {
    let s = b[k]!;
    for (let j = k + 1; j < m; j++) s -= a[k]![j]! * coef[j]!;
    coef[k] = s / a[k]![k]!;
  }
  const fitted = y.map((_, i) => columns.reduce((acc, c, j) => acc + coef[j]! * c[i]!, 0));
  let wssr = 0;
  for (let i = 0; i < n; i++) wssr += w[i]! * (y[i]! - fitted[i]!) ** 2;
  return { coef, fitted, wssr };
}

/** φ0 + α x fitted with weights; closed form with weighted centring (x = (h/h_ref)^p). */
function lineFit(x: readonly number[], y: readonly number[], w: readonly number[]): { a: number; b: number; wssr: number } | null {
  let xm = 0, ym = 0;
  for (let i = 0; i < x.length; i++) { xm += w[i]! * x[i]!; ym += w[i]! * y[i]!; }
  let sxx = 0, sxy = 0;
  for (let i = 0; i < x.length; i++) { const dx = x[i]! - xm; sxx += w[i]! * dx * dx; sxy += w[i]! * dx * (y[i]! - ym); }
  if (!(sxx > 0) || !Number.isFinite(sxx)) return null;
  const b = sxy / sxx;
  const a = ym - b * xm;
  let wssr = 0;
  for (let i = 0; i < x.length; i++) wssr += w[i]! * (y[i]! - a - b * x[i]!) ** 2;
  return { a, b, wssr };
}

// ---------------------------------------------------------------- the fits

const stdOf = (wssr: number, n: number, parameters: number): number => Math.sqrt((n * wssr) / (n - parameters));

function weightsFor(h: readonly number[], weighted: boolean): number[] {
  const n = h.length;
  if (!weighted) return h.map(() => 1 / n);
  const inv = h.map((v) => 1 / v);
  const sum = inv.reduce((s, v) => s + v, 0);
  return inv.map((v) => v / sum);
}

function fixedFit(model: Exclude<ErrorModel, 'observed'>, h: readonly number[], y: readonly number[], weighted: boolean): ErrorFit {
  const w = weightsFor(h, weighted);
  const ref = h[0]!;
  const s = h.map((v) => v / ref);
  const columns = model === 'first' ? [h.map(() => 1), s] : model === 'second' ? [h.map(() => 1), s.map((v) => v * v)] : [h.map(() => 1), s, s.map((v) => v * v)];
  const f = weightedLinearFit(columns, y, w);
  const coefficients = model === 'first' ? [f.coef[1]! / ref] : model === 'second' ? [f.coef[1]! / ref ** 2] : [f.coef[1]! / ref, f.coef[2]! / ref ** 2];
  const parameters = columns.length;
  return {
    model, weighted, extrapolated: f.coef[0]!, coefficients, order: model === 'first' ? 1 : model === 'second' ? 2 : null,
    std: stdOf(f.wssr, h.length, parameters), fitted: f.fitted, parameters,
  };
}

interface Profile {
  /** Σ w r² minimised over φ0 and α for a fixed p (NaN where the fit is singular). */
  at: (p: number) => number;
  best: number;
  bestValue: number;
}

function orderProfile(h: readonly number[], y: readonly number[], w: readonly number[]): Profile | null {
  const ref = h[0]!;
  const logs = h.map((v) => Math.log(v / ref));
  const at = (p: number): number => {
    const f = lineFit(logs.map((l) => Math.exp(p * l)), y, w);
    return f ? f.wssr : Number.NaN;
  };
  let best = Number.NaN;
  let bestValue = Infinity;
  const [lo, hi] = ORDER_SEARCH;
  for (let p = lo; p <= hi + 1e-12; p += ORDER_STEP) {
    if (Math.abs(p) < ORDER_STEP / 2) continue;
    const v = at(p);
    if (v < bestValue) { bestValue = v; best = p; }
  }
  if (!Number.isFinite(best)) return null;
  // Golden-section search in the bracket around the best grid point (Kiefer 1953).
  let a = Math.max(lo, best - ORDER_STEP), b = Math.min(hi, best + ORDER_STEP);
  const g = (Math.sqrt(5) - 1) / 2;
  let c = b - g * (b - a), d = a + g * (b - a);
  let fc = at(c), fd = at(d);
  for (let k = 0; k < 80 && b - a > 1e-13 * Math.max(1, Math.abs(best)); k++) {
    if (fc < fd) { b = d; d = c; fd = fc; c = b - g * (b - a); fc = at(c); }
    else { a = c; c = d; fc = fd; d = a + g * (b - a); fd = at(d); }
  }
  const p = 0.5 * (a + b);
  const v = at(p);
  if (v < bestValue) { best = p; bestValue = v; }
  return { at, best, bestValue };
}

function observedFit(h: readonly number[], y: readonly number[], weighted: boolean): { fit: ErrorFit; profile: Profile } | null {
  const w = weightsFor(h, weighted);
  const profile = orderProfile(h, y, w);
  if (!profile) return null;
  const p = profile.best;
  const ref = h[0]!;
  const x = h.map((v) => Math.pow(v / ref, p));
  const f = lineFit(x, y, w)!;
  return {
    fit: {
      model: 'observed', weighted, extrapolated: f.a, coefficients: [f.b / Math.pow(ref, p)], order: p,
      std: stdOf(f.wssr, h.length, 3), fitted: x.map((v) => f.a + f.b * v), parameters: 3,
    },
    profile,
  };
}

/**
 * 95% interval of p by the profile likelihood: the p whose best Σ w r² stays below min · (1 + F/ν), F = t²(ν) the
 * 0.95 quantile of F(1, ν), ν = n − 3 (Bates & Watts, Nonlinear Regression Analysis, 1988, §6.1; exact for a model
 * linear in its parameters). An end that reaches the searched range [−8, 12] is reported as ∓Infinity.
 */
function orderInterval(profile: Profile, n: number): [number, number] {
  const nu = n - 3;
  const t = tQuantileTwoSided(nu, 0.05);
  const limit = profile.bestValue * (1 + (t * t) / nu);
  const inside = (p: number) => { const v = profile.at(p); return Number.isFinite(v) ? v <= limit : true; };
  const edge = (dir: 1 | -1): number => {
    const bound = dir > 0 ? ORDER_SEARCH[1] : ORDER_SEARCH[0];
    let inner = profile.best;
    let p = profile.best;
    for (;;) {
      const next = p + dir * ORDER_STEP;
      if ((dir > 0 && next > bound) || (dir < 0 && next < bound)) return dir * Infinity;
      if (!inside(next)) { p = next; break; }
      inner = next;
      p = next;
    }
    let a = inner, b = p;
    for (let k = 0; k < 60; k++) { const m = 0.5 * (a + b); if (inside(m)) a = m; else b = m; }
    return 0.5 * (a + b);
  };
  if (!(profile.bestValue > 0)) return [profile.best, profile.best];
  return [edge(-1), edge(1)];
}

const better = (a: ErrorFit, b: ErrorFit): ErrorFit => (b.std < a.std ? b : a);

/** The least-squares uncertainty of every level, values and sizes coarse to fine (h decreasing). */
export function leastSquaresUncertainty(h: readonly number[], values: readonly number[], opts: LeastSquaresOptions = {}): LeastSquaresUncertainty {
  const name = opts.name ?? 'quantity';
  const n = values.length;
  if (n < MIN_LEVELS_LEAST_SQUARES || h.length !== n) {
    throw new RungsInputError(
      `quantity '${name}': the least-squares uncertainty (Eça & Hoekstra 2014) needs at least ${MIN_LEVELS_LEAST_SQUARES} levels with one size each; got ${n} values and ${h.length} sizes`,
      name,
    );
  }
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(values[i]!)) throw new RungsInputError(`quantity '${name}': level ${i + 1} value ${values[i]} is not finite`, name);
    if (!(h[i]! > 0) || (i > 0 && !(h[i]! < h[i - 1]!))) throw new RungsInputError(`quantity '${name}': sizes must be positive and decrease from level to level`, name);
  }
  const y = [...values];
  const warnings: string[] = [];
  // reduce, not Math.max(...y): spreading a long column overflows the call stack.
  const max = y.reduce((a, b) => Math.max(a, b), -Infinity), min = y.reduce((a, b) => Math.min(a, b), Infinity);
  const maxDifference = max - min;
  const dataRange = maxDifference / (n - 1);

  const obs = [observedFit(h, y, false), observedFit(h, y, true)].filter((o) => o !== null);
  const obsBest = obs.length === 2 ? (obs[1]!.fit.std < obs[0]!.fit.std ? obs[1]! : obs[0]!) : obs[0] ?? null;
  const fixed = (['first', 'second', 'first-second'] as const).map((m) => better(fixedFit(m, h, y, false), fixedFit(m, h, y, true)));
  const [first, second, firstSecond] = fixed as [ErrorFit, ErrorFit, ErrorFit];
  const fits = [...(obsBest ? [obsBest.fit] : []), ...fixed];

  let signChanges = 0;
  for (let i = 2; i < n; i++) if ((y[i]! - y[i - 1]!) * (y[i - 1]! - y[i - 2]!) < 0) signChanges++;
  const p = obsBest ? obsBest.fit.order! : null;
  const convergence: LeastSquaresConvergence = signChanges > 0 ? 'oscillatory' : p !== null && p > 0 ? 'monotone' : 'divergent';

  let regime: LeastSquaresRegime;
  let chosen: ErrorFit;
  if (p === null || !(p > 0)) {
    regime = 'no-convergence';
    chosen = [first, second, firstSecond].reduce(better);
    warnings.push(p === null ? 'the observed-order fit failed: the error is estimated with fixed orders and Fs = 3' : `the observed-order fit gives p = ${p.toFixed(2)} ≤ 0 (no convergence): the error is estimated with fixed orders and Fs = 3`);
  } else if (p < OBSERVED_ORDER_RANGE[0]) {
    regime = 'low-order';
    chosen = [first, second, firstSecond].reduce(better);
    warnings.push(`observed order ${p.toFixed(2)} below ${OBSERVED_ORDER_RANGE[0]}: the error is estimated with fixed orders and Fs = 3`);
  } else if (p < OBSERVED_ORDER_RANGE[1]) {
    regime = 'observed-order';
    chosen = obsBest!.fit;
  } else {
    regime = 'high-order';
    chosen = better(second, firstSecond);
    warnings.push(
      `observed order ${p.toFixed(2)} at or above ${OBSERVED_ORDER_RANGE[1]}: the procedure, written for schemes of at most second order, ` +
        'estimates the error with the second-order or first+second-order fit and keeps U ≥ 1.25 Δ_M; U is conservative for higher-order elements',
    );
  }
  if (p !== null && (p >= ORDER_SEARCH[1] - ORDER_STEP || p <= ORDER_SEARCH[0] + ORDER_STEP)) {
    warnings.push(`the observed-order fit runs to the end of the orders searched (${ORDER_SEARCH[0]} to ${ORDER_SEARCH[1]}): the data fix no finite best order`);
  }
  if (convergence === 'oscillatory') warnings.push(`the values change direction ${signChanges} time${signChanges === 1 ? '' : 's'} from level to level (oscillatory or scattered data)`);

  const goodFit = chosen.std < dataRange;
  const safetyFactor = goodFit && regime !== 'low-order' && regime !== 'no-convergence' && convergence === 'monotone' ? SAFETY_FACTOR_GOOD_FIT : SAFETY_FACTOR_POOR_FIT;
  if (!goodFit && maxDifference > 0) warnings.push(`poor fit: standard deviation ${chosen.std.toPrecision(3)} ≥ data range ${dataRange.toPrecision(3)}; U is scaled by 3 U_s/Δφ`);
  const errors = chosen.fitted.map((f) => f - chosen.extrapolated);
  const uncertainty = y.map((v, i) => {
    if (maxDifference === 0) return 0;
    const e = Math.abs(errors[i]!);
    const r = Math.abs(v - chosen.fitted[i]!);
    let u = goodFit ? safetyFactor * e + chosen.std + r : SAFETY_FACTOR_POOR_FIT * (chosen.std / dataRange) * (e + chosen.std + r);
    if (regime === 'high-order') u = Math.max(u, SAFETY_FACTOR_GOOD_FIT * maxDifference);
    return u;
  });
  if (maxDifference === 0) warnings.push('every level gives the same value: no discretization error can be measured, U = 0');
  const basis = `least squares (Eça & Hoekstra 2014), ${describeFit(chosen)}, Fs = ${safetyFactor}`;
  const intervals = y.map((v, i): UncertaintyInterval => ({ value: v, uncertainty: uncertainty[i]!, low: v - uncertainty[i]!, high: v + uncertainty[i]!, coverage: 0.95, basis }));
  return {
    h: [...h], values: y, fits, chosen, regime,
    observedOrder: p,
    orderInterval: obs.length ? unionOf(obs.map((o) => orderInterval(o.profile, n))) : null,
    signChanges, convergence, dataRange, maxDifference, goodFit, safetyFactor, errors, uncertainty, intervals,
    finest: intervals[n - 1]!, warnings,
  };
}

/** "observed order p = 1.98 (weighted)", "first + second order (unweighted)". */
export function describeFit(f: ErrorFit): string {
  const how = f.weighted ? 'weighted' : 'unweighted';
  if (f.model === 'observed') return `observed order p = ${f.order!.toFixed(2)} (${how})`;
  if (f.model === 'first-second') return `first + second order (${how})`;
  return `${f.model} order (${how})`;
}

/** The smallest interval holding every one given: p is chosen between two weightings by the data, so its interval
 *  covers the orders either weighting admits. */
function unionOf(xs: readonly [number, number][]): [number, number] {
  return [Math.min(...xs.map((x) => x[0])), Math.max(...xs.map((x) => x[1]))];
}
