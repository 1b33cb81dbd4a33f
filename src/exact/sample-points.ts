import { RungsInputError } from '../errors.ts';
import { mulberry32 } from '../mesh/random.ts';
import type { BoundingBox, Dim } from './types.ts';

/** Seed of every check in this folder, so a refusal names the same point on every run. */
export const DEFAULT_SEED = 7321;

/** The unit box [0,1]^dim. */
export function unitBox(dim: Dim): BoundingBox {
  return Array.from({ length: dim }, () => [0, 1] as const);
}

/** Refuse a box that is not one finite, non-empty interval per coordinate. */
export function checkBox(box: BoundingBox, dim: Dim, field: string): void {
  if (!Array.isArray(box) || box.length !== dim) {
    throw new RungsInputError(`${field}: expected ${dim} [low, high] pairs (one per coordinate)`, field);
  }
  box.forEach(([lo, hi], i) => {
    if (!Number.isFinite(lo) || !Number.isFinite(hi) || !(lo < hi)) {
      throw new RungsInputError(`${field}[${i}]: expected finite low < high, got [${lo}, ${hi}]`, field);
    }
  });
}

/** n seeded uniform points, packed xyz (unused coordinates 0), strictly inside the box shrunk by margin[i]. */
export function samplePoints(box: BoundingBox, n: number, seed: number, margin?: readonly number[]): Float64Array {
  const random = mulberry32(seed);
  const points = new Float64Array(3 * n);
  for (let p = 0; p < n; p++) {
    for (let d = 0; d < box.length; d++) {
      const m = margin?.[d] ?? 0;
      const lo = box[d][0] + m;
      const width = box[d][1] - m - lo;
      // Map [0,1) to the open interval so no point lands on the boundary, where sources may be singular.
      points[3 * p + d] = lo + width * (0.001 + 0.998 * random());
    }
  }
  return points;
}

/** "(x=0.25, y=0.5)" for messages. */
export function formatPoint(x: number, y: number, z: number, dim: Dim): string {
  const parts = [`x=${x.toPrecision(6)}`, `y=${y.toPrecision(6)}`, `z=${z.toPrecision(6)}`];
  return `(${parts.slice(0, dim).join(', ')})`;
}
