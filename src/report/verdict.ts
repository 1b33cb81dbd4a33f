import type { SeriesAnalysis, Verdict } from '../analysis/types.ts';
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

/** Counts across studies for summaries. */
export function studyTally(results: readonly StudyResult[]): { studies: number; asExpected: number; departures: string[] } {
  const departures = results.filter((r) => !r.asExpected).map((r) => r.study);
  return { studies: results.length, asExpected: results.length - departures.length, departures };
}
