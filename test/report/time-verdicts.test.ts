/**
 * How the verdicts of a two-axis (h, Δt) design become pass or fail: a norm fails when either order's verdict fails
 * (by the same rules a one-axis norm follows), and the JUnit failure quotes the reasons. The rules are the project's
 * exit-status contract (README, "How the verdict is reached"; project rule, no source).
 */
import { XMLParser, XMLValidator } from 'fast-xml-parser';
import { describe, expect, it } from 'vitest';
import { junitXml } from '../../src/report/junit.ts';
import { normOutcomes } from '../../src/report/verdict.ts';
import { tileP2 } from './fixture.ts';
import { rodDt, rodGrid, rodGridFlawed } from './time-fixture.ts';

describe('normOutcomes of a two-axis design', () => {
  it('passes a norm whose two orders pass, and carries its joint fit', () => {
    const out = normOutcomes(rodGrid());
    expect(out.map((o) => [o.norm, o.asExpected, o.twoAxis?.name])).toEqual([['L2', true, 'L2'], ['H1semi', true, 'H1semi']]);
  });

  it('fails a norm when only the temporal order fails, naming that order', () => {
    const out = normOutcomes(rodGridFlawed());
    expect(out.every((o) => !o.asExpected)).toBe(true);
    expect(out[0].problem).toBe('temporal order (Δt) below-order, expected on-order');
    expect(out[0].departing).toBe('below-order');
  });

  it('fails a norm when only the spatial order fails, even if its one-axis verdict says on-order', () => {
    const r = rodGrid();
    r.twoAxis![1].verdict = { space: 'below-order', time: 'on-order' };
    r.asExpected = false;
    // The analyses still carry on-order: the two verdicts of the joint fit decide.
    const out = normOutcomes(r);
    expect(out.map((o) => o.asExpected)).toEqual([true, false]);
    expect(out[1].problem).toBe('spatial order (h) below-order, expected on-order');
  });

  it('accepts a declared flaw shown by either order, and needs both orders exact for an exact study', () => {
    const flawed = rodGridFlawed();
    flawed.expectation = { verdict: 'below-order', flaw: 'the start-up step costs the second order' };
    flawed.asExpected = true;
    expect(normOutcomes(flawed).every((o) => o.asExpected)).toBe(true);
    // A study marked not as expected whose norms all look as declared gets every norm marked, as a one-axis study.
    flawed.asExpected = false;
    const marked = normOutcomes(flawed);
    expect(marked.every((o) => !o.asExpected)).toBe(true);
    expect(marked[0].problem).toContain('the study declared below-order (the start-up step costs the second order)');

    const exact = rodGrid();
    exact.expectation = { verdict: 'exact' };
    exact.asExpected = false;
    exact.twoAxis![0].verdict = { space: 'exact', time: 'exact' };
    exact.twoAxis![1].verdict = { space: 'exact', time: 'on-order' };
    const out = normOutcomes(exact);
    expect(out.map((o) => o.asExpected)).toEqual([true, false]);
    expect(out[1].problem).toBe('temporal order (Δt) on-order, expected exact');
  });
});

const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '', isArray: (name) => name === 'testcase' || name === 'testsuite' });
interface Case { classname: string; name: string; failure?: { message: string; type: string; '#text': string } }

function cases(xml: string): { suite: Record<string, string>; cases: Case[] } {
  expect(XMLValidator.validate(xml)).toBe(true);
  const suite = parser.parse(xml).testsuites.testsuite[0];
  return { suite, cases: suite.testcase as Case[] };
}

describe('junitXml with studies with time', () => {
  const { suite, cases: all } = cases(junitXml([rodDt(), rodGrid(), rodGridFlawed(), tileP2()], { suiteName: 'rungs' }));

  it('fails exactly the norms of the design whose temporal order failed', () => {
    const failed = all.filter((c) => c.failure);
    expect(failed.map((c) => `${c.classname}/${c.name}`)).toEqual(['rungs.rod-cn-grid-slow/L2', 'rungs.rod-cn-grid-slow/H1semi']);
    expect(Number(suite.failures)).toBe(2);
    expect(Number(suite.tests)).toBe(2 + 2 + 2 + 2);
  });

  it('types the failure with the failing verdict and quotes the reasons in its message', () => {
    const c = all.find((x) => x.failure && x.name === 'L2')!;
    expect(c.failure!.type).toBe('below-order');
    expect(c.failure!.message).toBe(
      'L2: temporal order (Δt) below-order, expected on-order: p = 2.98 [2.91, 3.05] within 0.1 of the expected 3; ' +
        'q = 1.01 [0.98, 1.04] is below the expected 2 (tolerance 0.1)',
    );
    expect(c.failure!['#text']).toContain('L2: joint fit p = 2.98 [2.91, 3.05], expected 3: on-order; q = 1.01 [0.98, 1.04], expected 2: below-order');
  });

  it('says that a ladder in Δt was fitted in Δt', () => {
    const c = all.find((x) => x.classname === 'rungs.rod-be-dt' && x.name === 'L2')!;
    expect(JSON.stringify(c)).toMatch(/L2: fitted \d\.\d\d \[\d\.\d\d, \d\.\d\d\] in Δt, expected order 1, verdict on-order/);
  });
});
