// Joint space–time fit of e = C_h h^p + C_t Δt^q over a design of (h, Δt) pairs, and its verdict per order.
// The two-term form of an error that mixes spatial and temporal discretization is that of Kamm, Rider & Brock (2003,
// combined space–time convergence analysis; from memory). The fit is nonlinear least squares on
// ln e (every point weighs by its relative error), solved by Levenberg–Marquardt (Levenberg 1944; Marquardt 1963,
// with Marquardt's diagonal scaling); its 95% intervals are the linearization (Wald) intervals s²(JᵀJ)⁻¹ with the
// Student-t quantile on points − 4 degrees of freedom (Bates & Watts 1988, Nonlinear Regression Analysis and Its
// Applications, §2.3). Their coverage was measured on seeded noise (test/analysis/two-axis.test.ts: 0.93–0.96 over
// designs of 5 to 16 points and relative noise of 1–10%) and found close to nominal, so the costlier profile
// intervals of Bates & Watts §6.1 are not used. The verdict's words say "95%": other confidences are for callers that
// print their own.
// The problems are tiny (a few dozen points, four parameters): plain arrays, no buffers.
import type { TwoAxisAnalysis, TwoAxisFit, Verdict } from './types.ts';
import { RungsInputError } from '../errors.ts';
import { tQuantileTwoSided } from './tquantile.ts';
import { CI_WIDTH_FACTOR, DEFAULT_TOLERANCE } from './verdict.ts';

/** Four parameters and at least one degree of freedom for the residual variance. */
export const MIN_TWO_AXIS_POINTS = 5;
/** A term below this share of the other at every point of the design leaves its order unidentifiable: the spatial
 *  error's own unmodelled higher-order terms are typically of that size on a study's finest levels (common practice,
 *  no source). */
export const NEGLIGIBLE_SHARE = 0.05;
/** The start search covers orders in (0, ORDER_GRID_MAX] in steps of ORDER_GRID_STEP. */
export const ORDER_GRID_MAX = 8;
const ORDER_GRID_STEP = 0.2;
const MAX_ITERATIONS = 200;
/** Convergence: a relative step below STEP_TOL, or the residual at most GRADIENT_TOL away from orthogonal to every
 *  column of J (the relative-offset idea of Bates & Watts 1981, Technometrics 23; here per column). */
const STEP_TOL = 1e-10;
const GRADIENT_TOL = 1e-8;
/** A root-mean-square residual in ln e below this is an exact fit: relative errors of 1e-12 are below anything a
 *  discretization error measures, and the gradient test means nothing on residuals that are rounding noise. */
const EXACT_RMS = 1e-12;
/** Marquardt's damping: start, factor, and the value beyond which no step reduces the sum of squares. */
const LAMBDA_START = 1e-3;
const LAMBDA_FACTOR = 10;
const LAMBDA_MAX = 1e14;

export interface TwoAxisOptions {
  /** Confidence of the intervals of p and q (default 0.95). */
  confidence?: number;
  /** Cap on Levenberg–Marquardt iterations (default 200). */
  maxIterations?: number;
  /** Named in the messages of refusals (default "two-axis fit"). */
  name?: string;
}

/** θ = (ln C_h, p, ln C_t, q): the constants through their logarithms so they stay positive. */
type Params = [number, number, number, number];

interface Data {
  lh: number[];
  lt: number[];
  y: number[];
}

function refuse(name: string, message: string, field: string): never {
  throw new RungsInputError(`${name}: ${message}`, `${name}.${field}`);
}

function distinctCount(v: readonly number[]): number {
  return new Set(v).size;
}

/** The (ln h, ln Δt) points lie on one line (Δt = c·h^s, or one axis constant) when their scatter matrix is singular. */
function collinear(lh: readonly number[], lt: readonly number[]): boolean {
  const n = lh.length;
  const mh = lh.reduce((s, v) => s + v, 0) / n;
  const mt = lt.reduce((s, v) => s + v, 0) / n;
  let shh = 0, stt = 0, sht = 0;
  for (let i = 0; i < n; i++) {
    const a = lh[i]! - mh, b = lt[i]! - mt;
    shh += a * a;
    stt += b * b;
    sht += a * b;
  }
  return shh * stt - sht * sht <= 1e-10 * shh * stt;
}

