// The verdict on one error series: pairwise rates, floors left out, a least-squares order over the finest
// usable levels with its 95% confidence interval, and reasons in words. The rules are listed on analyseSeries and
// in the README ("How the verdict is reached"); thresholds are common practice, no source, unless named, and are
// exported so callers and tests can name them.
import type { OrderFit, SeriesAnalysis, SeriesInput, Verdict } from './types.ts';
import { RungsInputError } from '../errors.ts';
import { asymptoticRange } from './asymptotic-range.ts';
import { fitOrderInDofs, fitOrderInH } from './fit.ts';
import { detectFloor, roundOffThreshold, type FloorKind } from './floors.ts';
import { pairwiseRates } from './rates.ts';
import { rateList, rateShape, type RateShape } from './rate-patterns.ts';
import { rateInDofs, rateInH } from './rates.ts';

export const DEFAULT_TOLERANCE = 0.1;
export const DEFAULT_FIT_WINDOW = 3;
/** A confidence half-width above this many tolerances means the data cannot decide the verdict. */
export const CI_WIDTH_FACTOR = 3;
const CONFIDENCE = 0.95;

const fixed2 = (x: number): string => x.toFixed(2);
/** Expected orders and tolerances are echoed as the user wrote them (2, 0.1), not padded. */
const plain = (x: number): string => String(Number(x.toPrecision(6)));
const sci = (x: number): string => x.toExponential(1);
const floorName = (kind: FloorKind): string =>
  kind === 'solver' ? 'solver tolerance' : kind === 'setup' ? "your solver's own residual" : 'round-off';
/** A verdict needs a fit over at least this many levels (two levels give one rate and no interval). */
export const MIN_FIT_LEVELS = 3;

function fail(input: SeriesInput, field: string, message: string): never {
  throw new RungsInputError(`series "${input.name}": ${field} ${message}`, `${input.name}.${field}`);
}

function validate(input: SeriesInput): void {
  const n = input.errors.length;
  if (n < 1) fail(input, 'errors', 'is empty; give one error per level');
  input.errors.forEach((e, i) => {
    if (!(e >= 0) || !Number.isFinite(e)) fail(input, 'errors', `[${i}] = ${e}; errors must be finite and ≥ 0`);
  });
  if (input.dofs.length !== n) fail(input, 'dofs', `has ${input.dofs.length} entries for ${n} errors`);
  input.dofs.forEach((d, i) => {
    if (!(d > 0) || !Number.isFinite(d)) fail(input, 'dofs', `[${i}] = ${d}; dof counts must be positive`);
  });
  if (input.h) {
    const h = input.h;
    if (h.length !== n) fail(input, 'h', `has ${h.length} entries for ${n} errors`);
    h.forEach((v, i) => {
      if (!(v > 0) || !Number.isFinite(v)) fail(input, 'h', `[${i}] = ${v}; mesh sizes must be positive`);
      if (i > 0 && !(v < h[i - 1]!)) fail(input, 'h', `must decrease from level to level (h[${i - 1}] = ${h[i - 1]}, h[${i}] = ${v})`);
    });
  } else {
    input.dofs.forEach((d, i) => {
      if (i > 0 && !(d > input.dofs[i - 1]!)) fail(input, 'dofs', `must increase from level to level when fitting in dofs (level ${i})`);
    });
  }
  if (!(Number.isInteger(input.dim) && input.dim >= 1)) fail(input, 'dim', `= ${input.dim}; give the spatial dimension 1, 2 or 3`);
  if (input.expected !== null && !Number.isFinite(input.expected)) fail(input, 'expected', `= ${input.expected}; give a number or null`);
  if (!(input.tolerance > 0) || !Number.isFinite(input.tolerance)) fail(input, 'tolerance', `= ${input.tolerance}; give a positive number (default ${DEFAULT_TOLERANCE})`);
  if (!(Number.isInteger(input.fitWindow) && input.fitWindow >= 2)) fail(input, 'fitWindow', `= ${input.fitWindow}; give an integer ≥ 2 (default ${DEFAULT_FIT_WINDOW})`);
  if (input.floorHint) {
    if (input.floorHint.length !== n) fail(input, 'floorHint', `has ${input.floorHint.length} entries for ${n} errors`);
    input.floorHint.forEach((v, i) => {
      if (v !== null && !(v >= 0 && Number.isFinite(v))) fail(input, 'floorHint', `[${i}] = ${v}; give a finite number ≥ 0 or null`);
    });
  }
  if (input.setupFloor) {
    if (input.setupFloor.length !== n) fail(input, 'setupFloor', `has ${input.setupFloor.length} entries for ${n} errors`);
    input.setupFloor.forEach((v, i) => {
      if (v !== null && !(v >= 0 && Number.isFinite(v))) fail(input, 'setupFloor', `[${i}] = ${v}; give a finite number ≥ 0 or null`);
    });
  }
  if (input.scale) {
    if (input.scale.length !== n) fail(input, 'scale', `has ${input.scale.length} entries for ${n} errors`);
    input.scale.forEach((s, i) => {
      if (!(s > 0) || !Number.isFinite(s)) fail(input, 'scale', `[${i}] = ${s}; scales must be positive`);
    });
  }
}


