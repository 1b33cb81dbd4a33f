// Public API of the analysis folder: rates, fits with confidence intervals, floors, verdicts, Richardson
// extrapolation and the GCI.
export type { NormKind, OrderFit, SeriesAnalysis, SeriesInput, Verdict } from './types.ts';
export { rateInH, rateInDofs, pairwiseRates } from './rates.ts';
export { tQuantileTwoSided, studentTTwoSidedTail, studentTDensity } from './tquantile.ts';
export { normalUpperQuantile, normalUpperTail } from './normal-quantile.ts';
export { fitLine, fitOrderInH, fitOrderInDofs, type LineFit } from './fit.ts';
export { detectFloor, roundOffThreshold, type FloorDetection, type FloorKind, type FloorOptions } from './floors.ts';
export { asymptoticRange, type AsymptoticRange } from './asymptotic-range.ts';
export { analyseSeries, DEFAULT_TOLERANCE, DEFAULT_FIT_WINDOW, CI_WIDTH_FACTOR, MIN_FIT_LEVELS } from './verdict.ts';
export { rateShape, approachDirection, fallingAway, STALL_RATE, APPROACH_CLOSURE, type RateShape } from './rate-patterns.ts';
export {
  assessQuasiOptimality,
  applyQuasiOptimality,
  QUASI_OPTIMALITY_SLACK,
  CEA_SHRINK,
  type CeaAssessment,
  type CeaLevel,
} from './cea.ts';
export { crossNormReasons, addCrossNormReasons, type CrossNormReason } from './diagnosis.ts';
export {
  richardsonExtrapolate,
  observedOrderThreeLevels,
  richardsonSequence,
  type ThreeLevelOrder,
  type RichardsonSequence,
} from './richardson.ts';
export {
  gridConvergenceIndex,
  gciTwoGrids,
  representativeSize,
  MIN_REFINEMENT_RATIO,
  SAFETY_FACTOR_THREE_GRIDS,
  SAFETY_FACTOR_TWO_GRIDS,
  type GciResult,
  type ConvergenceKind,
} from './gci.ts';
export { analyseQuantity, type QuantityReport, type QuantityOptions } from './quantities.ts';
export type { TimeAxis, TwoAxisAnalysis, TwoAxisFit } from './types.ts';
export { fitTwoAxis, judgeTwoAxis, MIN_TWO_AXIS_POINTS, NEGLIGIBLE_SHARE, type TwoAxisOptions } from './two-axis.ts';
export {
  detectAxisFloor,
  axisFloorReason,
  MIN_FLOOR_LEVELS,
  FLOOR_SHARE,
  DIFFERENCE_TOLERANCE_FACTOR,
  type AxisFloor,
} from './time-floors.ts';