function validate(h: readonly number[], dt: readonly number[], e: readonly number[], name: string): void {
  const n = e.length;
  if (h.length !== n || dt.length !== n) {
    refuse(name, `h, dt and errors must have one entry per point; got ${h.length}, ${dt.length} and ${n}`, 'points');
  }
  if (n < MIN_TWO_AXIS_POINTS) {
    refuse(name, `a two-axis fit of e = C_h h^p + C_t Δt^q has four parameters and needs at least ` +
      `${MIN_TWO_AXIS_POINTS} (h, Δt) points; got ${n}`, 'points');
  }
  for (let i = 0; i < n; i++) {
    if (!(h[i]! > 0) || !Number.isFinite(h[i]!)) refuse(name, `h at level ${i + 1} is ${h[i]}; mesh sizes must be positive and finite`, 'h');
    if (!(dt[i]! > 0) || !Number.isFinite(dt[i]!)) refuse(name, `Δt at level ${i + 1} is ${dt[i]}; time steps must be positive and finite`, 'dt');
    if (!(e[i]! > 0) || !Number.isFinite(e[i]!)) {
      refuse(name, `the error at level ${i + 1} is ${e[i]}; a fit on ln e needs positive finite errors — leave out ` +
        'levels at round-off or with failed solves before fitting', 'errors');
    }
  }
  if (distinctCount(h) < 2 || distinctCount(dt) < 2) {
    refuse(name, `a two-axis fit needs at least two values of h and two of Δt; got ${distinctCount(h)} and ` +
      `${distinctCount(dt)}`, 'design');
  }
  if (collinear(h.map(Math.log), dt.map(Math.log))) {
    refuse(name, 'the (h, Δt) pairs lie on one line Δt = c·h^s, so the spatial and temporal terms cannot be told ' +
      "apart; add pairs off that line, or study the coupled refinement as one fit in h", 'design');
  }
}

/** ln(C_h h^p + C_t Δt^q) and the spatial share w = C_h h^p / (C_h h^p + C_t Δt^q), without overflow. */
function modelAt(th: Params, lh: number, lt: number): { f: number; w: number } {
  const su = th[0] + th[1] * lh;
  const sv = th[2] + th[3] * lt;
  const m = Math.max(su, sv);
  const f = m + Math.log(Math.exp(su - m) + Math.exp(sv - m));
  return { f, w: Math.exp(su - f) };
}

function sumOfSquares(th: Params, d: Data): number {
  let s = 0;
  for (let i = 0; i < d.y.length; i++) {
    const r = d.y[i]! - modelAt(th, d.lh[i]!, d.lt[i]!).f;
    s += r * r;
  }
  return s;
}

/** Residuals r = y − f and the Jacobian of f (rows ∂f/∂θ): ∂f/∂lnC_h = w, ∂f/∂p = w ln h, ∂f/∂lnC_t = 1 − w,
 *  ∂f/∂q = (1 − w) ln Δt. */
function linearize(th: Params, d: Data): { r: number[]; J: number[][] } {
  const r: number[] = [];
  const J: number[][] = [];
  for (let i = 0; i < d.y.length; i++) {
    const { f, w } = modelAt(th, d.lh[i]!, d.lt[i]!);
    r.push(d.y[i]! - f);
    J.push([w, w * d.lh[i]!, 1 - w, (1 - w) * d.lt[i]!]);
  }
  return { r, J };
}

function normalEquations(J: number[][], r: number[]): { A: number[][]; g: number[] } {
  const m = J[0]!.length;
  const A = J[0]!.map(() => new Array<number>(m).fill(0));
  const g = new Array<number>(m).fill(0);
  for (let i = 0; i < r.length; i++) {
    const row = J[i]!;
    for (let j = 0; j < m; j++) {
      g[j]! += row[j]! * r[i]!;
      for (let k = 0; k < m; k++) A[j]![k]! += row[j]! * row[k]!;
    }
  }
  return { A, g };
}

