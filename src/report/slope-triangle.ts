/**
 * Placement of expected-slope triangles on a log-log plot. Works in natural-log coordinates (u = ln x, v = ln y):
 * the hypotenuse has slope m, the triangle spans one level spacing at the finest data, and sits below the data
 * unless that would cover a series or another triangle, in which case it goes above, further away, or to the next
 * level spacing; when nothing is clear it is left out.
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
/** Clearance kept from every series and every other triangle (with its labels): half the gap, a factor 1.48. */
const MARGIN = GAP / 2;
/** How far from the data a triangle may move, in gaps, before the next position along the data is tried. */
const OFFSETS = [1, 1.5, 2, 3];

function valueAt(sorted: readonly LogPoint[], u: number): number | null {
  if (sorted.length === 0 || u < sorted[0]!.u - 1e-12 || u > sorted[sorted.length - 1]!.u + 1e-12) return null;
  for (let i = 1; i < sorted.length; i++) {
    if (u <= sorted[i]!.u + 1e-12) {
      const t = sorted[i]!.u === sorted[i - 1]!.u ? 0 : (u - sorted[i - 1]!.u) / (sorted[i]!.u - sorted[i - 1]!.u);
      return sorted[i - 1]!.v + t * (sorted[i]!.v - sorted[i - 1]!.v);
    }
  }
  return sorted[sorted.length - 1]!.v;
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

/** Lower and upper edge of a triangle at u (both straight over its span: one is the hypotenuse, one the leg). */
function band(t: PlacedTriangle, u: number): [number, number] {
  const [a, b] = t.corners;
  const hyp = a.v + ((u - a.u) / (b.u - a.u)) * (b.v - a.v);
  const leg = t.corners[2].v;
  return [Math.min(hyp, leg), Math.max(hyp, leg)];
}

/**
 * Whether a polyline keeps at least MARGIN (in ln e) above or below the triangle over the triangle's span. The
 * difference of two piecewise-linear functions is linear between their breakpoints, so the line stays on one side
 * exactly when it is on that side at every breakpoint: the exact test, not a sampling.
 */
export function clearOf(series: readonly LogPoint[], t: PlacedTriangle): boolean {
  const sorted = [...series].sort((p, q) => p.u - q.u);
  const us = t.corners.map((p) => p.u);
  const uL = Math.min(...us);
  const uR = Math.max(...us);
  const breaks = [uL, uR, ...sorted.map((p) => p.u).filter((u) => u > uL && u < uR)];
  let above = 0, below = 0, seen = 0;
  for (const u of breaks) {
    const v = valueAt(sorted, u);
    if (v === null) continue;
    seen++;
    const [lo, hi] = band(t, u);
    if (v >= hi + MARGIN) above++;
    else if (v <= lo - MARGIN) below++;
    else return false;
  }
  return above === seen || below === seen;
}

/** The triangle's box with its labels: the run label sits beyond the horizontal leg, so the box grows by a margin. */
function box(t: PlacedTriangle): { u0: number; u1: number; v0: number; v1: number } {
  const us = t.corners.map((p) => p.u);
  const vs = t.corners.map((p) => p.v);
  const du = 0.15 * (Math.max(...us) - Math.min(...us));
  return { u0: Math.min(...us) - du, u1: Math.max(...us) + du, v0: Math.min(...vs) - MARGIN, v1: Math.max(...vs) + MARGIN };
}

/** Whether two triangles (with their labels) keep apart. */
export function trianglesApart(p: PlacedTriangle, q: PlacedTriangle): boolean {
  const a = box(p);
  const b = box(q);
  return a.u1 <= b.u0 || b.u1 <= a.u0 || a.v1 <= b.v0 || b.v1 <= a.v0;
}

/**
 * A triangle of slope m beside the data of `own`, clear of every series (its own included) and of the triangles
 * already placed: first at the finest segment (finest = smallest u when m > 0, largest when m < 0), below the data,
 * then above, then further from the data, then at the next segment towards the coarse end. Null when no position is
 * clear: no triangle is better than one drawn over the data.
 */
export function placeTriangle(
  own: readonly LogPoint[],
  m: number,
  others: readonly (readonly LogPoint[])[],
  placed: readonly PlacedTriangle[],
): PlacedTriangle | null {
  if (own.length === 0 || !Number.isFinite(m) || m === 0) return null;
  const sorted = [...own].sort((p, q) => p.u - q.u);
  const fromFinest = m > 0 ? sorted : [...sorted].reverse();
  const every = [own, ...others];
  const clear = (t: PlacedTriangle) => every.every((s) => clearOf(s, t)) && placed.every((q) => trianglesApart(t, q));
  const anchors = Math.max(1, fromFinest.length - 1);
  for (let k = 0; k < anchors; k++) {
    const anchor = fromFinest[k]!;
    const neighbour = fromFinest[k + 1];
    const spacing = neighbour ? Math.abs(neighbour.u - anchor.u) : Math.LN2;
    const run = Math.min(Math.max(spacing, Math.log(1.5)), Math.log(4));
    const uL = m > 0 ? anchor.u : anchor.u - run;
    const uR = uL + run;
    const data = (u: number) => valueAt(sorted, u) ?? anchor.v;
    const d = run * m;
    for (const f of OFFSETS) {
      const below = build(uL, uR, Math.min(data(uL) - f * GAP, data(uR) - f * GAP - d), m, 'below');
      if (clear(below)) return below;
      const above = build(uL, uR, Math.max(data(uL) + f * GAP, data(uR) + f * GAP - d), m, 'above');
      if (clear(above)) return above;
    }
  }
  return null;
}
