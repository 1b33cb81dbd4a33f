/**
 * The colour scales of the error maps: a value → a palette index of an indexed PNG (0 transparent, for pixels outside
 * the domain; 1…255 the colour map), and the ticks of the colour bar.
 *
 * Error densities: viridis on a log scale. Viridis (van der Walt & Smith 2015, "A better default colormap for
 * matplotlib", SciPy 2015; its table is CC0) is perceptually uniform (lightness rises evenly in CAM02-UCS), reads in
 * grey, and stays readable with the common colour-vision deficiencies; d3-scale-chromatic's interpolateViridis
 * samples its published 256-entry table. A density spans decades, so the scale is logarithmic, on whole decades (from
 * the largest value down at most six decades; smaller values and zeros take the lowest colour).
 *
 * Local orders: what matters is the departure from the expected order p, both ways, so a diverging map centred on p:
 * ColorBrewer's RdBu (Harrower & Brewer 2003, "ColorBrewer.org: an online tool for selecting colour schemes for
 * maps", The Cartographic Journal 40(1); the tool marks it colour-blind safe), red below p, blue above, near-white on
 * order; its lightness falls symmetrically from the centre, so equal departures either way look equally strong. The
 * half-width is the 98th percentile of |order − p| rounded up to a half, at least 1 (so that an on-order map reads as
 * pale noise, not as alarm) and at most 3; orders beyond take the
 * end colours. Without an expected order the map is viridis on a linear scale over the values.
 */
import { scaleLinear } from 'd3-scale';
import { interpolateRdBu, interpolateViridis } from 'd3-scale-chromatic';

/** Palette index of pixels with no value (outside the domain): fully transparent. */
export const NO_VALUE = 0;
/** Palette entries of the colour map proper: 1…255. */
export const COLOURS = 255;

export interface ColourTick {
  value: number;
  /** Position along the bar, 0 at the low end, 1 at the high end. */
  at: number;
  major: boolean;
}

export interface ColourScale {
  kind: 'log' | 'linear';
  /** The values at the bar's two ends. */
  domain: [number, number];
  /** RGB triples of the 256 palette entries (entry 0 is the transparent one; its colour is never shown). */
  palette: Uint8Array;
  /** Where a value sits along the bar, 0…1, clamped; NaN for a missing value. */
  position(v: number): number;
  /** Palette index of a value: 0 for NaN, else 1 + round(254 × position). */
  index(v: number): number;
  ticks: ColourTick[];
  /** Some values lie below or above the bar's ends (drawn in its end colours). */
  clippedLow: boolean;
  clippedHigh: boolean;
  /** The expected order the diverging map is centred on (local orders only). */
  centre: number | null;
  /** The colour map's name, for the caption. */
  mapName: string;
}

/** "#rrggbb" or "rgb(r, g, b)" (the two forms d3's interpolators return) as three bytes. */
export function parseColour(text: string): [number, number, number] {
  const hex = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(text);
  if (hex) return [parseInt(hex[1]!, 16), parseInt(hex[2]!, 16), parseInt(hex[3]!, 16)];
  const rgb = /^rgb\(\s*(\d+),\s*(\d+),\s*(\d+)\s*\)$/.exec(text);
  if (rgb) return [Number(rgb[1]), Number(rgb[2]), Number(rgb[3])];
  throw new Error(`not a colour: ${text}`);
}

/** 256 palette entries: entry 0 (transparent) mid grey, entries 1…255 the map sampled at t = 0, 1/254, …, 1. */
export function paletteOf(interpolate: (t: number) => string): Uint8Array {
  const palette = new Uint8Array(256 * 3).fill(128, 0, 3);
  for (let k = 1; k <= COLOURS; k++) palette.set(parseColour(interpolate((k - 1) / (COLOURS - 1))), 3 * k);
  return palette;
}

