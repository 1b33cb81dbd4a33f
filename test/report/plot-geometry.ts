/** Test helper: read positions back from a parsed SVG plot (decade ticks of a log axis, marker centres, polyline
 *  vertices), so that tests can check where a value was drawn. On a log axis equal ratios are equal distances
 *  (common practice, no source): two labelled decades fix the whole axis. */
import { expect } from 'vitest';
import { byClass, textOf, type XmlNode } from './xml-tree.ts';

export interface LogAxis {
  /** Pixel position of the decade tick 10^k. */
  at: Map<number, number>;
  /** Pixels per decade (negative on a y axis: pixels grow downwards). */
  perDecade: number;
}

/** "10−3" → -3; null when the label is not a power of ten. */
export function exponentOf(label: string): number | null {
  const m = label.match(/^10([−-]?\d+)$/);
  return m ? Number(m[1].replace('−', '-')) : null;
}

/** The first axis of class `cls` ('axis-x' or 'axis-y') under `node`. */
export function logAxisOf(node: XmlNode, cls: 'axis-x' | 'axis-y'): LogAxis {
  const axis = byClass(node, cls)[0];
  const at = new Map<number, number>();
  for (const tick of byClass(axis, 'tick-major')) {
    const label = byClass(tick, 'tick-label')[0];
    const k = exponentOf(textOf(label));
    if (k === null) throw new Error(`tick label ${textOf(label)} is not a power of ten`);
    expect(Number(tick.attrs['data-value'])).toBeCloseTo(10 ** k, 12 - k);
    // The y labels sit 4 px below their tick (baseline offset), the x labels centred on it.
    at.set(k, Number(cls === 'axis-x' ? label.attrs.x : label.attrs.y) - (cls === 'axis-y' ? 4 : 0));
  }
  const ks = [...at.keys()].sort((a, b) => a - b);
  const perDecade = (at.get(ks[1])! - at.get(ks[0])!) / (ks[1] - ks[0]);
  return { at, perDecade };
}

/** Data value → pixel. */
export function pixelOf(axis: LogAxis, value: number): number {
  const [k0, p0] = [...axis.at.entries()][0];
  return p0 + (Math.log10(value) - k0) * axis.perDecade;
}

/** Pixel → data value. */
export function valueOf(axis: LogAxis, pixel: number): number {
  const [k0, p0] = [...axis.at.entries()][0];
  return 10 ** (k0 + (pixel - p0) / axis.perDecade);
}

/** Centre of a marker drawn as circle, rect or polygon. */
export function markerCentre(m: XmlNode): [number, number] {
  if (m.tag === 'circle') return [Number(m.attrs.cx), Number(m.attrs.cy)];
  if (m.tag === 'rect') return [Number(m.attrs.x) + Number(m.attrs.width) / 2, Number(m.attrs.y) + Number(m.attrs.height) / 2];
  const pts = pointsOf(m);
  const xs = pts.map((p) => p[0]);
  const ys = pts.map((p) => p[1]);
  return [(Math.min(...xs) + Math.max(...xs)) / 2, (Math.min(...ys) + Math.max(...ys)) / 2];
}

/** Vertices of a polyline or polygon. */
export function pointsOf(node: XmlNode): [number, number][] {
  return node.attrs.points.trim().split(/\s+/).map((p) => p.split(',').map(Number) as [number, number]);
}

/** Slope of a slope triangle's hypotenuse in decades of y per decade of x. */
export function triangleSlope(tri: XmlNode, x: LogAxis, y: LogAxis): number {
  const pts = pointsOf(tri.children.find((c) => c.tag === 'polygon')!);
  // The right-angle corner shares its x with one corner and its y with the other; the other two span the hypotenuse.
  const right = pts.findIndex((p, i) => pts.some((q, j) => j !== i && q[0] === p[0]) && pts.some((q, j) => j !== i && q[1] === p[1]));
  const [a, b] = pts.filter((_, i) => i !== right);
  return ((b[1] - a[1]) / y.perDecade) / ((b[0] - a[0]) / x.perDecade);
}
