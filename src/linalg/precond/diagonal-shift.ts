/** Retry an incomplete factorisation on A + α·diag-scale when a pivot breaks down, with growing α.
 *  Manteuffel (1980), An incomplete factorization technique for positive definite linear systems,
 *  Math. Comp. 34(150) 473–497 (shifted incomplete Cholesky). */
import { RungsNumericalError } from '../../errors.ts';

/** Shifts tried in turn after the unshifted attempt fails. */
export const SHIFT_SEQUENCE = [1e-3, 1e-2, 1e-1, 1, 10] as const;

/** Calls factor(0), then factor(α) for each α of SHIFT_SEQUENCE until one returns true; returns the α that worked. */
export function factorWithShift(name: string, factor: (alpha: number) => boolean): number {
  if (factor(0)) return 0;
  for (const alpha of SHIFT_SEQUENCE) if (factor(alpha)) return alpha;
  throw new RungsNumericalError(
    `${name}: the incomplete factorisation broke down even with a diagonal shift of ${SHIFT_SEQUENCE[SHIFT_SEQUENCE.length - 1]}·diag(A); ` +
      "use preconditioner 'jacobi' or 'amg'",
    `linalg/precond/${name}`,
  );
}

/** Name that says the factorisation needed a shift. */
export function shiftedName(base: string, alpha: number): string {
  return alpha === 0 ? base : `${base} (diagonal shift ${alpha}·diag(A) after a pivot breakdown)`;
}