function classify(order: number, expected: number, tolerance: number): Verdict {
  if (Math.abs(order - expected) <= tolerance) return 'on-order';
  return order < expected ? 'below-order' : 'above-order';
}

function fitText(fit: OrderFit): string {
  if (fit.levels.length === 2) return `fitted order ${fixed2(fit.order)} (two levels, no confidence interval)`;
  return `fitted order ${fixed2(fit.order)} (95% CI ${fixed2(fit.ciLow)}–${fixed2(fit.ciHigh)})`;
}

const span = (from: number, to: number): string => (from === to ? `level ${from + 1}` : `levels ${from + 1}–${to + 1}`);

/** Rates between consecutive levels of the fit (they may skip an isolated floor-like level). */
function windowRates(input: SeriesInput, levels: readonly number[]): number[] {
  const { errors: e, dofs, h } = input;
  const out: number[] = [];
  for (let j = 1; j < levels.length; j++) {
    const a = levels[j - 1]!;
    const b = levels[j]!;
    const r = h ? rateInH(e[a]!, e[b]!, h[a]!, h[b]!) : rateInDofs(e[a]!, e[b]!, dofs[a]!, dofs[b]!, input.dim);
    if (Number.isFinite(r)) out.push(r);
  }
  return out;
}

/** What an order above the expected one means for this series: accepted where the study declares it; in a global
 *  norm a sign of a wrongly measured error (the best-approximation lower bound); elsewhere possibly superconvergence. */
function aboveReason(input: SeriesInput, expected: number): string {
  if (input.allowAboveOrder !== undefined) {
    return `above the expected order, accepted: the study declares it for ${input.name} (${input.allowAboveOrder})`;
  }
  if (input.normKind === 'global') {
    // For u outside the discrete space the error of degree-k elements is bounded below by c·h^(k+1−m) in H^m
    // (Lin, Xie & Xu 2014, Math. Comp. 83; from memory), so a global norm cannot converge faster than expected.
    return `an order above ${plain(expected)} in a global norm is not a pass: for a solution outside the discrete space ` +
      'the error cannot fall faster than the best approximation, so it is likely measured wrongly (for example the H1 ' +
      "error taken against the interpolant's gradient instead of ∇u, or against I_h u instead of u) or the expected " +
      'order is wrong';
  }
  return `higher than expected — superconvergence at special points (nodes, symmetric meshes), a functional, or an ` +
    `expected order set too low; if the study means it, declare allow.aboveOrder for ${input.name} with the reason`;
}