/** Cholesky factor of a symmetric matrix, or null when it is not numerically positive definite. */
function cholesky(A: number[][]): number[][] | null {
  const n = A.length;
  const L = A.map(() => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    let s = A[j]![j]!;
    for (let k = 0; k < j; k++) s -= L[j]![k]! ** 2;
    if (!(s > 1e-14 * Math.max(1, A[j]![j]!))) return null;
    L[j]![j] = Math.sqrt(s);
    for (let i = j + 1; i < n; i++) {
      let t = A[i]![j]!;
      for (let k = 0; k < j; k++) t -= L[i]![k]! * L[j]![k]!;
      L[i]![j] = t / L[j]![j]!;
    }
  }
  return L;
}

function choleskySolve(L: number[][], b: number[]): number[] {
  const n = b.length;
  const z = [...b];
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < i; k++) z[i]! -= L[i]![k]! * z[k]!;
    z[i]! /= L[i]![i]!;
  }
  for (let i = n - 1; i >= 0; i--) {
    for (let k = i + 1; k < n; k++) z[i]! -= L[k]![i]! * z[k]!;
    z[i]! /= L[i]![i]!;
  }
  return z;
}

/** Columns scaled to unit diagonal first: ln C and the orders differ in size, and a column that vanishes (a term
 *  negligible everywhere) then shows as a zero pivot instead of a tiny one. */
function scaledSystem(A: number[][]): { S: number[][]; scale: number[] } {
  const maxDiag = Math.max(...A.map((row, j) => row[j]!));
  const scale = A.map((row, j) => Math.sqrt(Math.max(row[j]!, 1e-300, 1e-30 * maxDiag)));
  const S = A.map((row, j) => row.map((v, k) => v / (scale[j]! * scale[k]!)));
  return { S, scale };
}

/** Largest |cos| between the residual and a column of J: zero at a stationary point of the sum of squares. */
function relativeGradient(A: number[][], g: number[], ss: number): number {
  if (!(ss > 0)) return 0;
  let worst = 0;
  for (let j = 0; j < g.length; j++) {
    const a = A[j]![j]!;
    if (a > 0) worst = Math.max(worst, Math.abs(g[j]!) / Math.sqrt(a * ss));
  }
  return worst;
}

/** Nonnegative least squares for two unknowns: min ‖c1 u + c2 v − 1‖ over c1, c2 ≥ 0, by comparing the interior
 *  solution (when both are positive) with the two one-term solutions. */
function nonnegativePair(u: readonly number[], v: readonly number[]): [number, number] {
  let uu = 0, vv = 0, uv = 0, u1 = 0, v1 = 0;
  for (let i = 0; i < u.length; i++) {
    uu += u[i]! * u[i]!;
    vv += v[i]! * v[i]!;
    uv += u[i]! * v[i]!;
    u1 += u[i]!;
    v1 += v[i]!;
  }
  const det = uu * vv - uv * uv;
  if (det > 1e-14 * uu * vv) {
    const c1 = (u1 * vv - v1 * uv) / det;
    const c2 = (v1 * uu - u1 * uv) / det;
    // The unconstrained minimum is feasible: it is the constrained one too.
    if (c1 > 0 && c2 > 0) return [c1, c2];
  }
  // Otherwise the minimum lies on an edge; one term alone leaves the misfit n − (Σu)²/Σu², and likewise for v.
  return u1 * u1 / uu >= v1 * v1 / vv ? [u1 / uu, 0] : [0, v1 / vv];
}

/**
 * Start values by a coarse search over (p, q) in (0, 8]: for each pair the constants enter linearly, and are found by
 * nonnegative least squares on the relative misfit (C_h h^p + C_t Δt^q)/e − 1, which approximates the misfit in ln e;
 * the pair with the smallest sum of squares in ln e wins. This separates the nonlinear parameters from the linear
 * ones as variable projection does (Golub & Pereyra 1973, SIAM J. Numer. Anal. 10) and needs no particular design:
 * starts from log-linear fits along the finest-h and finest-Δt slices need a full tensor design, and those slices
 * are themselves limited by the other axis's error (the very floor a two-axis fit is meant to separate), so their
 * orders start low. A negligible constant starts at 0.1% of the other term so its logarithm is finite.
 */
