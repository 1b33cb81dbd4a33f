import { RungsInputError } from '../errors.ts';
import { mulberry32 } from '../mesh/random.ts';
import { evaluate, type Point } from './evaluate.ts';
import type { Expr } from './expr.ts';
import type { DataBundle } from './types.ts';

/** Interval of each point argument the self-test samples; a coordinate left out is [0, 1] when the study's dimension
 *  has it and 0 otherwise; t is [0, 1] in a time-dependent study and 0 otherwise. */
export type SampleBox = Partial<Record<'x' | 'y' | 'z' | 't', readonly [number, number]>>;

/** Options of the code generator. */
export interface CodegenOptions {
  /** Where the self-test samples its points; choose it inside the domain of every formula. */
  box?: SampleBox;
  /** How many seeded points the self-test checks (default 16). */
  samplePoints?: number;
  /** Seed of the points (default 2025). */
  seed?: number;
}

export const DEFAULT_SAMPLE_POINTS = 16;
export const DEFAULT_SAMPLE_SEED = 2025;
const MAX_SAMPLE_POINTS = 100_000;

/** The interval of each point argument: the caller's, else the default. */
export function sampleIntervals(bundle: DataBundle, box: SampleBox = {}): Record<'x' | 'y' | 'z' | 't', readonly [number, number]> {
  const where = `study ${bundle.study}`;
  const fallback = (k: 'x' | 'y' | 'z' | 't', on: boolean): readonly [number, number] => {
    const given = box[k];
    if (given === undefined) return on ? [0, 1] : [0, 0];
    if (!Array.isArray(given) || given.length !== 2 || !given.every(Number.isFinite) || !(given[0] <= given[1])) {
      throw new RungsInputError(`${where}: box.${k} is ${JSON.stringify(given)}; valid: [low, high], finite, low <= high`, where);
    }
    return given;
  };
  return { x: fallback('x', true), y: fallback('y', bundle.dim >= 2), z: fallback('z', bundle.dim >= 3), t: fallback('t', bundle.hasTime) };
}

/** n seeded points of the box, each with a seeded outward unit normal in the study's dimension (other components 0). */
export function samplePointsOf(bundle: DataBundle, options: CodegenOptions = {}): Point[] {
  const n = options.samplePoints ?? DEFAULT_SAMPLE_POINTS;
  const where = `study ${bundle.study}`;
  if (!Number.isInteger(n) || n < 1 || n > MAX_SAMPLE_POINTS) {
    throw new RungsInputError(`${where}: samplePoints is ${n}; valid: an integer from 1 to ${MAX_SAMPLE_POINTS}`, where);
  }
  const box = sampleIntervals(bundle, options.box);
  const random = mulberry32(options.seed ?? DEFAULT_SAMPLE_SEED);
  const within = ([lo, hi]: readonly [number, number]): number => (lo === hi ? lo : lo + (hi - lo) * random());
  return Array.from({ length: n }, () => {
    const at = { x: within(box.x), y: within(box.y), z: within(box.z), t: within(box.t) };
    const normal = [0, 0, 0];
    let length = 0;
    // Rejection keeps the direction uniform and away from a zero vector.
    while (length < 0.1 || length > 1) {
      for (let d = 0; d < bundle.dim; d++) normal[d] = 2 * random() - 1;
      length = Math.hypot(...normal);
    }
    return { ...at, nx: normal[0] / length, ny: normal[1] / length, nz: normal[2] / length };
  });
}

/** Expected values of each output at each point, refusing a point where some output is not finite (the box reaches
 *  outside the domain of a formula). */
export function expectedValues(bundle: DataBundle, name: string, outputs: readonly Expr[], points: readonly Point[]): number[][] {
  return points.map((at, p) =>
    outputs.map((e, k) => {
      const v = evaluate(e, at);
      if (!Number.isFinite(v)) {
        const where = `study ${bundle.study}`;
        const point = Object.entries(at).map(([a, value]) => `${a}=${value}`).join(', ');
        throw new RungsInputError(`${where}: ${name} output ${k + 1} is ${v} at sample point ${p + 1} (${point}); ` +
          'valid: a box (options.box) inside the domain of every formula', where);
      }
      return v;
    }));
}

/** Scale of each output over the points: max |value| (the tolerance is relative to the larger of it and |value|). */
export function outputScales(values: readonly number[][], count: number): number[] {
  return Array.from({ length: count }, (_, k) => values.reduce((m, row) => Math.max(m, Math.abs(row[k])), 0));
}

/** Relative tolerance of every self-test, of max(|expected|, scale of that output over the points). */
export const SELF_TEST_TOLERANCE = 1e-12;
