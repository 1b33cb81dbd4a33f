import { describe, expect, it } from 'vitest';
import { resultJson, resultsJson } from '../../src/report/json.ts';
import { demoResults, tileP2, tileP2TwoLevels } from './fixture.ts';

describe('resultJson', () => {
  it('keeps every finite number exactly and adds no note when there is nothing to replace', () => {
    const r = tileP2();
    const back = JSON.parse(resultJson(r));
    // JSON.stringify writes the shortest round-trip form of a double (ECMA-262, Number::toString), so this is exact.
    expect(back).toEqual(JSON.parse(JSON.stringify(r)));
    expect(back.levels[4].errors.L2).toBe(r.levels[4].errors.L2);
    expect(back.note).toBeUndefined();
    expect(resultJson(r)).toContain('\n  "study": "tile-p2",');
  });

  it('writes NaN and infinities as null and lists where they were', () => {
    const back = JSON.parse(resultJson(tileP2TwoLevels()));
    expect(back.analyses[0].fit.stderr).toBeNull();
    expect(back.analyses[0].fit.ciLow).toBeNull();
    expect(back.nonFiniteValues).toEqual({
      'analyses[0].fit.stderr': 'NaN',
      'analyses[0].fit.ciLow': '-Infinity',
      'analyses[0].fit.ciHigh': 'Infinity',
    });
    expect(back.note).toMatch(/null/);
    expect(back.analyses[0].rates).toEqual([null, tileP2TwoLevels().analyses[0].rates[1]]);
  });

  it('writes several results as one array', () => {
    const all = JSON.parse(resultsJson(demoResults()));
    expect(all.map((r: { study: string }) => r.study)).toEqual(demoResults().map((r) => r.study));
  });
});