function startValues(d: Data, e: readonly number[]): Params {
  const n = e.length;
  const orders: number[] = [];
  for (let k = 1; k * ORDER_GRID_STEP <= ORDER_GRID_MAX + 1e-9; k++) orders.push(k * ORDER_GRID_STEP);
  const hPow = orders.map((p) => d.lh.map((l, i) => Math.exp(p * l) / e[i]!));
  const tPow = orders.map((q) => d.lt.map((l, i) => Math.exp(q * l) / e[i]!));
  let best = { a: 0, b: 0, ch: 1, ct: 1 };
  let bestSS = Infinity;
  for (let a = 0; a < orders.length; a++) {
    for (let b = 0; b < orders.length; b++) {
      const U = hPow[a]!, V = tPow[b]!;
      const [ch, ct] = nonnegativePair(U, V);
      // ln e − ln(model) = −ln(model / e), and model / e = ch U + ct V.
      let ss = 0;
      for (let i = 0; i < n; i++) ss += Math.log(ch * U[i]! + ct * V[i]!) ** 2;
      if (ss < bestSS) [best, bestSS] = [{ a, b, ch, ct }, ss];
    }
  }
  return startParams(best.ch, orders[best.a]!, best.ct, orders[best.b]!, d, n);
}

function startParams(ch: number, p: number, ct: number, q: number, d: Data, n: number): Params {
  if (ch > 0 && ct > 0) return [Math.log(ch), p, Math.log(ct), q];
  // One constant is zero: set it so that its term is 0.1% of the other term at the point where it is largest.
  let lead = -Infinity;
  for (let i = 0; i < n; i++) {
    const other = ch > 0 ? Math.log(ch) + p * d.lh[i]! - q * d.lt[i]! : Math.log(ct) + q * d.lt[i]! - p * d.lh[i]!;
    lead = Math.max(lead, -other);
  }
  const small = Math.log(1e-3) - lead;
  return ch > 0 ? [Math.log(ch), p, small, q] : [small, p, Math.log(ct), q];
}

interface Minimum {
  th: Params;
  ss: number;
  converged: boolean;
}

/** Levenberg–Marquardt on the sum of squares in ln e: steps from (JᵀJ + λ diag(JᵀJ)) δ = Jᵀr, λ lowered after a
 *  step that reduces the sum and raised until one does (Marquardt 1963). */
function levenbergMarquardt(start: Params, d: Data, maxIterations: number): Minimum {
  let th = start;
  let ss = sumOfSquares(th, d);
  let lambda = LAMBDA_START;
  for (let it = 0; it < maxIterations; it++) {
    const { r, J } = linearize(th, d);
    const { A, g } = normalEquations(J, r);
    if (ss <= d.y.length * EXACT_RMS ** 2 || relativeGradient(A, g, ss) <= GRADIENT_TOL) return { th, ss, converged: true };
    const step = dampedStep(th, A, g, d, ss, lambda);
    if (step === null) {
      // No damping reduces the sum: a minimum to working precision when the gradient is nearly orthogonal.
      return { th, ss, converged: relativeGradient(A, g, ss) <= 1e3 * GRADIENT_TOL };
    }
    const small = step.th.every((v, j) => Math.abs(v - th[j]!) <= STEP_TOL * (1 + Math.abs(th[j]!)));
    [th, ss, lambda] = [step.th, step.ss, Math.max(step.lambda / LAMBDA_FACTOR, 1e-12)];
    if (small) return { th, ss, converged: true };
  }
  return { th, ss, converged: false };
}

