// Least-squares fit of ln e against ln h (or ln N) with the slope's standard error and a Student-t
// confidence interval on ν = m - 2 degrees of freedom (ordinary least squares for a straight line, e.g.
// Draper & Smith, Applied Regression Analysis, 3rd ed. 1998, ch. 1). The line itself is simple-statistics'
// linearRegression (centred sums, the same operations in the same order as the hand-written fit it replaced, so
// the same bits); the slope's standard error, which it does not give, is s / √Sxx with Sxx from its
// sumNthPowerDeviations.
import { linearRegression, sumNthPowerDeviations } from 'simple-statistics';
import type { OrderFit } from './types.ts';
import { RungsInputError } from '../errors.ts';
import { tQuantileTwoSided } from './tquantile.ts';

export interface LineFit {
  slope: number;
  intercept: number;
  /** Standard error of the slope; NaN with two points. */
  slopeStderr: number;
  /** Residual standard deviation sqrt(SSR / (m - 2)); NaN with two points. */
  residualStd: number;
  points: number;
}

/** Straight line y = intercept + slope x through m ≥ 2 points with distinct x, by the centred normal equations. */
export function fitLine(x: readonly number[], y: readonly number[]): LineFit {
  const m = x.length;
  if (m < 2 || y.length !== m) {
    throw new RungsInputError(`a line fit needs at least 2 points with matching x and y, got ${m} and ${y.length}`, 'fit');
  }
  // Sxx = Σ (x − x̄)²: zero when every abscissa is the same.
  const sxx = sumNthPowerDeviations(x, 2);
  if (!(sxx > 0)) {
    throw new RungsInputError('a line fit needs at least two distinct abscissae (mesh sizes or dof counts)', 'fit');
  }
  const { m: slope, b: intercept } = linearRegression(x.map((xi, i) => [xi, y[i]!]));
  if (m === 2) return { slope, intercept, slopeStderr: Number.NaN, residualStd: Number.NaN, points: m };
  let ssr = 0;
  for (let i = 0; i < m; i++) {
    const r = y[i]! - intercept - slope * x[i]!;
    ssr += r * r;
  }
  const residualStd = Math.sqrt(ssr / (m - 2));
  return { slope, intercept, slopeStderr: residualStd / Math.sqrt(sxx), residualStd, points: m };
}

function orderFitFromLine(line: LineFit, orderPerSlope: number, levels: number[], confidence: number): OrderFit {
  const order = orderPerSlope * line.slope;
  const stderr = Math.abs(orderPerSlope) * line.slopeStderr;
  if (line.points === 2) {
    return { order, stderr: Number.NaN, ciLow: -Infinity, ciHigh: Infinity, levels, logConstant: line.intercept };
  }
  const half = tQuantileTwoSided(line.points - 2, 1 - confidence) * stderr;
  return { order, stderr, ciLow: order - half, ciHigh: order + half, levels, logConstant: line.intercept };
}

function checkLevels(levels: readonly number[], count: number, errors: readonly number[]): void {
  for (const i of levels) {
    if (!Number.isInteger(i) || i < 0 || i >= count) {
      throw new RungsInputError(`fit level ${i} is not a level index in 0..${count - 1}`, 'levels');
    }
    if (!(errors[i]! > 0) || !Number.isFinite(errors[i]!)) {
      throw new RungsInputError(`fit level ${i} has error ${errors[i]}; a log-log fit needs positive finite errors`, 'errors');
    }
  }
}

function checkConfidence(confidence: number): void {
  if (!(confidence > 0 && confidence < 1)) {
    throw new RungsInputError(`confidence level must lie strictly between 0 and 1, got ${confidence}`, 'confidence');
  }
}

/** Fitted order p in e = C h^p over the given level indices; logConstant = ln C. */
export function fitOrderInH(
  errors: readonly number[],
  h: readonly number[],
  levels: readonly number[],
  confidence = 0.95,
): OrderFit {
  checkConfidence(confidence);
  checkLevels(levels, Math.min(errors.length, h.length), errors);
  const x = levels.map((i) => Math.log(h[i]!));
  const y = levels.map((i) => Math.log(errors[i]!));
  return orderFitFromLine(fitLine(x, y), 1, [...levels], confidence);
}

/**
 * Fitted order from ln e = a + s ln N, reported as p = -dim s. logConstant is a, which is also ln C in
 * e = C h^p when h is taken as N^(-1/dim).
 */
export function fitOrderInDofs(
  errors: readonly number[],
  dofs: readonly number[],
  dim: number,
  levels: readonly number[],
  confidence = 0.95,
): OrderFit {
  checkConfidence(confidence);
  checkLevels(levels, Math.min(errors.length, dofs.length), errors);
  const x = levels.map((i) => Math.log(dofs[i]!));
  const y = levels.map((i) => Math.log(errors[i]!));
  return orderFitFromLine(fitLine(x, y), -dim, [...levels], confidence);
}
