/**
 * Placement of expected-slope triangles on a log-log plot. Works in natural-log coordinates (u = ln x, v = ln y):
 * the hypotenuse has slope m, the triangle spans one level spacing at the finest data, and sits below the data
 * unless that would cover another series, in which case it goes above.
 */

export interface LogPoint {
  u: number;
  v: number;
}

export interface PlacedTriangle {
  /** Corners in log coordinates: the two ends of the hypotenuse, then the right-angle corner. */
  corners: [LogPoint, LogPoint, LogPoint];
  /** Where the "1" (run) and the slope (rise) labels go, and on which side of their leg. */
  runLabel: LogPoint & { side: 'below' | 'above' };
  riseLabel: LogPoint & { side: 'left' | 'right' };
  placement: 'below' | 'above';
}

/** Vertical clearance between triangle and data: a factor 2.2 (about a third of a decade). */
const GAP = Math.log(2.2);

function valueAt(series: readonly LogPoint[], u: number): number | null {
  const s = [...series].sort((a, b) => a.u - b.u);
  if (s.length === 0 || u < s[0].u - 1e-12 || u > s[s.length - 1].u + 1e-12) return null;
  for (let i = 1; i < s.length; i++) {
    if (u <= s[i].u + 1e-12) {
      const t = s[i].u === s[i - 1].u ? 0 : (u - s[i - 1].u) / (s[i].u - s[i - 1].u);
      return s[i - 1].v + t * (s[i].v - s[i - 1].v);
    }
  }
  return s[s.length - 1].v;
}

function crosses(other: readonly LogPoint[], uL: number, uR: number, vLo: number, vHi: number): boolean {
  const vs = [valueAt(other, uL), valueAt(other, uR), ...other.filter((p) => p.u >= uL && p.u <= uR).map((p) => p.v)];
  return vs.some((v) => v !== null && v > vLo - GAP / 2 && v < vHi + GAP / 2);
}

function build(uL: number, uR: number, c: number, m: number, placement: 'below' | 'above'): PlacedTriangle {
  const d = (uR - uL) * m;
  const a: LogPoint = { u: uL, v: c };
  const b: LogPoint = { u: uR, v: c + d };
  const legV = placement === 'below' ? Math.min(c, c + d) : Math.max(c, c + d);
  // The right angle sits where the horizontal leg meets the vertical one.
  const rightU = (placement === 'below') === m > 0 ? uR : uL;
  const r: LogPoint = { u: rightU, v: legV };
  return {
    corners: [a, b, r],
    runLabel: { u: (uL + uR) / 2, v: legV, side: placement },
    riseLabel: { u: rightU, v: (c + c + d) / 2, side: rightU === uR ? 'right' : 'left' },
    placement,
  };
}

/**
 * A triangle of slope m next to the finest point of `own` (finest = smallest u when m > 0, largest when m < 0),
 * avoiding the other series and the triangles already placed.
 */
export function placeTriangle(
  own: readonly LogPoint[],
  m: number,
  others: readonly (readonly LogPoint[])[],
  placed: readonly PlacedTriangle[],
): PlacedTriangle | null {
  if (own.length === 0 || !Number.isFinite(m) || m === 0) return null;
  const sorted = [...own].sort((p, q) => p.u - q.u);
  const finest = m > 0 ? sorted[0] : sorted[sorted.length - 1];
  const neighbour = m > 0 ? sorted[1] : sorted[sorted.length - 2];
  const spacing = neighbour ? Math.abs(neighbour.u - finest.u) : Math.LN2;
  const run = Math.min(Math.max(spacing, Math.log(1.5)), Math.log(4));
  const uL = m > 0 ? finest.u : finest.u - run;
  const uR = uL + run;
  const data = (u: number) => valueAt(own, u) ?? finest.v;
  const d = run * m;
  const candidates: PlacedTriangle[] = [
    build(uL, uR, Math.min(data(uL) - GAP, data(uR) - GAP - d), m, 'below'),
    build(uL, uR, Math.max(data(uL) + GAP, data(uR) + GAP - d), m, 'above'),
  ];
  const clear = (t: PlacedTriangle) => {
    const vs = t.corners.map((p) => p.v);
    const lo = Math.min(...vs);
    const hi = Math.max(...vs);
    const hitsSeries = others.some((o) => crosses(o, uL, uR, lo, hi));
    const hitsTriangle = placed.some((q) => {
      const qu = q.corners.map((p) => p.u);
      const qv = q.corners.map((p) => p.v);
      return Math.min(...qu) < uR && Math.max(...qu) > uL && Math.min(...qv) < hi && Math.max(...qv) > lo;
    });
    return !hitsSeries && !hitsTriangle;
  };
  return candidates.find(clear) ?? candidates[0];
}