function dampedStep(th: Params, A: number[][], g: number[], d: Data, ss: number, lambda: number): { th: Params; ss: number; lambda: number } | null {
  const { S, scale } = scaledSystem(A);
  const gs = g.map((v, j) => v / scale[j]!);
  for (let lam = lambda; lam <= LAMBDA_MAX; lam *= LAMBDA_FACTOR) {
    // In scaled variables diag(JᵀJ) is the identity, so Marquardt's damping adds λ to the diagonal.
    const L = cholesky(S.map((row, j) => row.map((v, k) => (j === k ? v + lam : v))));
    if (L === null) continue;
    const delta = choleskySolve(L, gs).map((v, j) => v / scale[j]!);
    const next = th.map((v, j) => v + delta[j]!) as Params;
    const nextSS = sumOfSquares(next, d);
    if (nextSS <= ss && next.every(Number.isFinite)) return { th: next, ss: nextSS, lambda: lam };
  }
  return null;
}

/** A term below this fraction of the other at every point has left the fit (its constant went to zero): its two
 *  columns of J vanish, and only the other term's parameters have a covariance. */
const VANISHED = 1e-10;

/** Parameters whose covariance exists: all four, or those of the one term that is left. */
function activeParameters(ratio: [number, number]): number[] {
  if (ratio[1] < VANISHED) return [0, 1];
  if (ratio[0] > 1 / VANISHED) return [2, 3];
  return [0, 1, 2, 3];
}

/** Wald half-widths t·s·sqrt((JᵀJ)⁻¹_jj) of p and q (Bates & Watts 1988, §2.3) on the active parameters; Infinity
 *  for an order whose term has left the fit or when JᵀJ is singular (the design cannot separate the terms). */
function halfWidths(th: Params, d: Data, ss: number, confidence: number, ratio: [number, number]): { p: number; q: number } {
  const dof = d.y.length - 4;
  const active = activeParameters(ratio);
  const { r, J } = linearize(th, d);
  const { A } = normalEquations(J.map((row) => active.map((j) => row[j]!)), r);
  const { S, scale } = scaledSystem(A);
  const L = cholesky(S);
  const s2 = ss / dof;
  const t = tQuantileTwoSided(dof, 1 - confidence);
  const half = (param: number): number => {
    const k = active.indexOf(param);
    if (L === null || k < 0) return Infinity;
    const unit = active.map((_, m) => (m === k ? 1 : 0));
    return t * Math.sqrt(s2 * choleskySolve(L, unit)[k]! / (scale[k]! * scale[k]!));
  };
  return { p: half(1), q: half(3) };
}

function termRatio(th: Params, d: Data): [number, number] {
  const ratios = d.lh.map((lh, i) => Math.exp(th[2] + th[3] * d.lt[i]! - th[0] - th[1] * lh));
  return [Math.min(...ratios), Math.max(...ratios)];
}

/**
 * Fit e = C_h h^p + C_t Δt^q to the points (h_i, Δt_i, e_i) by least squares on ln e.
 * Refuses (RungsInputError) fewer than 5 points, a design that does not vary both h and Δt or whose pairs lie on one
 * line Δt = c·h^s, and errors that are not positive and finite: a level at round-off (e ≤ 0 or a tiny error) says
 * nothing about either order, and the caller's floor rules should leave it out before fitting (skipping it here would
 * hide it). `converged` is false when Levenberg–Marquardt stopped without meeting its tests; the best point found is
 * still returned.
 */
export function fitTwoAxis(h: readonly number[], dt: readonly number[], e: readonly number[], opts: TwoAxisOptions = {}): TwoAxisFit {
  const name = opts.name ?? 'two-axis fit';
  const confidence = opts.confidence ?? 0.95;
  if (!(confidence > 0 && confidence < 1)) refuse(name, `confidence must lie strictly between 0 and 1, got ${confidence}`, 'confidence');
  validate(h, dt, e, name);
  const d: Data = { lh: h.map(Math.log), lt: dt.map(Math.log), y: e.map(Math.log) };
  const min = levenbergMarquardt(startValues(d, e), d, opts.maxIterations ?? MAX_ITERATIONS);
  const [a, p, b, q] = min.th;
  const dof = e.length - 4;
  const ratio = termRatio(min.th, d);
  const half = halfWidths(min.th, d, min.ss, confidence, ratio);
  return {
    p,
    q,
    Ch: Math.exp(a),
    Ct: Math.exp(b),
    pInterval: [p - half.p, p + half.p],
    qInterval: [q - half.q, q + half.q],
    sigma: Math.sqrt(min.ss / dof),
    dof,
    points: e.length,
    converged: min.converged,
    termRatio: ratio,
  };
}

