import type { StudyResult } from '../study/result.ts';

/** Plain statements of what each demonstration of a flaw caught (or failed to catch). */
export function flawLines(results: StudyResult[]): string[] {
  return results
    .filter((r) => r.expectation.flaw)
    .map((r) => {
      const hit = r.analyses.filter((a) => a.verdict === r.expectation.verdict).map((a) => a.name);
      return r.asExpected
        ? `caught: ${r.study} — ${r.expectation.flaw} → ${r.expectation.verdict} in ${hit.join(', ')}`
        : `MISSED: ${r.study} — ${r.expectation.flaw} was expected to give ${r.expectation.verdict}, but verdicts were ${r.analyses.map((a) => `${a.name} ${a.verdict}`).join(', ')}`;
    });
}
