import type { SeriesAnalysis, TwoAxisAnalysis, Verdict } from '../analysis/types.ts';
import type { StudyResult } from '../study/result.ts';

/** A symbol per verdict so that no report relies on colour alone; the word is always printed beside it. */
const SYMBOL: Record<Verdict, string> = {
  'on-order': '✓',
  'below-order': '✗',
  'above-order': '↑',
  exact: '≡',
  inconclusive: '?',
};

/** "✓ on-order" */
export function verdictLabel(verdict: Verdict): string {
  return `${SYMBOL[verdict]} ${verdict}`;
}

export function verdictSymbol(verdict: Verdict): string {
  return SYMBOL[verdict];
}

/** The verdict a norm should show: 'on-order' for a plain study, else the declared one. */
export function expectedVerdict(result: StudyResult): Verdict {
  return result.expectation.verdict === 'pass' ? 'on-order' : result.expectation.verdict;
}

/** How one norm of one study compares with what the study declared. */
export interface NormOutcome {
  norm: string;
  analysis: SeriesAnalysis;
  expectedVerdict: Verdict;
  asExpected: boolean;
  /** One sentence saying why the norm is not as expected; empty when it is. */
  problem: string;
  /** A two-axis design: the norm's joint fit, whose two verdicts (space and time) decide the outcome. */
  twoAxis?: TwoAxisAnalysis;
  /** A two-axis design: the verdict that departs (the spatial one first), for the failure's type. */
  departing?: Verdict;
}

/** Verdicts a plain ('pass') study accepts: the order was reached, or the space reproduces u, or it converges faster. */
export const ACCEPTABLE_FOR_PASS: readonly Verdict[] = ['on-order', 'exact'];

/** A verdict that passes a plain study: on-order or exact, or above-order where the study declares it (a nodal or
 *  superconvergent norm), the same rule as the study's own expectation check. */
const passes = (a: SeriesAnalysis): boolean => ACCEPTABLE_FOR_PASS.includes(a.verdict) || (a.verdict === 'above-order' && a.allowed?.aboveOrder !== undefined);

/**
 * Per-norm reading of a study's expectation, consistent with the study's own `asExpected` (which sets the exit status):
 * - 'pass': a norm is as expected when its verdict is on-order or exact, or above-order where the study allows it;
 * - 'exact': when it is exact;
 * - a declared flaw (below-order, above-order, inconclusive): when it shows the flaw or an acceptable verdict.
 * A study that is as expected has every norm as expected. A study that is not, yet has no norm failing the rules
 * above (a declared flaw that no norm showed), has every norm marked, so that the departure is visible per norm.
 */
export function normOutcomes(result: StudyResult): NormOutcome[] {
  const declared = expectedVerdict(result);
  const outcomes = result.analyses.map((analysis): NormOutcome => {
    const joint = result.time?.axis === 'grid' ? result.twoAxis?.find((t) => t.name === analysis.name) : undefined;
    if (joint) return gridOutcome(result, analysis, joint, declared);
    const v = analysis.verdict;
    const fits =
      result.expectation.verdict === 'pass'
        ? passes(analysis)
        : declared === 'exact'
          ? v === 'exact'
          : v === declared || passes(analysis);
    const ok = result.asExpected || fits;
    return { norm: analysis.name, analysis, expectedVerdict: declared, asExpected: ok, problem: ok ? '' : `verdict ${v}, expected ${declared}` };
  });
  if (!result.asExpected && outcomes.every((o) => o.asExpected)) {
    const flaw = result.expectation.flaw ? ` (${result.expectation.flaw})` : '';
    for (const o of outcomes) {
      o.asExpected = false;
      o.problem = `the study declared ${declared}${flaw}, which no norm showed (this norm: ${o.analysis.verdict})`;
    }
  }
  return outcomes;
}

/**
 * One norm of a two-axis design: it is as expected when both orders are, by the rules above applied to each order's
 * verdict (a plain study needs both to pass; 'exact' both exact; a declared flaw shown by either order, or both
 * passing). So a norm fails when either order's verdict fails, and the problem names that order (the joint fit's
 * reasons are in `twoAxis.reasons`). As above, a study that is as expected has every norm as expected.
 */
function gridOutcome(result: StudyResult, analysis: SeriesAnalysis, joint: TwoAxisAnalysis, declared: Verdict): NormOutcome {
  const aboveAllowed = analysis.allowed?.aboveOrder !== undefined;
  const pass = (v: Verdict) => ACCEPTABLE_FOR_PASS.includes(v) || (v === 'above-order' && aboveAllowed);
  const orders = [
    { word: 'spatial order (h)', verdict: joint.verdict.space },
    { word: 'temporal order (Δt)', verdict: joint.verdict.time },
  ];
  const fits = (v: Verdict) => (result.expectation.verdict === 'pass' ? pass(v) : declared === 'exact' ? v === 'exact' : v === declared || pass(v));
  const shows = result.expectation.verdict === 'pass' || declared === 'exact'
    ? orders.every((o) => fits(o.verdict))
    : orders.some((o) => o.verdict === declared) || orders.every((o) => pass(o.verdict));
  const ok = result.asExpected || shows;
  const base: NormOutcome = { norm: analysis.name, analysis, expectedVerdict: declared, asExpected: ok, problem: '', twoAxis: joint };
  if (ok) return base;
  const failing = result.expectation.verdict === 'pass' || declared === 'exact' ? orders.filter((o) => !fits(o.verdict)) : orders;
  base.problem = `${failing.map((o) => `${o.word} ${o.verdict}`).join(', ')}, expected ${declared}`;
  base.departing = (failing[0] ?? orders[0]).verdict;
  return base;
}

/** Counts across studies for summaries. */
export function studyTally(results: readonly StudyResult[]): { studies: number; asExpected: number; departures: string[] } {
  const departures = results.filter((r) => !r.asExpected).map((r) => r.study);
  return { studies: results.length, asExpected: results.length - departures.length, departures };
}