// ---------------------------------------------------------------------------------------------------------------
// The verdict per order. The rules mirror analyseSeries (src/analysis/verdict.ts) with the interval in place of the
// pairwise rates, which a two-axis design does not have; thresholds are common practice, no source.

const fixed2 = (x: number): string => x.toFixed(2);
const plain = (x: number): string => String(Number(x.toPrecision(6)));
const percent = (x: number): string => String(Number((100 * x).toPrecision(3)));

interface Axis {
  /** 'spatial' or 'temporal'. */
  adjective: string;
  order: number;
  interval: [number, number];
  expected: number | null;
  /** What a loss of order usually means on this axis. */
  lossHint: string;
}

function headline(ax: Axis): string {
  const [lo, hi] = ax.interval;
  const base = Number.isFinite(lo) && Number.isFinite(hi)
    ? `${ax.adjective} order ${fixed2(ax.order)} (95% interval ${fixed2(lo)}–${fixed2(hi)})`
    : `${ax.adjective} order not determined (no interval: the design does not separate this term)`;
  return ax.expected === null ? base : `${base} against ${plain(ax.expected)}`;
}

/**
 * One order's verdict, in the order the rules apply:
 * - the whole interval below expected − tolerance: below-order; above expected + tolerance: above-order (for these
 *   global norms a flaw, as in verdict.ts: the error cannot fall faster than the best approximation);
 * - a half-width above CI_WIDTH_FACTOR × tolerance: inconclusive (a wide interval decides nothing, as in verdict.ts,
 *   even when the estimate happens to lie near the expected order);
 * - |order − expected| ≤ tolerance, or the interval contains the expected order: on-order;
 * - otherwise (the interval excludes the expected order but reaches into the band): inconclusive.
 */
function judgeAxis(ax: Axis & { expected: number }, tolerance: number): { verdict: Verdict; reason: string } {
  const [lo, hi] = ax.interval;
  const exp = ax.expected;
  const head = headline(ax);
  if (hi < exp - tolerance) return { verdict: 'below-order', reason: `${head}: below order — ${ax.lossHint}` };
  if (lo > exp + tolerance) {
    return {
      verdict: 'above-order',
      reason: `${head}: above order — in a global norm the error cannot fall faster than the best approximation, so ` +
        'it is measured wrongly or the expected order is wrong',
    };
  }
  const halfWidth = (hi - lo) / 2;
  if (!(halfWidth <= CI_WIDTH_FACTOR * tolerance)) {
    return {
      verdict: 'inconclusive',
      reason: `${head}: inconclusive — the interval is wider than ${CI_WIDTH_FACTOR} × ${plain(tolerance)} on each side; ` +
        'add (h, Δt) pairs or reduce the noise',
    };
  }
  if (Math.abs(ax.order - exp) <= tolerance) return { verdict: 'on-order', reason: `${head}: on order` };
  if (lo <= exp && exp <= hi) {
    return { verdict: 'on-order', reason: `${head}: on order within the scatter (the interval contains ${plain(exp)})` };
  }
  return {
    verdict: 'inconclusive',
    reason: `${head}: inconclusive — outside ${plain(exp)} ± ${plain(tolerance)} but the interval reaches into that band; ` +
      'add (h, Δt) pairs',
  };
}