function finiteRange(values: ArrayLike<number>, positiveOnly: boolean): [number, number] | null {
  let lo = Infinity, hi = -Infinity;
  for (let k = 0; k < values.length; k++) {
    const v = values[k]!;
    if (!Number.isFinite(v) || (positiveOnly && !(v > 0))) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  return lo <= hi ? [lo, hi] : null;
}

function clipped(values: ArrayLike<number>, lo: number, hi: number): [boolean, boolean] {
  let low = false, high = false;
  for (let k = 0; k < values.length; k++) {
    const v = values[k]!;
    if (v < lo) low = true; // NaN compares false both ways
    if (v > hi) high = true;
  }
  return [low, high];
}

function finish(
  kind: 'log' | 'linear', domain: [number, number], palette: Uint8Array, position: (v: number) => number,
  ticks: ColourTick[], values: ArrayLike<number>, centre: number | null, mapName: string,
): ColourScale {
  const slack = kind === 'log' ? DECADE_SLACK * Math.LN10 : 1e-6 * (domain[1] - domain[0]);
  const [clippedLow, clippedHigh] = kind === 'log'
    ? clipped(values, domain[0] * (1 - slack), domain[1] * (1 + slack))
    : clipped(values, domain[0] - slack, domain[1] + slack);
  return {
    kind, domain, palette, position, ticks, clippedLow, clippedHigh, centre, mapName,
    index: (v) => (Number.isNaN(v) ? NO_VALUE : 1 + Math.round((COLOURS - 1) * position(v))),
  };
}

/** Most decades a density bar spans below its largest value. */
export const DENSITY_DECADES = 6;
/** Most labelled ticks on a bar. */
const MOST_TICKS = 7;

/** Slack in log10 when rounding a density range out to whole decades and when telling clipped values: maps hold
 *  float32 numbers, whose rounding (relative 6e-8, common practice, no source) must not push 1e-4 below its decade. */
const DECADE_SLACK = 1e-6;

/** Viridis on a log scale over whole decades (see the file comment). */
export function densityScale(values: ArrayLike<number>): ColourScale {
  const range = finiteRange(values, true);
  const hi = range ? range[1] : 1;
  const lo = range ? Math.max(range[0], hi * 10 ** -DENSITY_DECADES) : 0.1;
  const last = Math.ceil(Math.log10(hi) - DECADE_SLACK);
  const first = Math.min(last - 1, Math.floor(Math.log10(lo) + DECADE_SLACK));
  const position = (v: number) => (Number.isNaN(v) ? Number.NaN : !(v > 0) ? 0 : Math.min(1, Math.max(0, (Math.log10(v) - first) / (last - first))));
  // Whole decades; every second (third, …) one when there are too many to label.
  const stride = Math.ceil((last - first + 1) / MOST_TICKS);
  const ticks: ColourTick[] = [];
  for (let k = last; k >= first; k -= stride) ticks.push({ value: 10 ** k, at: (k - first) / (last - first), major: true });
  ticks.reverse();
  return finish('log', [10 ** first, 10 ** last], paletteOf(interpolateViridis), position, ticks, values, null, 'viridis');
}

/** 98th percentile of |v − centre| over the finite values (0 when there are none). */
function spread(values: ArrayLike<number>, centre: number): number {
  const d: number[] = [];
  for (let k = 0; k < values.length; k++) if (Number.isFinite(values[k]!)) d.push(Math.abs(values[k]! - centre));
  if (d.length === 0) return 0;
  d.sort((p, q) => p - q);
  return d[Math.min(d.length - 1, Math.floor(0.98 * d.length))]!;
}

/** Local orders: RdBu centred on the expected order, or viridis over the values when none is expected. */
export function orderScale(values: ArrayLike<number>, expected: number | null): ColourScale {
  if (expected !== null && Number.isFinite(expected)) {
    const half = Math.min(3, Math.max(1, Math.ceil(2 * spread(values, expected)) / 2));
    const a = expected - half, b = expected + half;
    const position = (v: number) => (Number.isNaN(v) ? Number.NaN : Math.min(1, Math.max(0, (v - a) / (b - a))));
    const ticks = scaleLinear().domain([a, b]).ticks(MOST_TICKS - 1).map((v) => ({ value: v, at: position(v), major: Math.abs(v - expected) < 1e-9 }));
    if (!ticks.some((t) => t.major)) ticks.push({ value: expected, at: 0.5, major: true });
    ticks.sort((p, q) => p.at - q.at);
    return finish('linear', [a, b], paletteOf(interpolateRdBu), position, ticks, values, expected, 'RdBu (ColorBrewer)');
  }
  const range = finiteRange(values, false) ?? [0, 1];
  const s = scaleLinear().domain(range[0] === range[1] ? [range[0] - 0.5, range[1] + 0.5] : range).nice(MOST_TICKS - 1);
  const [a, b] = s.domain() as [number, number];
  const position = (v: number) => (Number.isNaN(v) ? Number.NaN : Math.min(1, Math.max(0, (v - a) / (b - a))));
  const ticks = s.ticks(MOST_TICKS - 1).map((v) => ({ value: v, at: position(v), major: false }));
  return finish('linear', [a, b], paletteOf(interpolateViridis), position, ticks, values, null, 'viridis');
}
