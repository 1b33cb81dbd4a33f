import type { StudyResult } from '../study/result.ts';
import type { InputProblem } from './input-problem.ts';
import { fixed, intervalText, orderText } from './numbers.ts';
import { normOutcomes } from './verdict.ts';
import { el, escapeAttribute, escapeXml } from './xml.ts';

export interface JunitOptions {
  /** Name of the single <testsuite> (e.g. "rungs"). */
  suiteName: string;
  /** Studies that could not run because of bad input; each becomes a test case with an <error>. */
  inputErrors?: readonly InputProblem[];
  /** Suite timestamp (ISO 8601); default: the earliest study start. */
  timestamp?: string;
}

/** Seconds with millisecond resolution, as JUnit consumers expect. */
const secs = (s: number) => (Number.isFinite(s) && s >= 0 ? s.toFixed(3) : '0.000');

/** The JUnit (Ant) schema wants a local date-time without zone: yyyy-MM-ddTHH:mm:ss (common practice, no source). */
function junitTimestamp(iso: string | undefined): string | undefined {
  if (!iso) return undefined;
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? undefined : d.toISOString().slice(0, 19);
}

/**
 * JUnit XML: one <testsuite>, one <testcase classname="rungs.<study>" name="<norm>"> per study and norm.
 * A norm whose verdict is not the one the study expects gets a <failure type="<verdict>"> with the reasons;
 * a study that failed on bad input gets a test case named "input" with an <error>. A study's wall time is shared
 * evenly among its norms (the norms are measured together, not one by one).
 */
export function junitXml(results: readonly StudyResult[], options: JunitOptions): string {
  const inputErrors = options.inputErrors ?? [];
  const cases: string[] = [];
  let tests = 0;
  let failures = 0;
  let totalTime = 0;
  for (const r of results) {
    const outcomes = normOutcomes(r);
    const share = outcomes.length ? r.seconds / outcomes.length : 0;
    totalTime += Number.isFinite(r.seconds) ? r.seconds : 0;
    for (const o of outcomes) {
      tests++;
      const a = o.analysis;
      const fit = a.fit ? `fitted ${fixed(a.fit.order)} ${intervalText(a.fit.ciLow, a.fit.ciHigh)}` : 'no fit';
      const summary = `${o.norm}: ${fit}, expected order ${orderText(a.expected)}, verdict ${a.verdict}`;
      let body: string;
      if (o.asExpected) {
        body = el('system-out', {}, escapeXml([summary, ...a.reasons].join('\n')));
      } else {
        failures++;
        const text = [summary, ...a.reasons, ...a.warnings.map((w) => `warning: ${w}`), o.problem].filter(Boolean).join('\n');
        body = el('failure', { message: `${summary} (expected ${o.expectedVerdict})`, type: a.verdict }, escapeXml(text));
      }
      cases.push(`    ${el('testcase', { classname: `rungs.${r.study}`, name: o.norm, time: secs(share) }, body)}`);
    }
  }
  for (const e of inputErrors) {
    tests++;
    const error = el('error', { message: e.message, type: 'input-error' }, escapeXml(`${e.file}: ${e.message}`));
    cases.push(`    ${el('testcase', { classname: `rungs.${e.study || e.file}`, name: 'input', time: secs(0) }, error)}`);
  }
  const errors = inputErrors.length;
  const starts = results.map((r) => r.startedAt).filter(Boolean).sort();
  const suiteAttrs = {
    name: options.suiteName,
    tests,
    failures,
    errors,
    skipped: 0,
    time: secs(totalTime),
    timestamp: junitTimestamp(options.timestamp ?? starts[0]),
  };
  const attrs = (o: Record<string, string | number | undefined>) =>
    Object.entries(o)
      .filter(([, v]) => v !== undefined)
      .map(([k, v]) => ` ${k}="${escapeAttribute(String(v))}"`)
      .join('');
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<testsuites${attrs({ name: options.suiteName, tests, failures, errors, time: secs(totalTime) })}>`,
    `  <testsuite${attrs(suiteAttrs)}>`,
    ...cases,
    '  </testsuite>',
    '</testsuites>',
    '',
  ].join('\n');
}
