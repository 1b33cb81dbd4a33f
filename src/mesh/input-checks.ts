import { RungsInputError } from '../errors.ts';
import { DIAGONALS, type Diagonal } from './grid.ts';

/** Throws unless value is a positive integer (a cell count). */
export function requireCount(value: unknown, field: string): number {
  if (typeof value !== 'number' || !Number.isInteger(value) || value < 1) {
    throw new RungsInputError(`${field} must be a positive integer, got ${String(value)}`, field);
  }
  return value;
}

/** Throws unless [lo, hi] is a finite, non-empty interval. */
export function requireRange(lo: unknown, hi: unknown, field: string): [number, number] {
  if (typeof lo !== 'number' || typeof hi !== 'number' || !Number.isFinite(lo) || !Number.isFinite(hi) || !(lo < hi)) {
    throw new RungsInputError(
      `${field} must be [lo, hi] with finite lo < hi, got [${String(lo)}, ${String(hi)}]`,
      field,
    );
  }
  return [lo, hi];
}

/** Throws unless diagonal is one of DIAGONALS. */
export function requireDiagonal(value: unknown, field: string): Diagonal {
  if (!DIAGONALS.includes(value as Diagonal)) {
    throw new RungsInputError(
      `${field} must be one of ${DIAGONALS.map((d) => `'${d}'`).join(', ')}, got ${JSON.stringify(value)}`,
      field,
    );
  }
  return value as Diagonal;
}

/** Throws if a mesh would need more indices than an Int32Array holds. */
export function requireIndexable(count: number, what: string): void {
  if (count > 0x7fffffff) {
    throw new RungsInputError(`mesh too large: ${count} ${what} exceed the 2^31 - 1 index limit`, what);
  }
}
