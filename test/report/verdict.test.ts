import { describe, expect, it } from 'vitest';
import { normOutcomes, verdictLabel } from '../../src/report/verdict.ts';
import { lTileCorner, tileP1Flawed, tileP1Patch, tileP2 } from './fixture.ts';

// The rules follow the exit-status contract of the design notes: a plain study passes when every norm is on order
// (or exact, or faster); 'exact' needs every norm exact; a declared flaw must show up (project rule, no source).
describe('normOutcomes', () => {
  it('marks only the norm that departs from a plain study', () => {
    const out = normOutcomes(tileP1Flawed());
    expect(out.map((o) => [o.norm, o.asExpected])).toEqual([['L2', false], ['H1semi', true]]);
    expect(out[0].problem).toBe('verdict below-order, expected on-order');
  });

  it('accepts a declared flaw and an exact patch test', () => {
    expect(normOutcomes(lTileCorner()).every((o) => o.asExpected && o.expectedVerdict === 'below-order')).toBe(true);
    expect(normOutcomes(tileP1Patch()).every((o) => o.asExpected && o.expectedVerdict === 'exact')).toBe(true);
  });

  it('marks every norm when a declared flaw did not show', () => {
    const r = lTileCorner();
    for (const a of r.analyses) a.verdict = 'on-order';
    r.asExpected = false;
    const out = normOutcomes(r);
    expect(out.every((o) => !o.asExpected)).toBe(true);
    expect(out[0].problem).toContain('the study declared below-order (the corner singularity limits u to H^(5/3))');
  });

  it('accepts above-order in a plain study but not in an exact one', () => {
    const r = tileP2();
    r.analyses[0].verdict = 'above-order';
    expect(normOutcomes(r)[0].asExpected).toBe(true);
    const p = tileP1Patch();
    p.analyses[0].verdict = 'on-order';
    p.asExpected = false;
    expect(normOutcomes(p).map((o) => o.asExpected)).toEqual([false, true]);
  });

  it('spells every verdict with a symbol', () => {
    expect(['on-order', 'below-order', 'above-order', 'exact', 'inconclusive'].map((v) => verdictLabel(v as never))).toEqual([
      '✓ on-order', '✗ below-order', '↑ above-order', '≡ exact', '? inconclusive',
    ]);
  });
});
