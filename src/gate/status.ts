import type { InputProblem } from '../report/input-problem.ts';
import { normOutcomes } from '../report/verdict.ts';
import type { StudyResult } from '../study/result.ts';
import type { BaselineFinding } from './baseline.ts';

/** A problem of the whole run rather than of one study: an unreadable baseline, reports that could not be written. */
export interface RunError {
  /** What failed, as the JUnit test case names it ("baseline file", "reports", "command line"). */
  name: string;
  message: string;
}

/** Everything the gate's verdict rests on; the exit status and the JUnit file are both read from this. */
export interface GateOutcome {
  results: readonly StudyResult[];
  /** Studies that could not run (bad input, numerical failure). */
  problems: readonly InputProblem[];
  findings: readonly BaselineFinding[];
  runErrors: readonly RunError[];
}

/** 2 when anything could not be judged (a study, the baseline, the reports); else 1 when a study departs from its
 *  expectation or from the baseline; else 0. */
export function gateStatus(o: GateOutcome): 0 | 1 | 2 {
  if (o.problems.length || o.runErrors.length || o.findings.some((f) => f.severity === 'error')) return 2;
  if (o.results.some((r) => !r.asExpected) || o.findings.some((f) => f.severity === 'failure')) return 1;
  return 0;
}

/** The reasons of every study that is not as expected: each failing norm with its verdict, reasons and warnings. */
export function failureLines(results: readonly StudyResult[]): string[] {
  const lines: string[] = [];
  for (const r of results) {
    if (r.asExpected) continue;
    const flaw = r.expectation.flaw ? ` (declared: ${r.expectation.verdict}, ${r.expectation.flaw})` : '';
    lines.push(`failed: ${r.study} — not as expected${flaw}  [${r.file}]`);
    const failing = normOutcomes(r).filter((o) => !o.asExpected);
    if (failing.length === 0) lines.push(`    the study declared ${r.expectation.verdict}, and it has no norm to show it`);
    for (const o of failing) {
      lines.push(`    ${o.norm}: ${o.problem}`);
      for (const reason of o.analysis.reasons) lines.push(`      · ${reason}`);
      for (const warning of o.analysis.warnings) lines.push(`      ! ${warning}`);
    }
    for (const warning of r.warnings) lines.push(`    ! ${warning}`);
  }
  return lines;
}

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;

/** The last line of `rungs check`: the exit status and what set it. */
export function statusLine(o: GateOutcome): string {
  const status = gateStatus(o);
  const departed = o.results.filter((r) => !r.asExpected).map((r) => r.study);
  const count = (severity: BaselineFinding['severity']) => o.findings.filter((f) => f.severity === severity).length;
  const parts: string[] = [];
  if (o.problems.length) parts.push(`${plural(o.problems.length, 'study', 'studies')} could not run`);
  if (o.runErrors.length) parts.push(o.runErrors.map((e) => `${e.name} failed`).join(', '));
  if (count('error')) parts.push(`${plural(count('error'), 'baseline error')} (the baseline cannot vouch for the run)`);
  if (departed.length) parts.push(`${plural(departed.length, 'study', 'studies')} not as expected (${departed.join(', ')})`);
  if (count('failure')) parts.push(`${plural(count('failure'), 'baseline failure')}`);
  if (count('warning')) parts.push(plural(count('warning'), 'warning'));
  if (status === 0) {
    const warned = count('warning') ? `; ${plural(count('warning'), 'warning')}` : '';
    return `check passed (exit 0): ${plural(o.results.length, 'study', 'studies')} as expected${warned}`;
  }
  return `check failed (exit ${status}${status === 2 ? ', bad input' : ''}): ${parts.join('; ')}`;
}
