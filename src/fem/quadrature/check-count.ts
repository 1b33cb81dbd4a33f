import { RungsInputError } from '../../errors.ts';

/** Throws unless n is an integer in [1, max]; `what` names the argument for the message. */
export function checkPointCount(n: number, what: string, max: number): void {
  if (!Number.isInteger(n) || n < 1 || n > max) {
    throw new RungsInputError(
      `${what}: number of points must be an integer from 1 to ${max}, got ${String(n)}`,
      what,
    );
  }
}

/** Gauss points per direction needed for exactness to polynomial degree `degree`: a Gauss rule with
 *  n points is exact to degree 2n - 1 (common practice, no source). */
export function gaussPointsForDegree(degree: number): number {
  return Math.max(1, Math.ceil((degree + 1) / 2));
}
