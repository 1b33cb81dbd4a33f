import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { describe, expect, it } from 'vitest';
import { junitXml } from '../../src/report/junit.ts';
import { demoResults, tileP2 } from './fixture.ts';

// Attribute set of the common JUnit report structure (Apache Ant JUnit task's XML format, as read by CI servers;
// common practice, no source): testsuites(tests, failures, errors, time), testsuite(name, tests, failures, errors,
// skipped, time, timestamp), testcase(classname, name, time), failure/error(message, type).
const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '', isArray: (name) => name === 'testcase' || name === 'testsuite' });

interface Case {
  classname: string;
  name: string;
  time: string;
  failure?: { message: string; type: string; '#text': string };
  error?: { message: string; type: string; '#text': string };
}

function parse(xml: string) {
  expect(XMLValidator.validate(xml)).toBe(true);
  const doc = parser.parse(xml);
  const suites = doc.testsuites;
  const suite = suites.testsuite[0];
  return { suites, suite, cases: suite.testcase as Case[] };
}

describe('junitXml', () => {
  const results = demoResults();
  const inputErrors = [{ study: 'tile-p3', file: 'studies/tile-p3.study.ts', message: 'ladder.n must increase; got [8, 4] & "n" < 2' }];
  const { suites, suite, cases } = parse(junitXml(results, { suiteName: 'rungs-nightly', inputErrors }));

  it('has one testcase per study and norm plus one per input error', () => {
    const norms = results.reduce((n, r) => n + r.analyses.length, 0);
    expect(cases).toHaveLength(norms + 1);
    expect(cases.filter((c) => c.classname === 'rungs.tile-p2').map((c) => c.name)).toEqual(['L2', 'H1semi']);
  });

  it('counts tests, failures and errors consistently on both levels', () => {
    const failed = cases.filter((c) => c.failure).length;
    const errored = cases.filter((c) => c.error).length;
    // The demo set has one departure (tile-p1-vertex-k, L2) and one bad input.
    expect(failed).toBe(1);
    expect(errored).toBe(1);
    for (const node of [suites, suite]) {
      expect(Number(node.tests)).toBe(cases.length);
      expect(Number(node.failures)).toBe(failed);
      expect(Number(node.errors)).toBe(errored);
    }
    expect(suite.skipped).toBe('0');
    expect(suite.name).toBe('rungs-nightly');
  });

  it('writes the failure with the verdict as type and the reasons as body', () => {
    const c = cases.find((x) => x.failure)!;
    expect(c.classname).toBe('rungs.tile-p1-vertex-k');
    expect(c.name).toBe('L2');
    expect(c.failure!.type).toBe('below-order');
    expect(c.failure!.message).toContain('expected on-order');
    for (const reason of results[1].analyses[0].reasons) expect(c.failure!['#text']).toContain(reason);
  });

  it('writes an input error as <error> and escapes its text', () => {
    const c = cases.find((x) => x.error)!;
    expect(c.classname).toBe('rungs.tile-p3');
    expect(c.error!.type).toBe('input-error');
    // fast-xml-parser decodes the entities back: & < " survive the round trip.
    expect(c.error!.message).toBe(inputErrors[0].message);
  });

  it('uses seconds with a timestamp of the form yyyy-MM-ddTHH:mm:ss', () => {
    expect(suite.timestamp).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}$/);
    for (const c of cases) expect(c.time).toMatch(/^\d+\.\d{3}$/);
    const sum = cases.reduce((t, c) => t + Number(c.time), 0);
    expect(sum).toBeCloseTo(Number(suite.time), 2);
  });

  it('escapes markup in study and norm names', () => {
    const r = tileP2();
    r.study = 'tile<&>"p2"';
    const parsed = parse(junitXml([r], { suiteName: 'a & b' }));
    expect(parsed.cases[0].classname).toBe('rungs.tile<&>"p2"');
    expect(parsed.suite.name).toBe('a & b');
    expect(parsed.suites.failures).toBe('0');
  });
});
