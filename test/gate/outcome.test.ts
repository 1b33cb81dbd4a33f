import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { describe, expect, it } from 'vitest';
import { compareToBaseline, makeBaseline, type BaselineFinding } from '../../src/gate/baseline.ts';
import { failureLines, gateStatus, statusLine, type GateOutcome } from '../../src/gate/status.ts';
import { junitXml } from '../../src/report/junit.ts';
import type { StudyResult } from '../../src/study/result.ts';
import { tileP1Flawed, tileP2 } from '../report/fixture.ts';

// The exit status and the JUnit file are read from one outcome; these cases pin that they agree for every kind.
const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '', isArray: (n) => n === 'testcase' });

interface Case { classname: string; name: string; failure?: { type: string; message: string; '#text': string }; error?: { type: string; message: string }; 'system-out'?: string }

function junitOf(o: GateOutcome) {
  const xml = junitXml(o.results, { suiteName: 'rungs', inputErrors: o.problems, baseline: o.findings, runErrors: o.runErrors });
  expect(XMLValidator.validate(xml)).toBe(true);
  const suite = parser.parse(xml).testsuites.testsuite;
  const cases = (suite.testcase ?? []) as Case[];
  // The counts on the suite must be the cases' own.
  expect(Number(suite.failures)).toBe(cases.filter((c) => c.failure).length);
  expect(Number(suite.errors)).toBe(cases.filter((c) => c.error).length);
  expect(Number(suite.tests)).toBe(cases.length);
  return { failures: Number(suite.failures), errors: Number(suite.errors), cases };
}

/** The status the JUnit counts imply: errors → 2, else failures → 1, else 0. */
const impliedStatus = (j: { failures: number; errors: number }) => (j.errors ? 2 : j.failures ? 1 : 0);

const outcome = (over: Partial<GateOutcome>): GateOutcome => ({ results: [], problems: [], findings: [], runErrors: [], ...over });
const entry = makeBaseline([tileP2()]).studies['tile-p2'];

