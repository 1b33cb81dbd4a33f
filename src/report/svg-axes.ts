/** Pieces shared by the SVG plots: colours and font, log scales with whole decades, and the two axes with
 *  power-of-ten labels. */
import { scaleLog, type ScaleLogarithmic } from 'd3-scale';
import { el, escapeXml } from './xml.ts';

export const FONT = "system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif";
export const INK = '#1f2328';
export const MUTED = '#57606a';
export const GRID = '#d8dee4';
export const r2 = (v: number) => Math.round(v * 100) / 100;

/**
 * A log scale fitted to the values: their range widened by 5% of its length in log on each side (at least a factor
 * 1.1), so that no marker sits on the frame, and then, only when that range holds fewer than two powers of ten, out to
 * the nearest ones (the closer side first), so that every axis has two labelled decades. Whole-decade ends (d3's
 * nice()) left up to a decade of empty plot on each side.
 */
export function logScale(values: number[], range: [number, number]): ScaleLogarithmic<number, number> {
  // A loop, not Math.min(...values): spreading 100k levels overflows the call stack.
  let lo = Infinity, hi = -Infinity;
  for (const v of values) { if (v < lo) lo = v; if (v > hi) hi = v; }
  if (!(lo > 0) || !Number.isFinite(hi)) [lo, hi] = [0.1, 1];
  // Below 1e-300 the decades below would be 0 in doubles (10^-324), and the ticks of log 0 an array of infinite
  // length; such values are drawn on the lower edge (clamp).
  lo = Math.max(lo, 1e-300);
  hi = Math.max(hi, lo);
  if (lo === hi) [lo, hi] = [lo / 10, hi * 10];
  const pad = Math.max(0.05 * (Math.log10(hi) - Math.log10(lo)), Math.log10(1.1));
  let a = Math.log10(lo) - pad;
  let b = Math.log10(hi) + pad;
  const decadesIn = () => Math.floor(b + 1e-9) - Math.ceil(a - 1e-9) + 1;
  while (decadesIn() < 2) {
    const below = Math.ceil(a - 1e-9) - 1;
    const above = Math.floor(b + 1e-9) + 1;
    if (a - below <= above - b) a = below;
    else b = above;
  }
  return scaleLog().domain([Math.max(10 ** a, 1e-300), 10 ** b]).range(range).clamp(true);
}

function isDecade(v: number): boolean {
  const k = Math.log10(v);
  return Math.abs(k - Math.round(k)) < 1e-9;
}

/** "10" with a raised exponent; a real minus sign for negative exponents. */
function powerLabel(v: number): string {
  const k = Math.round(Math.log10(v));
  const exponent = k < 0 ? `\u2212${-k}` : String(k);
  return `10<tspan dy="-0.55em" font-size="0.72em">${exponent}</tspan>`;
}

export function xAxis(scale: ScaleLogarithmic<number, number>, y0: number, yTop: number, label: string): string {
  const ticks = scale.ticks().map((v) => {
    const x = r2(scale(v));
    const major = isDecade(v);
    return el('g', { class: major ? 'tick tick-major' : 'tick tick-minor', 'data-value': v }, [
      major ? el('line', { x1: x, x2: x, y1: yTop, y2: y0, stroke: GRID, 'stroke-width': 1 }) : '',
      el('line', { x1: x, x2: x, y1: y0, y2: y0 + (major ? 6 : 3), stroke: INK, 'stroke-width': 1 }),
      major ? `<text class="tick-label" x="${x}" y="${y0 + 21}" text-anchor="middle">${powerLabel(v)}</text>` : '',
    ]);
  });
  const [a, b] = scale.range();
  return el('g', { class: 'axis axis-x', 'font-size': 12, fill: INK }, [
    ...ticks,
    el('line', { class: 'domain', x1: a, x2: b, y1: y0, y2: y0, stroke: INK, 'stroke-width': 1 }),
    el('text', { class: 'axis-label', x: r2((a + b) / 2), y: y0 + 42, 'text-anchor': 'middle', 'font-size': 13 }, escapeXml(label)),
  ]);
}

/** `labelX`: where the rotated axis name sits (default 18, the left edge of a one-panel plot). */
export function yAxis(scale: ScaleLogarithmic<number, number>, x0: number, xRight: number, label: string, labelX = 18): string {
  const ticks = scale.ticks().map((v) => {
    const y = r2(scale(v));
    const major = isDecade(v);
    return el('g', { class: major ? 'tick tick-major' : 'tick tick-minor', 'data-value': v }, [
      major ? el('line', { x1: x0, x2: xRight, y1: y, y2: y, stroke: GRID, 'stroke-width': 1 }) : '',
      el('line', { x1: x0 - (major ? 6 : 3), x2: x0, y1: y, y2: y, stroke: INK, 'stroke-width': 1 }),
      major ? `<text class="tick-label" x="${x0 - 9}" y="${y + 4}" text-anchor="end">${powerLabel(v)}</text>` : '',
    ]);
  });
  const [b, a] = scale.range();
  const mid = r2((a + b) / 2);
  return el('g', { class: 'axis axis-y', 'font-size': 12, fill: INK }, [
    ...ticks,
    el('line', { class: 'domain', x1: x0, x2: x0, y1: a, y2: b, stroke: INK, 'stroke-width': 1 }),
    el('text', { class: 'axis-label', x: labelX, y: mid, 'text-anchor': 'middle', 'font-size': 13, transform: `rotate(-90 ${labelX} ${mid})` }, escapeXml(label)),
  ]);
}