/** The term of this axis is below NEGLIGIBLE_SHARE of the other at every point: its order is not identifiable. */
function negligibleReason(axis: 'space' | 'time', ratio: [number, number] | undefined): string | null {
  if (!ratio) return null;
  if (axis === 'time' && ratio[1] < NEGLIGIBLE_SHARE) {
    return `the temporal error is below ${percent(NEGLIGIBLE_SHARE)}% of the spatial one at every (h, Δt) pair, so ` +
      'the temporal order cannot be measured: refine h further or coarsen Δt';
  }
  if (axis === 'space' && ratio[0] > 1 / NEGLIGIBLE_SHARE) {
    return `the spatial error is below ${percent(NEGLIGIBLE_SHARE)}% of the temporal one at every (h, Δt) pair, so ` +
      'the spatial order cannot be measured: refine Δt further or coarsen h';
  }
  return null;
}

function axisOf(fit: TwoAxisFit, axis: 'space' | 'time', expected: number | null): Axis {
  return axis === 'space'
    ? {
      adjective: 'spatial', order: fit.p, interval: fit.pInterval, expected,
      lossHint: 'the spatial discretization loses an order (an inconsistent term, under-integration, wrong boundary data)',
    }
    : {
      adjective: 'temporal', order: fit.q, interval: fit.qInterval, expected,
      lossHint: 'the time stepper loses an order (for example a source evaluated at the old time level, or boundary ' +
        'data not updated within the step)',
    };
}

function judgeOne(fit: TwoAxisFit, axis: 'space' | 'time', expected: number | null, tolerance: number): { verdict: Verdict; reason: string } {
  const ax = axisOf(fit, axis, expected);
  const negligible = negligibleReason(axis, fit.termRatio);
  if (negligible) return { verdict: 'inconclusive', reason: `${headline(ax)}: inconclusive — ${negligible}` };
  if (ax.expected === null) return { verdict: 'inconclusive', reason: `${headline(ax)}: no expected order to compare with` };
  return judgeAxis(ax as Axis & { expected: number }, tolerance);
}

function checkExpected(name: string, expected: { space: number | null; time: number | null }, tolerance: number): void {
  for (const key of ['space', 'time'] as const) {
    const v = expected[key];
    if (v !== null && !Number.isFinite(v)) refuse(name, `expected.${key} = ${v}; give a number or null`, `expected.${key}`);
  }
  if (!(tolerance > 0) || !Number.isFinite(tolerance)) {
    refuse(name, `tolerance = ${tolerance}; give a positive number (default ${DEFAULT_TOLERANCE})`, 'tolerance');
  }
}

/**
 * The verdict on one norm over a two-axis design: a verdict per order (judgeAxis lists the rules), inconclusive for
 * an order whose term is negligible over the design, and both inconclusive when there is no fit or it did not
 * converge. Reasons name the axis, the estimate, its interval and the expected order.
 */
export function judgeTwoAxis(
  name: string,
  fit: TwoAxisFit | null,
  expected: { space: number | null; time: number | null },
  tolerance = DEFAULT_TOLERANCE,
): TwoAxisAnalysis {
  checkExpected(name, expected, tolerance);
  const base = { name, fit, expected, tolerance };
  if (fit === null) {
    return { ...base, verdict: { space: 'inconclusive', time: 'inconclusive' }, reasons: ['no joint fit of e = C_h h^p + C_t Δt^q: nothing to judge'] };
  }
  if (!fit.converged) {
    return {
      ...base,
      verdict: { space: 'inconclusive', time: 'inconclusive' },
      reasons: [
        `the joint fit of e = C_h h^p + C_t Δt^q did not converge; at the best point found the spatial order is ` +
          `${fixed2(fit.p)} and the temporal order ${fixed2(fit.q)} — the design may not separate the two terms: add (h, Δt) pairs`,
      ],
    };
  }
  const space = judgeOne(fit, 'space', expected.space, tolerance);
  const time = judgeOne(fit, 'time', expected.time, tolerance);
  const summary = `joint fit of e = C_h h^p + C_t Δt^q over ${fit.points} (h, Δt) pairs: residual standard deviation ` +
    `${fit.sigma.toExponential(1)} in ln e on ${fit.dof} degrees of freedom`;
  return { ...base, verdict: { space: space.verdict, time: time.verdict }, reasons: [space.reason, time.reason, summary] };
}
