import type { StudyResult } from '../study/result.ts';
import type { InputProblem } from './input-problem.ts';
import { fixed, intervalText, orderText } from './numbers.ts';
import { normOutcomes, type NormOutcome } from './verdict.ts';
import { fitAxisSuffix, jointFitText } from './time.ts';
import { el, escapeAttribute, escapeXml } from './xml.ts';

export interface JunitOptions {
  /** Name of the single <testsuite> (e.g. "rungs"). */
  suiteName: string;
  /** Studies that could not run because of bad input; each becomes a test case with an <error>. */
  inputErrors?: readonly InputProblem[];
  /** Suite timestamp (ISO 8601); default: the earliest study start. */
  timestamp?: string;
  /** Findings of a baseline comparison: each goes into the test cases of its study and norm (every norm of the
   *  study when it names none). Errors make the case an <error>, failures a <failure>; warnings and notes are text. */
  baseline?: readonly JunitFinding[];
  /** Problems of the whole run (an unreadable baseline, reports that could not be written): one <error> case each. */
  runErrors?: readonly { name: string; message: string }[];
}

/** A baseline finding as the JUnit writer needs it (src/gate's BaselineFinding has this shape). */
export interface JunitFinding {
  study: string;
  norm?: string;
  kind: string;
  severity: 'error' | 'failure' | 'warning' | 'note';
  line: string;
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
 * A norm of a two-axis design: the summary gives both orders of the joint fit and their verdicts; the case fails when
 * either order's verdict does (normOutcomes), with that verdict as type and a message that quotes the reasons.
 */
function jointCase(o: NormOutcome): { summary: string; reasons: string[]; failure: { message: string; type: string } | null } {
  const t = o.twoAxis!;
  const summary = `${o.norm}: joint fit ${jointFitText(t, false)}`;
  const reasons = [...t.reasons, ...o.analysis.reasons.filter((x) => !t.reasons.includes(x))];
  const quoted = reasons.length ? `: ${reasons.join('; ')}` : '';
  const failure = o.asExpected ? null : { message: `${o.norm}: ${o.problem}${quoted}`, type: o.departing ?? o.analysis.verdict };
  return { summary, reasons, failure };
}

/**
 * JUnit XML: one <testsuite>, one <testcase classname="rungs.<study>" name="<norm>"> per study and norm.
 * A norm whose verdict is not the one the study expects gets a <failure type="<verdict>"> with the reasons, and so
 * does one the baseline comparison failed (type "regression", …); a baseline that cannot vouch for the norm makes it
 * an <error type="ladder-mismatch" …>. A study that failed on bad input gets a test case named "input" with an
 * <error>, and each problem of the whole run a test case of its own with an <error>. A norm of a two-axis (h, Δt)
 * design fails when either order's verdict fails; its message names the order and quotes the joint fit's reasons.
 * So the counts agree with the exit status of `rungs check`: errors > 0 is status 2, else failures > 0 is status 1, else 0. A study's wall time
 * is shared evenly among its norms (the norms are measured together, not one by one).
 */
export function junitXml(results: readonly StudyResult[], options: JunitOptions): string {
  const inputErrors = options.inputErrors ?? [];
  const findings = options.baseline ?? [];
  const cases: string[] = [];
  let tests = 0;
  let failures = 0;
  let errors = 0;
  let totalTime = 0;
  const judged = new Set<string>();
  const testcase = (classname: string, name: string, time: number, body: string) => {
    tests++;
    cases.push(`    ${el('testcase', { classname, name, time: secs(time) }, body)}`);
  };
  /** The body of one case: <error> before <failure> before plain text, so each case counts once. */
  const caseBody = (summary: string, lines: string[], own: readonly JunitFinding[], verdictFailure: { message: string; type: string } | null) => {
    const errs = own.filter((f) => f.severity === 'error');
    const fails = own.filter((f) => f.severity === 'failure');
    const text = escapeXml([summary, ...lines, ...own.map((f) => `baseline ${f.severity}: ${f.line}`)].filter(Boolean).join('\n'));
    const more = (n: number) => (n > 1 ? ` (and ${n - 1} more)` : '');
    if (errs.length) {
      errors++;
      // One outcome per case: the error wins, as status 2 wins over 1, and its message keeps the departed verdict.
      const also = verdictFailure ? `; also ${verdictFailure.message}` : '';
      return el('error', { message: `baseline: ${errs[0].line}${more(errs.length)}${also}`, type: errs[0].kind }, text);
    }
    if (verdictFailure || fails.length) {
      failures++;
      const failure = verdictFailure ?? { message: `baseline: ${fails[0].line}${more(fails.length)}`, type: fails[0].kind };
      return el('failure', failure, text);
    }
    return el('system-out', {}, text);
  };
  for (const r of results) {
    const outcomes = normOutcomes(r);
    const share = outcomes.length ? r.seconds / outcomes.length : r.seconds;
    totalTime += Number.isFinite(r.seconds) ? r.seconds : 0;
    const ofStudy = findings.filter((f) => f.study === r.study);
    judged.add(r.study);
    for (const o of outcomes) {
      const a = o.analysis;
      const own = ofStudy.filter((f) => f.norm === undefined || f.norm === o.norm);
      const { summary, reasons, failure } = o.twoAxis ? jointCase(o) : {
        summary: `${o.norm}: ${a.fit ? `fitted ${fixed(a.fit.order)} ${intervalText(a.fit.ciLow, a.fit.ciHigh)}${fitAxisSuffix(r)}` : 'no fit'}, expected order ${orderText(a.expected)}, verdict ${a.verdict}`,
        reasons: a.reasons,
        failure: null,
      };
      const body = o.asExpected
        ? caseBody(summary, reasons, own, null)
        : caseBody(summary, [...reasons, ...a.warnings.map((w) => `warning: ${w}`), o.problem], own, failure ?? {
            message: `${summary} (expected ${o.expectedVerdict})`,
            type: a.verdict,
          });
      testcase(`rungs.${r.study}`, o.norm, share, body);
    }
    // A study with no norm (quantities only) still needs a case, or its departure would be missing from the file.
    const unplaced = ofStudy.filter((f) => f.norm !== undefined && !outcomes.some((o) => o.norm === f.norm));
    if (outcomes.length === 0 || unplaced.some((f) => f.severity === 'error' || f.severity === 'failure')) {
      const own = outcomes.length === 0 ? ofStudy : unplaced;
      const departs = outcomes.length === 0 && !r.asExpected;
      const body = caseBody(`${r.study}: ${departs ? 'not as expected' : 'as expected'}`, [], own,
        departs ? { message: `the study declared ${r.expectation.verdict}, which no norm showed`, type: 'expectation' } : null);
      testcase(`rungs.${r.study}`, outcomes.length === 0 ? 'study' : 'baseline', outcomes.length ? 0 : r.seconds, body);
    }
  }
  // Findings about studies that did not run here (notes only, by construction of the comparison) still must not hide
  // an error or a failure.
  for (const f of findings) {
    if (judged.has(f.study) || (f.severity !== 'error' && f.severity !== 'failure')) continue;
    testcase(`rungs.${f.study}`, 'baseline', 0, caseBody(f.study, [], [f], null));
  }
  for (const e of inputErrors) {
    errors++;
    const error = el('error', { message: e.message, type: 'input-error' }, escapeXml(`${e.file}: ${e.message}`));
    testcase(`rungs.${e.study || e.file}`, 'input', 0, error);
  }
  for (const e of options.runErrors ?? []) {
    errors++;
    testcase('rungs', e.name, 0, el('error', { message: e.message, type: 'run-error' }, escapeXml(e.message)));
  }
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
