// Richardson extrapolation (L. F. Richardson 1911; Roache, Verification and Validation in Computational
// Science and Engineering, 1998, ch. 5) and the observed order from three levels with the fixed-point
// iteration for unequal refinement ratios of Celik et al. (2008), J. Fluids Eng. 130(7) 078001, eqs. 3a–3c.

/** (r^p f_fine - f_coarse) / (r^p - 1): the value with the leading h^p term removed (Celik et al. 2008, eq. 4). */
export function richardsonExtrapolate(fine: number, coarse: number, ratio: number, order: number): number {
  const rp = Math.pow(ratio, order);
  return (rp * fine - coarse) / (rp - 1);
}

export interface ThreeLevelOrder {
  /** Observed order p; NaN when it cannot be formed (equal values, no root). */
  order: number;
  /** sign(ε32 / ε21): +1 monotone, -1 oscillatory, 0 when a difference vanishes. */
  sign: number;
  iterations: number;
  converged: boolean;
  /** 'fixed-point' as published; 'bisection' when that iteration does not contract (r32 ≫ r21). */
  method: 'fixed-point' | 'bisection' | 'none';
}

const MAX_ITERATIONS = 500;
const MAX_ORDER = 64;

/**
 * Observed order from three solutions, f1 finest, with r21 = h2/h1 and r32 = h3/h2 (Celik et al. 2008):
 * p = |ln|ε32/ε21| + q(p)| / ln r21, q(p) = ln((r21^p - s)/(r32^p - s)), s = sign(ε32/ε21),
 * ε21 = f2 - f1, ε32 = f3 - f2. With r21 = r32, q = 0 and one step gives the classic ln(ε32/ε21)/ln r.
 * The fixed-point map contracts only while r32 is not much larger than r21; when it fails, the same equation
 * p ln r21 - q(p) = ln|ε32/ε21| is solved by bisection on (0, 64].
 */
export function observedOrderThreeLevels(
  f1: number,
  f2: number,
  f3: number,
  r21: number,
  r32: number,
): ThreeLevelOrder {
  const e21 = f2 - f1;
  const e32 = f3 - f2;
  if (e21 === 0 || e32 === 0 || !(r21 > 1) || !(r32 > 1)) {
    return { order: Number.NaN, sign: Math.sign(e21 * e32), iterations: 0, converged: false, method: 'none' };
  }
  const ratio = e32 / e21;
  const s = Math.sign(ratio);
  const logRatio = Math.log(Math.abs(ratio));
  const logR21 = Math.log(r21);
  const q = (p: number): number => Math.log((Math.pow(r21, p) - s) / (Math.pow(r32, p) - s));
  let p = Math.abs(logRatio) / logR21;
  let k = 1;
  for (; k <= MAX_ITERATIONS; k++) {
    const next = Math.abs(logRatio + q(p)) / logR21;
    if (!Number.isFinite(next)) break;
    const moved = Math.abs(next - p);
    p = next;
    if (moved <= 1e-14 * Math.max(1, p)) return { order: p, sign: s, iterations: k, converged: true, method: 'fixed-point' };
  }
  // g(p) = p ln r21 - q(p) - ln|ratio| increases with p for r21, r32 > 1 (ln of r21^p (r32^p - s)/(r21^p - s)).
  const g = (x: number): number => x * logR21 - q(x) - logRatio;
  let lo = 1e-12;
  let hi = MAX_ORDER;
  if (!(g(lo) < 0 && g(hi) > 0)) return { order: Number.NaN, sign: s, iterations: k, converged: false, method: 'none' };
  let steps = 0;
  while (hi - lo > 4 * Number.EPSILON * hi && steps < 200) {
    const mid = 0.5 * (lo + hi);
    if (g(mid) < 0) lo = mid;
    else hi = mid;
    steps++;
  }
  return { order: 0.5 * (lo + hi), sign: s, iterations: k + steps, converged: true, method: 'bisection' };
}

export interface RichardsonSequence {
  /** order[i] from levels i-2, i-1, i (null for i < 2 or when it cannot be formed). */
  order: (number | null)[];
  /** extrapolated[i] from levels i-1 and i with order[i] (null where order[i] is null). */
  extrapolated: (number | null)[];
}

/**
 * Observed orders and extrapolated values along a ladder ordered coarse to fine (h decreasing), each from the
 * three finest levels up to that point.
 */
export function richardsonSequence(h: readonly number[], values: readonly number[]): RichardsonSequence {
  const order: (number | null)[] = [];
  const extrapolated: (number | null)[] = [];
  for (let i = 0; i < values.length; i++) {
    if (i < 2) {
      order.push(null);
      extrapolated.push(null);
      continue;
    }
    const r21 = h[i - 1]! / h[i]!;
    const r32 = h[i - 2]! / h[i - 1]!;
    const o = observedOrderThreeLevels(values[i]!, values[i - 1]!, values[i - 2]!, r21, r32);
    const ok = o.converged && o.order > 0;
    order.push(ok ? o.order : null);
    extrapolated.push(ok ? richardsonExtrapolate(values[i]!, values[i - 1]!, r21, o.order) : null);
  }
  return { order, extrapolated };
}
