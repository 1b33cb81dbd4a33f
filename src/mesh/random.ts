import { RungsInputError } from '../errors.ts';

/** A seeded source of uniform numbers in [0, 1). */
export type UniformSource = () => number;

/** Mulberry32 (T. Ettinger, 2017, public-domain 32-bit generator): a Weyl step followed by a multiply-xorshift mix.
 *  Small, fast and reproducible across platforms because it uses only 32-bit integer arithmetic. */
export function mulberry32(seed: number): UniformSource {
  if (!Number.isInteger(seed)) {
    throw new RungsInputError(`random seed must be an integer, got ${seed}`, 'seed');
  }
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let t = state;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}
