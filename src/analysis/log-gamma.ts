// ln Γ(x) for x > 0: Stirling's asymptotic series (Abramowitz & Stegun 1964, eq. 6.1.41) after shifting the
// argument up with the recurrence Γ(x+1) = x Γ(x) (A&S 6.1.15), so the series is only used where it is accurate.

const HALF_LN_TWO_PI = 0.5 * Math.log(2 * Math.PI);
/** Below this the argument is shifted up; at 15 the truncated series below is accurate to about 1e-16 relative. */
const SHIFT_TO = 15;
/** Stirling coefficients B_{2k} / (2k (2k-1)) for k = 1..8 (A&S 6.1.41; Bernoulli numbers from A&S Table 23.2). */
const STIRLING = [1 / 12, -1 / 360, 1 / 1260, -1 / 1680, 1 / 1188, -691 / 360360, 1 / 156, -3617 / 122400];

export function logGamma(x: number): number {
  if (!(x > 0) || !Number.isFinite(x)) return Number.NaN;
  let shift = 0;
  let z = x;
  // Accumulate ln of the product x (x+1) ... in pieces so it cannot overflow.
  let product = 1;
  while (z < SHIFT_TO) {
    product *= z;
    z += 1;
    if (product > 1e250) {
      shift += Math.log(product);
      product = 1;
    }
  }
  shift += Math.log(product);
  const inv = 1 / z;
  const inv2 = inv * inv;
  let series = 0;
  for (let k = STIRLING.length - 1; k >= 0; k--) series = series * inv2 + STIRLING[k]!;
  series *= inv;
  return (z - 0.5) * Math.log(z) - z + HALF_LN_TWO_PI + series - shift;
}