/** What the rates do, in words; `verdict` selects the advice. */
function shapeReasons(shape: RateShape, input: SeriesInput, expected: number, tolerance: number, verdict: Verdict): string[] {
  const list = rateList(shape.rates);
  switch (shape.kind) {
    case 'flat':
      return [`rates stay near zero (${list}): the error does not decrease with h — the discrete problem converges to ` +
        'something other than u (a wrong sign or missing term, data that do not match u)'];
    case 'stopped':
      return [`the errors stop at a constant (rates ${list}): something that does not shrink with h limits them — a ` +
        'fixed solver tolerance, data or constants given to limited digits, or an inconsistent term'];
    case 'approaching':
      return [`pre-asymptotic: pairwise rates still ${shape.direction} toward the expected order (${list}); ` +
        `the coarsest levels are outside the asymptotic range${verdict === 'on-order' ? '' : ' — add finer levels'}`];
    case 'falling-away':
      return [`rates fall away from ${plain(expected)} on the finest levels (${list}): the error stalls — look for a ` +
        'consistency error (quadrature, boundary data) or a solver floor'];
    case 'stable':
      if (shape.rates.length < 2 || Math.abs(shape.mean - expected) <= tolerance) return [];
      if (shape.mean < expected && input.axis === 'dt') {
        // In Δt on a fixed mesh, a consistent loss points at the stepper, not at the space discretization.
        return [`rates in Δt are stable at ${fixed2(shape.mean)} instead of ${plain(expected)}: a consistent loss of temporal order — ` +
          'typical of a time-stepping slip: a source or boundary data taken at the wrong time (the old time level, the ' +
          'start of the step instead of a stage time), a start-up step of too low an order, or a stepper of lower order than declared'];
      }
      if (shape.mean < expected) {
        return [`rates are stable at ${fixed2(shape.mean)} instead of ${plain(expected)}: a consistent loss of order — ` +
          'typical of an inconsistent term (under-integration, wrong boundary data, wrong sign)'];
      }
      return [`rates are stable at ${fixed2(shape.mean)} instead of ${plain(expected)}: ${aboveReason(input, expected)}`];
    case 'drifting': {
      const last = shape.rates[shape.rates.length - 1]!;
      return [`rates ${shape.direction === 'rising' ? 'rise' : 'fall'} (${list}) but stay ${fixed2(Math.abs(last - expected))} ` +
        `from ${plain(expected)}: not a pre-asymptotic approach`];
    }
    case 'scattered':
      return [`rates scatter without a trend (${list})`];
    default:
      return [];
  }
}

/**
 * Analyse one error series. The rules, in the order they apply (README, "How the verdict is reached"):
 * - `exact` when every level is at round-off relative to its scale (scale 1 when none is given).
 * - Floors: the trailing run of round-off or rungs's own solver floors, and isolated floor-like levels, are left out
 *   with a warning. A floor of the code under test (`setupFloor`) is a failure of the setup: named first, and an
 *   on-order or above-order verdict becomes `inconclusive`.
 * - Fewer than 2 usable levels, or no expected order: `inconclusive`.
 * - A fit over fewer than MIN_FIT_LEVELS levels (two levels, however they came about): `inconclusive`, unless the
 *   study declares `allowFewLevels` (then the rules below apply and the reason says so). A window that floors cut
 *   below `fitWindow` but that still holds three levels decides, with a reason saying so.
 * - Every pairwise rate in the fit window below expected − tolerance, or rates that fall away or stop at a constant:
 *   `below-order`, whatever the interval's width. Every rate above expected + tolerance: `above-order`.
 * - A half-width above CI_WIDTH_FACTOR × tolerance with rates on both sides of the expected order: `inconclusive`.
 * - Fitted order within the tolerance: `on-order`. Outside it with rates approaching the expected order
 *   (pre-asymptotic): below/above-order by the fitted order. Otherwise, with three or more levels, an interval that
 *   meets the band means the departure is jitter: `on-order`; else below/above-order by the fitted order.
 * - `above-order` carries the reason for its kind of norm (aboveReason); whether it passes is the caller's rule.
 * Levels are named 1-based in messages (people count from 1); indices in data stay 0-based.
 */
