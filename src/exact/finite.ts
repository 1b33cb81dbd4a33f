import { RungsInputError } from '../errors.ts';
import { DEFAULT_SEED, checkBox, formatPoint, samplePoints } from './sample-points.ts';
import type { BoundingBox, Dim, ScalarFn } from './types.ts';

/** Refuse a function that is NaN or infinite at any of n seeded points strictly inside the box (quadrature points
 *  are interior too, so a singularity on the boundary alone, e.g. of r^(2/3) at a corner, is not refused).
 *  `name` is the field path named in the error. */
export function assertFinite(fn: ScalarFn, name: string, box: BoundingBox, n = 64, seed = DEFAULT_SEED): void {
  const dim = box.length as Dim;
  if (dim !== 1 && dim !== 2 && dim !== 3) {
    throw new RungsInputError(`${name}: the bounding box must have 1, 2 or 3 [low, high] pairs`, name);
  }
  checkBox(box, dim, `${name} (bounding box)`);
  const points = samplePoints(box, n, seed);
  for (let p = 0; p < n; p++) {
    const x = points[3 * p];
    const y = points[3 * p + 1];
    const z = points[3 * p + 2];
    const value = fn(x, y, z);
    if (!Number.isFinite(value)) {
      throw new RungsInputError(
        `${name} is ${Number.isNaN(value) ? 'NaN' : value > 0 ? '+Infinity' : '-Infinity'} at ${formatPoint(x, y, z, dim)}` +
          ` inside the domain's bounding box; it must be finite everywhere inside the domain`,
        name,
      );
    }
  }
}
