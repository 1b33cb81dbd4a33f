import { describe, expect, it } from 'vitest';
import { asymptoticRange } from '../../src/analysis/asymptotic-range.ts';

// The asymptotic range is the finest run of rates that agree within the tolerance (common practice, no source).
describe('asymptoticRange', () => {
  it('takes the longest run ending at the finest level whose spread is within the tolerance', () => {
    const range = asymptoticRange([null, 1.2, 1.6, 1.93, 1.98, 2.01], 5, 0.1);
    expect(range.from).toBe(2);
    expect(range.rates).toEqual([1.93, 1.98, 2.01]);
  });
  it('ends at the given last level and stops at a missing rate', () => {
    const range = asymptoticRange([null, 2, null, 2, 2.02, 0.1], 4, 0.1);
    expect(range.from).toBe(2);
    expect(range.rates).toEqual([2, 2.02]);
  });
  it('is empty without rates', () => {
    expect(asymptoticRange([null], 0, 0.1)).toEqual({ from: null, rates: [] });
  });
});
