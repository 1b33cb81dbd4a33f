// Slope triangles keep clear of every series and of each other, checked by plain segment geometry that does not use
// the placement code's own test, and are left out for exact and non-converging series.
import { describe, expect, it } from 'vitest';
import { placeTriangle, type LogPoint, type PlacedTriangle } from '../../src/report/slope-triangle.ts';
import { showsSlope, svgPlot } from '../../src/report/svg.ts';
import type { SeriesAnalysis } from '../../src/analysis/types.ts';
import { tileP1Patch, tileP2 } from './fixture.ts';

type P = [number, number];
const cross = (o: P, a: P, b: P) => (a[0] - o[0]) * (b[1] - o[1]) - (a[1] - o[1]) * (b[0] - o[0]);
/** Proper or touching intersection of segments pq and rs (common practice, no source). */
function segmentsMeet(p: P, q: P, r: P, s: P): boolean {
  const d1 = cross(r, s, p), d2 = cross(r, s, q), d3 = cross(p, q, r), d4 = cross(p, q, s);
  return ((d1 > 0) !== (d2 > 0) || d1 === 0 || d2 === 0) && ((d3 > 0) !== (d4 > 0) || d3 === 0 || d4 === 0) &&
    Math.max(p[0], q[0]) >= Math.min(r[0], s[0]) && Math.max(r[0], s[0]) >= Math.min(p[0], q[0]) &&
    Math.max(p[1], q[1]) >= Math.min(r[1], s[1]) && Math.max(r[1], s[1]) >= Math.min(p[1], q[1]);
}
function inside(t: P[], x: P): boolean {
  const s = [cross(t[0]!, t[1]!, x), cross(t[1]!, t[2]!, x), cross(t[2]!, t[0]!, x)];
  return s.every((v) => v >= 0) || s.every((v) => v <= 0);
}
const corners = (t: PlacedTriangle): P[] => t.corners.map((c) => [c.u, c.v]);
function touchesSeries(t: PlacedTriangle, series: readonly LogPoint[]): boolean {
  const tri = corners(t);
  const pts: P[] = series.map((p) => [p.u, p.v]);
  if (pts.some((x) => inside(tri, x))) return true;
  for (let i = 1; i < pts.length; i++) for (let k = 0; k < 3; k++) if (segmentsMeet(pts[i - 1]!, pts[i]!, tri[k]!, tri[(k + 1) % 3]!)) return true;
  return false;
}
function trianglesMeet(a: PlacedTriangle, b: PlacedTriangle): boolean {
  const A = corners(a), B = corners(b);
  if (A.some((x) => inside(B, x)) || B.some((x) => inside(A, x))) return true;
  for (let i = 0; i < 3; i++) for (let k = 0; k < 3; k++) if (segmentsMeet(A[i]!, A[(i + 1) % 3]!, B[k]!, B[(k + 1) % 3]!)) return true;
  return false;
}

/** A series e = C h^p on levels h = 2^-k, k = 1..n, in log coordinates. */
const line = (C: number, p: number, n = 5, wiggle = 0): LogPoint[] =>
  Array.from({ length: n }, (_, k) => ({ u: Math.log(2 ** -(k + 1)), v: Math.log(C) + p * Math.log(2 ** -(k + 1)) + (k % 2 ? wiggle : -wiggle) }));

describe('placeTriangle', () => {
  // Crowded plots: parallel lines a factor 1.5 to 4 apart, crossing lines, a line with a kink, up to five norms.
  const cases: [string, LogPoint[][], number[]][] = [
    ['two parallel lines a factor 4 apart', [line(1, 2), line(4, 2)], [2, 2]],
    ['three lines a factor 1.5 apart', [line(1, 1), line(1.5, 1), line(2.25, 1)], [1, 1, 1]],
    ['crossing lines', [line(1, 3), line(0.05, 1)], [3, 1]],
    ['a wiggling line beside a straight one', [line(1, 2, 6, 0.4), line(0.3, 2)], [2, 2]],
    ['five norms of different orders', [line(1, 1), line(0.5, 2), line(0.2, 3), line(2, 0.5), line(0.1, 4)], [1, 2, 3, 0.5, 4]],
    ['against dofs (negative slope)', [line(1, -1), line(3, -1)], [-1, -1]],
  ];
  it.each(cases)('%s: no triangle touches a series or another triangle', (_name, series, slopes) => {
    const placed: PlacedTriangle[] = [];
    const problems: string[] = [];
    series.forEach((own, k) => {
      const t = placeTriangle(own, slopes[k]!, series.filter((_, j) => j !== k), placed);
      if (!t) return;
      series.forEach((s, j) => { if (touchesSeries(t, s)) problems.push(`triangle ${k} touches series ${j}`); });
      placed.forEach((q, j) => { if (trianglesMeet(t, q)) problems.push(`triangle ${k} meets triangle ${j}`); });
      placed.push(t);
    });
    expect(problems).toEqual([]);
    expect(placed.length).toBeGreaterThan(0);
  });

  it('gives the hypotenuse the requested slope', () => {
    const t = placeTriangle(line(1, 2), 2, [], [])!;
    const [a, b] = t.corners;
    expect((b.v - a.v) / (b.u - a.u)).toBeCloseTo(2, 12);
  });
});

describe('which series get a triangle', () => {
  const fit = (order: number, ciLow: number, ciHigh: number) => ({ order, stderr: 0.01, ciLow, ciHigh, levels: [2, 3, 4], intercept: 0 });
  const a = (verdict: SeriesAnalysis['verdict'], f: ReturnType<typeof fit> | null) => ({ verdict, fit: f }) as unknown as SeriesAnalysis;
  it.each([
    ['on order', a('on-order', fit(2, 1.9, 2.1)), true],
    ['below order but converging', a('below-order', fit(1.3, 1.2, 1.4)), true],
    ['exact', a('exact', fit(-1, -2.6, 0.5)), false],
    ['not converging (order 0)', a('below-order', fit(0, -0.01, 0.01)), false],
    ['growing errors', a('below-order', fit(-0.5, -0.6, -0.4)), false],
    ['no fit', a('inconclusive', null), false],
  ])('%s → %s', (_n, analysis, shown) => expect(showsSlope(analysis)).toBe(shown));

  it('the plot of an exact (patch test) study has no triangle; a converging one has one per norm', () => {
    expect(svgPlot(tileP1Patch())).not.toContain('class="slope-triangle"');
    expect(svgPlot(tileP2()).match(/class="slope-triangle"/g)).toHaveLength(2);
  });
});