export function analyseSeries(input: SeriesInput): SeriesAnalysis {
  validate(input);
  const { errors, dofs, expected, tolerance } = input;
  const n = errors.length;
  const rates = pairwiseRates(errors, input.h, dofs, input.dim);
  const floor = detectFloor(errors, dofs, rates, input.scale, input.floorHint, {}, input.setupFloor);
  const allowed = input.allowAboveOrder !== undefined || input.allowFewLevels !== undefined
    ? {
      ...(input.allowAboveOrder !== undefined ? { aboveOrder: input.allowAboveOrder } : {}),
      ...(input.allowFewLevels !== undefined ? { fewLevels: input.allowFewLevels } : {}),
    }
    : undefined;
  const base = {
    name: input.name,
    expected,
    tolerance,
    rates,
    floorFrom: floor.from,
    floorKind: floor.kind,
    ...(allowed ? { allowed } : {}),
    ...(input.axis === 'dt' ? { axis: 'dt' as const } : {}),
  };

  if (floor.levels.every((k) => k === 'round-off')) {
    let worst = 0;
    let worstAt = 0;
    errors.forEach((e, i) => {
      const rel = e / (input.scale?.[i] ?? 1);
      if (rel >= worst) [worst, worstAt] = [rel, i];
    });
    return {
      ...base,
      fit: null,
      asymptoticFrom: null,
      verdict: 'exact',
      reasons: [
        `all errors at round-off: largest error/scale ${sci(worst)} at level ${worstAt + 1} (threshold ` +
          `${sci(roundOffThreshold(dofs[worstAt]!))}) — the discrete space reproduces the exact solution`,
      ],
      warnings: [],
    };
  }

  const warnings: string[] = [];
  const trailing: string[] = [];
  let setupReason: string | null = null;
  const end = floor.from ?? n;
  if (floor.from !== null) {
    const note = `floor: ${floorName(floor.kind!)} from level ${floor.from + 1}`;
    warnings.push(note);
    const left = `${span(floor.from, n - 1)} left out of the fit`;
    if (floor.levels.slice(floor.from).includes('setup')) {
      // The code under test says its own solve limits the error: its setup must change, not the verdict's data.
      const at = floor.from + floor.levels.slice(floor.from).indexOf('setup');
      setupReason = `setup failure: your solver's own residual limits the error from level ${at + 1}: tighten it ` +
        `(${left}; the levels it spoils say nothing about the discretization)`;
    }
    if (!setupReason || floor.kind !== 'setup') trailing.push(`${note} (${left})`);
  }
  const usable: number[] = [];
  for (let i = 0; i < end; i++) {
    const kind = floor.levels[i];
    if (kind === null) usable.push(i);
    else warnings.push(`level ${i + 1} looks like ${kind === 'setup' ? '' : 'a '}${floorName(kind!)} floor but finer levels do not; left out of the fit`);
  }
  const usableSet = new Set(usable);
  const usableRates: number[] = [];
  for (let i = 1; i < end; i++) {
    const r = rates[i];
    if (usableSet.has(i) && usableSet.has(i - 1) && r !== null && r !== undefined) usableRates.push(r);
  }
  const lastUsable = usable.length > 0 ? usable[usable.length - 1]! : 0;
  const range = asymptoticRange(
    rates.map((r, i) => (usableSet.has(i) && usableSet.has(i - 1) ? r : null)),
    lastUsable,
    tolerance,
  );
  const lead = setupReason ? [setupReason] : [];

  if (usable.length < 2) {
    return {
      ...base,
      fit: null,
      asymptoticFrom: range.from,
      verdict: setupReason ? setupVerdict(rates, floor.levels, input.expected, tolerance) : 'inconclusive',
      reasons: [...lead, `too few levels: ${usable.length} usable, need at least 2 to estimate an order`, ...trailing],
      warnings,
    };
  }

  const fitLevels = usable.slice(-input.fitWindow);
  const fit = input.h
    ? fitOrderInH(errors, input.h, fitLevels, CONFIDENCE)
    : fitOrderInDofs(errors, dofs, input.dim, fitLevels, CONFIDENCE);

  if (expected === null) {
    return {
      ...base, fit, asymptoticFrom: range.from, verdict: 'inconclusive',
      reasons: [...lead, `no expected order to compare with: ${fitText(fit)}`, ...trailing], warnings,
    };
  }

  const headline = `${fitText(fit)} vs expected ${plain(expected)} ± ${plain(tolerance)}`;
  const W = windowRates(input, fitLevels);
  const shape = rateShape(usableRates, expected, tolerance);
  const after: string[] = [];
  let verdict: Verdict;
  const short = fitLevels.length < MIN_FIT_LEVELS;
  const optIn = `add levels, or declare allow.fewLevels for ${input.name} with the reason`;
  if (!short && fitLevels.length < Math.min(input.fitWindow, n)) {
    // Still a verdict (three levels give an interval), but the reader should know the window was cut.
    after.push(`the fit window holds ${fitLevels.length} of the ${input.fitWindow} levels the study asks for: the rest are left out as floors`);
  }
  if (short && input.allowFewLevels === undefined) {
    verdict = 'inconclusive';
    const m = fitLevels.length;
    lead.push(
      usable.length > m
          ? `too few levels in the fit window: ${m}, need ${MIN_FIT_LEVELS} for a verdict (raise fitWindow)`
          : floor.from !== null
            ? `too few levels: the floor from level ${floor.from + 1} leaves ${m} usable, and ${m} levels give one rate and ` +
              `no confidence interval — a verdict needs ${MIN_FIT_LEVELS}; ${optIn}`
            : `too few levels: ${m} usable, need ${MIN_FIT_LEVELS} for a verdict (two levels give one rate and no ` +
              `confidence interval); ${optIn}`,
    );
  } else {
    if (short) after.push(`a verdict on ${fitLevels.length} levels, accepted: the study declares it for ${input.name} (${input.allowFewLevels})`);
    const allBelow = W.length > 0 && W.every((r) => r < expected - tolerance);
    const allAbove = W.length > 0 && W.every((r) => r > expected + tolerance);
    const stalls = shape.kind === 'falling-away' || shape.kind === 'stopped' || shape.kind === 'flat';
    const hasInterval = fit.levels.length >= MIN_FIT_LEVELS;
    const halfWidth = hasInterval ? (fit.ciHigh - fit.ciLow) / 2 : Number.NaN;
    const straddle = W.length >= 2 && Math.min(...W) < expected && Math.max(...W) > expected;
    const meetsBand = hasInterval && fit.ciLow <= expected + tolerance && fit.ciHigh >= expected - tolerance;
    if (allBelow || stalls) {
      verdict = 'below-order';
      if (allBelow && W.length > 1) after.push(`every pairwise rate in the fit window (${rateList(W)}) is below ${plain(expected)} − ${plain(tolerance)}`);
    } else if (allAbove) {
      verdict = 'above-order';
      if (W.length > 1) after.push(`every pairwise rate in the fit window (${rateList(W)}) is above ${plain(expected)} + ${plain(tolerance)}`);
    } else if (halfWidth > CI_WIDTH_FACTOR * tolerance && straddle) {
      verdict = 'inconclusive';
      lead.push(
        `confidence interval wider than the tolerance: half-width ${fixed2(halfWidth)} > ${CI_WIDTH_FACTOR} × ` +
          `${plain(tolerance)} and the rates in the fit window (${rateList(W)}) lie on both sides of ${plain(expected)}, ` +
          'the data cannot decide — add levels or reduce the noise',
      );
    } else if (Math.abs(fit.order - expected) <= tolerance) {
      verdict = 'on-order';
    } else if (shape.kind === 'approaching' || !meetsBand) {
      verdict = classify(fit.order, expected, tolerance);
    } else {
      verdict = 'on-order';
      after.push(
        `on order within the scatter: the fitted order lies outside ${plain(expected)} ± ${plain(tolerance)}, but the ` +
          `rates in the fit window (${rateList(W)}) do not all depart on one side and the 95% interval meets the band — ` +
          'jitter (perturbed meshes, noisy errors), not a change of order',
      );
    }
    if (verdict === 'above-order' && !(shape.kind === 'stable' && shape.rates.length >= 2 && shape.mean > expected + tolerance)) {
      after.push(aboveReason(input, expected));
    }
  }
  if (setupReason && verdict !== 'below-order') verdict = setupVerdict(rates, floor.levels, expected, tolerance);
  const reasons = [...lead, headline, ...after, ...shapeReasons(shape, input, expected, tolerance, verdict), ...trailing];
  return { ...base, fit, asymptoticFrom: range.from, verdict, reasons, warnings };
}

/** The verdict on a code whose own solver spoils its finest levels: the error it delivers there is what it computes, so
 *  a rate into a spoiled level below expected − tolerance is a loss of order (below-order); otherwise the data cannot
 *  decide (inconclusive). Common practice, no source. */
function setupVerdict(rates: readonly (number | null)[], levels: readonly (FloorKind | null)[], expected: number | null, tolerance: number): Verdict {
  if (expected === null) return 'inconclusive';
  for (let i = 1; i < rates.length; i++) {
    const r = rates[i];
    if (levels[i] === 'setup' && r !== null && r !== undefined && r < expected - tolerance) return 'below-order';
  }
  return 'inconclusive';
}
