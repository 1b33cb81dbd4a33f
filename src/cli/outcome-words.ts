// The words for what became of a study, used by every line the commands print. One vocabulary:
//   as expected      its verdicts are the ones it declares (a study that demonstrates a flaw: the flaw was seen)
//   not as expected  a verdict departs from what it declares (a flaw demonstration that did not show its flaw too)
//   error            it could not be run or judged: bad input, a solver that failed, a report not written
//   incomplete       the run was stopped before its ladder ended (only the finished levels are reported)
// The gate's own result over all studies is "check passed" / "check failed" (src/gate/status.ts); the verdict of a
// norm (on-order, below-order, …) is the analysis's word, not an outcome.
export const OUTCOME = {
  asExpected: 'as expected',
  notAsExpected: 'not as expected',
  error: 'error',
  incomplete: 'incomplete',
} as const;

export type Outcome = (typeof OUTCOME)[keyof typeof OUTCOME];

/** "as expected" or "not as expected" for a study's (or a sweep's) result. */
export function outcomeWord(asExpected: boolean): Outcome {
  return asExpected ? OUTCOME.asExpected : OUTCOME.notAsExpected;
}
