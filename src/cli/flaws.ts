import type { StudyResult } from '../study/result.ts';
import { outcomeWord } from './outcome-words.ts';

/** Plain statements of what each demonstration of a flaw showed (or did not), in the words of outcome-words.ts. A sweep that demonstrates
 *  locking is one statement for the whole sweep (its members' own verdicts do not decide). */
export function flawLines(results: StudyResult[]): string[] {
  const lines: string[] = [];
  const sweeps = new Set<string>();
  for (const r of results.filter((x) => x.expectation.flaw)) {
    const sweep = r.robustness;
    if (sweep && sweep.expected === 'not-robust') {
      if (sweeps.has(sweep.group)) continue;
      sweeps.add(sweep.group);
      const worst = sweep.findings.filter((f) => !f.robust).map((f) => `${f.norm} ×${f.growth.toPrecision(3)}`);
      lines.push(sweep.asExpected
        ? `${outcomeWord(true)}: ${sweep.group} — ${r.expectation.flaw} → the error constant grows over ${sweep.coefficient} = ${sweep.values.join(', ')} (${worst.join(', ')})`
        : `${outcomeWord(false)}: ${sweep.group} — ${r.expectation.flaw} was expected to make the error constant grow over ${sweep.coefficient}, but it stayed bounded`);
      continue;
    }
    const hit = r.analyses.filter((a) => a.verdict === r.expectation.verdict).map((a) => a.name);
    lines.push(r.asExpected
      ? `${outcomeWord(true)}: ${r.study} — ${r.expectation.flaw} → ${r.expectation.verdict} in ${hit.join(', ')}`
      : `${outcomeWord(false)}: ${r.study} — ${r.expectation.flaw} was expected to give ${r.expectation.verdict}, but verdicts were ${r.analyses.map((a) => `${a.name} ${a.verdict}`).join(', ')}`);
  }
  return lines;
}
