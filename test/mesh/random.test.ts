import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

describe('mulberry32', () => {
  it('reproduces published outputs for seed 1985', () => {
    // 32-bit outputs 3527837133, 3112574143 for seed 1985, as listed in the test file
    // test/prng/mulberry32.test.ts of the public repository KingsleyBawuah/clinical-faker
    // (quoted there from another reference implementation of Ettinger's generator).
    const next = mulberry32(1985);
    expect(next() * 2 ** 32).toBe(3527837133);
    expect(next() * 2 ** 32).toBe(3112574143);
  });

  it('draws in [0, 1) with mean 1/2 and variance 1/12', () => {
    // Moments of the uniform distribution on [0, 1) (common practice, no source); 4-sigma tolerances for N = 100000.
    const next = mulberry32(42);
    const count = 100_000;
    let sum = 0;
    let sumSquares = 0;
    let outside = 0;
    for (let k = 0; k < count; k++) {
      const u = next();
      if (!(u >= 0 && u < 1)) outside++;
      sum += u;
      sumSquares += u * u;
    }
    expect(outside).toBe(0);
    const mean = sum / count;
    expect(Math.abs(mean - 0.5)).toBeLessThan(4 * Math.sqrt(1 / 12 / count));
    expect(Math.abs(sumSquares / count - mean * mean - 1 / 12)).toBeLessThan(4 * Math.sqrt(1 / 180 / count));
  });

  it('is reproducible per seed and rejects a non-integer seed', () => {
    const a = mulberry32(5);
    const b = mulberry32(5);
    const c = mulberry32(6);
    const first = [a(), a(), a()];
    expect([b(), b(), b()]).toEqual(first);
    expect([c(), c(), c()]).not.toEqual(first);
    expect(() => mulberry32(0.5)).toThrow(RungsInputError);
  });
});
