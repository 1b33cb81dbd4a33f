import { describe, expect, it } from 'vitest';
import { detectFloor, roundOffThreshold } from '../../src/analysis/floors.ts';
import { pairwiseRates } from '../../src/analysis/rates.ts';

// Floor rules (common practice, no source): an error at ~1e3 eps sqrt(N) relative to the solution is
// round-off; an error within a few times the solver's algebraic error estimate is the solver floor; an
// error that stops falling near either is on it.
const EPS = Number.EPSILON;

describe('roundOffThreshold', () => {
  it('is a thousand machine epsilons, growing like sqrt(N)', () => {
    // IEEE 754 double epsilon 2^-52 (IEEE 754-2008).
    expect(EPS).toBe(2 ** -52);
    expect(roundOffThreshold(1)).toBeCloseTo(1e3 * 2 ** -52, 30);
    expect(roundOffThreshold(1e4) / roundOffThreshold(1)).toBeCloseTo(100, 12);
  });
});

describe('detectFloor', () => {
  const h = [1 / 4, 1 / 8, 1 / 16, 1 / 32, 1 / 64, 1 / 128, 1 / 256, 1 / 512];
  const dofs = h.map((x) => (1 / x + 1) ** 2);

  it('finds a solver floor where errors reach a few times the algebraic error estimate', () => {
    const errors = [3.1e-2, 7.8e-3, 1.95e-3, 4.9e-4, 1.22e-4, 3.05e-5, 1.4e-5, 1.2e-5];
    const hint = errors.map(() => 5e-6);
    const found = detectFloor(errors, dofs, pairwiseRates(errors, h, dofs, 2), undefined, hint);
    expect(found.from).toBe(6);
    expect(found.kind).toBe('solver');
    expect(found.levels.slice(0, 6).every((k) => k === null)).toBe(true);
  });
  it('counts a stalled error within 30× of the hint as on the floor', () => {
    const errors = [1e-2, 2.5e-3, 6.3e-4, 1.6e-4, 1.5e-4];
    const hint = [null, null, null, 1e-5, 1e-5];
    const found = detectFloor(errors, dofs.slice(0, 5), pairwiseRates(errors, h.slice(0, 5), dofs, 2), undefined, hint);
    expect(found.from).toBe(4);
    expect(found.kind).toBe('solver');
  });
  it('finds a round-off floor relative to the scale and prefers it to a solver hint', () => {
    const errors = [1e-4, 6.25e-6, 3.9e-7, 2.44e-8, 1.53e-9, 3e-11, 4e-11];
    const scale = errors.map(() => 2);
    const many = [1e2, 1e3, 3e3, 1e4, 3e4, 1e5, 4e5];
    const hint = errors.map(() => 1e-11);
    const found = detectFloor(errors, many, pairwiseRates(errors, null, many, 2), scale, hint);
    expect(found.from).toBe(5);
    expect(found.kind).toBe('round-off');
  });
  it('ignores an isolated small coarse level and reports nothing on a clean series', () => {
    const errors = [0, 7.8e-3, 1.95e-3, 4.9e-4];
    const found = detectFloor(errors, dofs.slice(0, 4), pairwiseRates(errors, h.slice(0, 4), dofs, 2));
    expect(found.levels[0]).toBe('round-off');
    expect(found.from).toBeNull();
    expect(found.kind).toBeNull();
  });
});