describe('exit status and JUnit agree', () => {
  it('pass: status 0, no failures or errors', () => {
    const o = outcome({ results: [tileP2()], findings: compareToBaseline(tileP2(), entry) });
    const j = junitOf(o);
    expect(gateStatus(o)).toBe(0);
    expect(impliedStatus(j)).toBe(0);
    expect(j.cases.map((c) => c.name)).toEqual(['L2', 'H1semi']);
    expect(statusLine(o)).toBe('check passed (exit 0): 1 study as expected');
  });

  it('below-order: status 1, a failure of the verdict type', () => {
    const o = outcome({ results: [tileP2(), tileP1Flawed()] });
    const j = junitOf(o);
    expect(gateStatus(o)).toBe(1);
    expect(impliedStatus(j)).toBe(1);
    expect(j.cases.filter((c) => c.failure).map((c) => [c.classname, c.name, c.failure!.type])).toEqual([['rungs.tile-p1-vertex-k', 'L2', 'below-order']]);
    expect(statusLine(o)).toBe('check failed (exit 1): 1 study not as expected (tile-p1-vertex-k)');
  });

  it('regression: status 1, a failure in the case of that norm only', () => {
    const run = tileP2();
    run.levels[4].errors.H1semi *= 1.5;
    const o = outcome({ results: [run], findings: compareToBaseline(run, entry) });
    const j = junitOf(o);
    expect(gateStatus(o)).toBe(1);
    expect(impliedStatus(j)).toBe(1);
    const failed = j.cases.filter((c) => c.failure);
    expect(failed.map((c) => [c.name, c.failure!.type])).toEqual([['H1semi', 'regression']]);
    expect(failed[0].failure!.message).toMatch(/^baseline: tile-p2 {2}H1semi {2}level 5 .* \(\+50%\)$/);
  });

  it('a baseline that cannot vouch (another ladder): status 2, an error in every norm of the study', () => {
    const run = tileP2();
    run.levels[1].dofs += 1;
    const o = outcome({ results: [run], findings: compareToBaseline(run, entry) });
    const j = junitOf(o);
    expect(gateStatus(o)).toBe(2);
    expect(impliedStatus(j)).toBe(2);
    expect(j.cases.map((c) => c.error?.type)).toEqual(['ladder-mismatch', 'ladder-mismatch']);
  });

  it('bad input: status 2, an error named input; a problem of the whole run: its own error case', () => {
    const problems = [{ study: 'kiln-rod', file: 'studies/kiln-rod.study.ts', message: 'studies/kiln-rod.study.ts (study \'kiln-rod\'): expected.L2: expected order 0 is not valid' }];
    const o = outcome({ results: [tileP2()], problems });
    expect(gateStatus(o)).toBe(2);
    expect(impliedStatus(junitOf(o))).toBe(2);
    const run = outcome({ runErrors: [{ name: 'baseline file', message: 'baseline file b.json does not exist' }] });
    const j = junitOf(run);
    expect(gateStatus(run)).toBe(2);
    expect(impliedStatus(j)).toBe(2);
    expect(j.cases).toEqual([expect.objectContaining({ classname: 'rungs', name: 'baseline file', error: expect.objectContaining({ type: 'run-error' }) })]);
  });

  it('a warning alone keeps status 0 and is written into the case text', () => {
    const findings: BaselineFinding[] = [{ kind: 'declaration-changed', severity: 'warning', study: 'tile-p2', line: 'tile-p2  declaration changed since the baseline was recorded' }];
    const o = outcome({ results: [tileP2()], findings });
    const j = junitOf(o);
    expect(gateStatus(o)).toBe(0);
    expect(impliedStatus(j)).toBe(0);
    for (const c of j.cases) expect(c['system-out']).toContain('baseline warning: tile-p2  declaration changed');
    expect(statusLine(o)).toBe('check passed (exit 0): 1 study as expected; 1 warning');
  });

  it('a study with no norm that departs still has a failing case', () => {
    const r: StudyResult = { ...tileP2(), study: 'kiln-flux', analyses: [], expectation: { verdict: 'exact' }, asExpected: false };
    const o = outcome({ results: [r] });
    const j = junitOf(o);
    expect(gateStatus(o)).toBe(1);
    expect(impliedStatus(j)).toBe(1);
    expect(j.cases).toEqual([expect.objectContaining({ classname: 'rungs.kiln-flux', name: 'study', failure: expect.objectContaining({ type: 'expectation' }) })]);
  });

  it('errors win over failures in both', () => {
    const run = tileP2();
    run.levels[4].errors.L2 *= 2;
    const findings = [...compareToBaseline(run, entry), { kind: 'norm-new' as const, severity: 'error' as const, study: 'tile-p2', norm: 'H1semi', line: 'tile-p2  H1semi  not in the baseline' }];
    const o = outcome({ results: [run, tileP1Flawed()], findings });
    const j = junitOf(o);
    expect(gateStatus(o)).toBe(2);
    expect(impliedStatus(j)).toBe(2);
    expect(j.failures).toBe(2); // L2 of tile-p2 (regression), L2 of tile-p1-vertex-k (verdict)
    expect(j.errors).toBe(1);
    // A case that is both an error and a departed verdict is written as the error, keeping the verdict in its message.
    const flawed = outcome({ results: [tileP1Flawed()], findings: [{ kind: 'study-new', severity: 'error', study: 'tile-p1-vertex-k', line: 'tile-p1-vertex-k  not in the baseline' }] });
    const both = junitOf(flawed).cases.find((c) => c.name === 'L2')!;
    expect(both.error!.message).toMatch(/^baseline: tile-p1-vertex-k {2}not in the baseline; also L2: .*verdict below-order \(expected on-order\)$/);
  });
});

describe('failureLines', () => {
  it('gives every failing norm of every failing study with its reasons, and nothing for studies as expected', () => {
    const flawed = tileP1Flawed();
    const lines = failureLines([tileP2(), flawed]);
    expect(lines[0]).toBe(`failed: tile-p1-vertex-k — not as expected  [${flawed.file}]`);
    expect(lines[1]).toBe('    L2: verdict below-order, expected on-order');
    for (const reason of flawed.analyses[0].reasons) expect(lines).toContain(`      · ${reason}`);
    expect(lines.join('\n')).not.toContain('tile-p2');
  });
});
