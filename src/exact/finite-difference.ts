/** eps^(1/7): balances the O(h^6) truncation error of the stencil below against the O(eps/h) round-off
 *  (common practice, no source: optimal step for an order-p first-derivative formula is ~ eps^(1/(p+1))). */
export const SIXTH_ORDER_STEP = Math.pow(Number.EPSILON, 1 / 7);

/** Sixth-order central first derivative of g at t with step h, weights (±45, ∓9, ±1)/60 at offsets ±1, ±2, ±3
 *  (Fornberg 1988, "Generation of finite difference formulas on arbitrarily spaced grids", Table 1). The step is
 *  rounded so that t + h is exact in floating point, which removes a round-off error of relative size eps·|t|/h. */
export function centralDerivative6(g: (t: number) => number, t: number, h: number): number {
  const step = t + h - t;
  const d1 = g(t + step) - g(t - step);
  const d2 = g(t + 2 * step) - g(t - 2 * step);
  const d3 = g(t + 3 * step) - g(t - 3 * step);
  return (45 * d1 - 9 * d2 + d3) / (60 * step);
}
