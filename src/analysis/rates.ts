// Observed order of accuracy between two levels (common practice, no source): with e ≈ C h^p,
// p = ln(e1/e2) / ln(h1/h2); with h ~ N^(-1/d) in d dimensions, p = -d ln(e1/e2) / ln(N1/N2).

/** Order between two levels from errors and mesh sizes; NaN when an error is not positive. */
export function rateInH(e1: number, e2: number, h1: number, h2: number): number {
  if (!(e1 > 0 && e2 > 0 && h1 > 0 && h2 > 0) || h1 === h2) return Number.NaN;
  return Math.log(e1 / e2) / Math.log(h1 / h2);
}

/** Order between two levels from errors and dof counts in `dim` dimensions; NaN when an error is not positive. */
export function rateInDofs(e1: number, e2: number, n1: number, n2: number, dim: number): number {
  if (!(e1 > 0 && e2 > 0 && n1 > 0 && n2 > 0) || n1 === n2) return Number.NaN;
  return (-dim * Math.log(e1 / e2)) / Math.log(n1 / n2);
}

/**
 * Pairwise rates along a ladder: rates[i] is between levels i-1 and i, rates[0] is null, and a rate is null
 * when either error is zero, negative or not finite. Uses h when given, otherwise dofs with `dim`.
 */
export function pairwiseRates(
  errors: readonly number[],
  h: readonly number[] | null,
  dofs: readonly number[],
  dim: number,
): (number | null)[] {
  const rates: (number | null)[] = [null];
  for (let i = 1; i < errors.length; i++) {
    const e1 = errors[i - 1]!;
    const e2 = errors[i]!;
    const p = h ? rateInH(e1, e2, h[i - 1]!, h[i]!) : rateInDofs(e1, e2, dofs[i - 1]!, dofs[i]!, dim);
    rates.push(Number.isFinite(p) ? p : null);
  }
  return rates;
}
