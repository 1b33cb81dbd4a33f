// The verdict on one error series: pairwise rates, floors left out, a least-squares order over the finest
// usable levels with its 95% confidence interval, and reasons in words. Thresholds are common practice, no
// source; they are exported so callers and tests can name them.
import type { OrderFit, SeriesAnalysis, SeriesInput, Verdict } from './types.ts';
import { RungsInputError } from '../errors.ts';
import { asymptoticRange } from './asymptotic-range.ts';
import { fitOrderInDofs, fitOrderInH } from './fit.ts';
import { detectFloor, roundOffThreshold, type FloorKind } from './floors.ts';
import { pairwiseRates } from './rates.ts';
import { fallingAway, preAsymptoticDirection, rateList } from './rate-patterns.ts';

export const DEFAULT_TOLERANCE = 0.1;
export const DEFAULT_FIT_WINDOW = 3;
/** A confidence half-width above this many tolerances means the data cannot decide the verdict. */
export const CI_WIDTH_FACTOR = 3;
const CONFIDENCE = 0.95;

const fixed2 = (x: number): string => x.toFixed(2);
/** Expected orders and tolerances are echoed as the user wrote them (2, 0.1), not padded. */
const plain = (x: number): string => String(Number(x.toPrecision(6)));
const sci = (x: number): string => x.toExponential(1);
const floorName = (kind: FloorKind): string => (kind === 'solver' ? 'solver tolerance' : 'round-off');

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

/** Reasons read off the shape of the usable rates; `verdict` selects the wording. */
function patternReasons(
  usableRates: number[],
  range: number[],
  expected: number,
  tolerance: number,
  verdict: Verdict,
): string[] {
  const direction = preAsymptoticDirection(usableRates, expected, tolerance);
  if (direction) {
    const advice = verdict === 'on-order' ? '' : ' — add finer levels';
    return [
      `pre-asymptotic: pairwise rates still ${direction} toward the expected order (${rateList(usableRates)}); ` +
        `the coarsest levels are outside the asymptotic range${advice}`,
    ];
  }
  const fallen = fallingAway(usableRates, expected, tolerance);
  if (fallen) {
    return [
      `rates fall away on the finest levels (${rateList(fallen)}): the error stalls — look for a consistency ` +
        'error (quadrature, boundary data) or a solver floor',
    ];
  }
  if (range.length >= 2 && (verdict === 'below-order' || verdict === 'above-order')) {
    const mean = range.reduce((a, b) => a + b, 0) / range.length;
    if (Math.abs(mean - expected) > tolerance) {
      return [
        verdict === 'below-order'
          ? `rates are stable at ${fixed2(mean)} instead of ${plain(expected)}: a consistent loss of order — typical ` +
            'of an inconsistent term (under-integration, wrong boundary data, wrong sign)'
          : `rates are stable at ${fixed2(mean)} instead of ${plain(expected)}: higher than expected — ` +
            'superconvergence (symmetric meshes, special points) or an expected order set too low',
      ];
    }
  }
  return [];
}

/**
 * Analyse one error series. Decisions (documented here because the verdict depends on them):
 * - `exact` when every level is at round-off relative to its scale (scale 1 when none is given).
 * - Floor levels (the trailing run found by detectFloor) and isolated floor-like levels are left out.
 * - Fewer than 2 usable levels, or no expected order: `inconclusive`.
 * - Exactly 2 levels in the fit: the verdict follows the single rate, with a "too few levels" reason; there is
 *   no confidence interval, so the width rule cannot apply.
 * - 3 or more levels: `inconclusive` when the CI half-width exceeds CI_WIDTH_FACTOR × tolerance and the CI
 *   still meets the band expected ± tolerance; otherwise on/below/above-order by |fitted - expected| ≤ tolerance.
 * Levels are named 1-based in messages (people count from 1); indices in data stay 0-based.
 */
export function analyseSeries(input: SeriesInput): SeriesAnalysis {
  validate(input);
  const { errors, dofs, expected, tolerance } = input;
  const n = errors.length;
  const rates = pairwiseRates(errors, input.h, dofs, input.dim);
  const floor = detectFloor(errors, dofs, rates, input.scale, input.floorHint);
  const base = {
    name: input.name,
    expected,
    tolerance,
    rates,
    floorFrom: floor.from,
    floorKind: floor.kind,
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
  const end = floor.from ?? n;
  if (floor.from !== null) {
    const note = `floor: ${floorName(floor.kind!)} from level ${floor.from + 1}`;
    warnings.push(note);
    const span = floor.from === n - 1 ? `level ${n}` : `levels ${floor.from + 1}–${n}`;
    trailing.push(`${note} (${span} left out of the fit)`);
  }
  const usable: number[] = [];
  for (let i = 0; i < end; i++) {
    const kind = floor.levels[i];
    if (kind === null) usable.push(i);
    else warnings.push(`level ${i + 1} looks like a ${floorName(kind!)} floor but finer levels do not; left out of the fit`);
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

  if (usable.length < 2) {
    return {
      ...base,
      fit: null,
      asymptoticFrom: range.from,
      verdict: 'inconclusive',
      reasons: [`too few levels: ${usable.length} usable, need at least 2 to estimate an order`, ...trailing],
      warnings,
    };
  }

  const fitLevels = usable.slice(-input.fitWindow);
  const fit = input.h
    ? fitOrderInH(errors, input.h, fitLevels, CONFIDENCE)
    : fitOrderInDofs(errors, dofs, input.dim, fitLevels, CONFIDENCE);

  let verdict: Verdict;
  const reasons: string[] = [];
  if (expected === null) {
    verdict = 'inconclusive';
    reasons.push(`no expected order to compare with: ${fitText(fit)}`);
  } else {
    const headline = `${fitText(fit)} vs expected ${plain(expected)} ± ${plain(tolerance)}`;
    if (fitLevels.length === 2) {
      verdict = classify(fit.order, expected, tolerance);
      reasons.push(
        headline,
        usable.length === 2
          ? 'too few levels: 2 usable, need 3 for a confidence interval'
          : `too few levels in the fit window: 2, need 3 for a confidence interval (raise fitWindow)`,
      );
    } else {
      const halfWidth = (fit.ciHigh - fit.ciLow) / 2;
      // A wide interval that lies wholly outside the tolerance band still decides the verdict.
      const meetsBand = fit.ciLow <= expected + tolerance && fit.ciHigh >= expected - tolerance;
      if (halfWidth > CI_WIDTH_FACTOR * tolerance && meetsBand) {
        verdict = 'inconclusive';
        reasons.push(
          `confidence interval wider than the tolerance: half-width ${fixed2(halfWidth)} > ${CI_WIDTH_FACTOR} × ` +
            `${plain(tolerance)}, the data cannot decide — add levels or reduce the noise`,
          headline,
        );
      } else {
        verdict = classify(fit.order, expected, tolerance);
        reasons.push(headline);
      }
    }
    reasons.push(...patternReasons(usableRates, range.rates, expected, tolerance, verdict));
  }
  reasons.push(...trailing);
  return { ...base, fit, asymptoticFrom: range.from, verdict, reasons, warnings };
}
