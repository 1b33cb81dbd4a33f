/**
 * Pictures of where the error lives: a raster map (2D, or the mid-plane slice of a 3D mesh) as one indexed PNG inside
 * an SVG, with a colour bar, and the 1D error profile as a line plot; the HTML section that shows a study's maps.
 *
 * The page has no scripts (html.ts), so values are read on hover through native SVG tooltips: an invisible grid of
 * rectangles over the map, each block of at most HOVER_BLOCKS × HOVER_BLOCKS pixels with a <title> giving the range
 * of values in it, neighbouring blocks of a row with the same text merged into one rectangle.
 */
import { scaleLinear } from 'd3-scale';
import { decodeErrorMap, type ErrorMap } from '../mesh/raster.ts';
import type { ErrorMapEntry, StudyResult } from '../study/result.ts';
import type { LocalOrderSummary } from '../analysis/local-orders.ts';
import type { RegionOrder } from '../analysis/regions.ts';
import { COLOURS, densityScale, NO_VALUE, orderScale, type ColourScale } from './colour-scale.ts';
import { fixed, levelNumber, orderText, sci } from './numbers.ts';
import { OKABE_ITO } from './palette.ts';
import { encodeIndexedPng, pngDataUri } from './png.ts';
import { analysisOf, fileStem } from './series.ts';
import { FONT, GRID, INK, logScale, MUTED, r2, yAxis } from './svg-axes.ts';
import { el, escapeXml } from './xml.ts';

/** Hover regions per side of a raster map, at most (so a 128-pixel side gets blocks of 6 pixels). */
export const HOVER_BLOCKS = 24;
/** Pixels of the map's longer side on the page. */
const MAP_SIDE = 280;
const BAR_WIDTH = 14;
const BAR_MIN_HEIGHT = 170;
const M = { left: 52, top: 34, bottom: 42, gap: 22, legend: 104 };

export interface MapStyle {
  what: 'density' | 'local-order';
  /** The order a local-order map is centred on; null draws it on a sequential scale. */
  expected?: number | null;
  /** Heading drawn above the map. */
  title: string;
  /** Words for the values (the colour bar's heading): "L2 density", "local order". */
  valueName: string;
  /** Prefix of the ids inside the SVG; unique within the page. */
  id: string;
}

/** How a value reads in a tooltip: densities in scientific notation, orders with two decimals. */
export function valueText(what: MapStyle['what'], v: number): string {
  return what === 'density' ? sci(v, 2) : fixed(v, 2);
}

function scaleFor(map: ErrorMap, style: MapStyle): ColourScale {
  return style.what === 'density' ? densityScale(map.values) : orderScale(map.values, style.expected ?? null);
}

/** The raster's palette indices, rows from the top (PNG order), 0 where there is no value. */
export function rasterIndices(map: Extract<ErrorMap, { kind: 'raster' }>, scale: ColourScale): Uint8Array {
  const { nx, ny, values } = map;
  const out = new Uint8Array(nx * ny);
  for (let j = 0; j < ny; j++) {
    const row = (ny - 1 - j) * nx;
    for (let i = 0; i < nx; i++) out[row + i] = scale.index(values[i + j * nx]!);
  }
  return out;
}

/** The colour bar as a 1 × 255 image, the highest colour on top. */
function barPng(scale: ColourScale): Uint8Array {
  const indices = new Uint8Array(COLOURS);
  for (let k = 0; k < COLOURS; k++) indices[k] = COLOURS - k;
  return encodeIndexedPng({ width: 1, height: COLOURS, indices, palette: scale.palette });
}

/** A hover rectangle: pixels [x, x + w) × [y, y + h) counted from the top-left, and its tooltip. */
export interface HoverRegion {
  x: number;
  y: number;
  w: number;
  h: number;
  text: string;
}

/** The invisible hover grid of a raster (see the file comment); blocks with no value get no region. */
export function hoverRegions(map: Extract<ErrorMap, { kind: 'raster' }>, what: MapStyle['what']): HoverRegion[] {
  const { nx, ny, values } = map;
  const block = Math.max(1, Math.ceil(Math.max(nx, ny) / HOVER_BLOCKS));
  const regions: HoverRegion[] = [];
  for (let top = 0; top < ny; top += block) {
    const h = Math.min(block, ny - top);
    let open: HoverRegion | null = null;
    for (let left = 0; left < nx; left += block) {
      const w = Math.min(block, nx - left);
      let lo = Infinity, hi = -Infinity;
      for (let r = top; r < top + h; r++) {
        const j = ny - 1 - r;
        for (let i = left; i < left + w; i++) {
          const v = values[i + j * nx]!;
          if (Number.isNaN(v)) continue;
          if (v < lo) lo = v;
          if (v > hi) hi = v;
        }
      }
      if (lo > hi) {
        open = null;
        continue;
      }
      const a = valueText(what, lo), b = valueText(what, hi);
      const text = a === b ? a : `${a} to ${b}`;
      if (open && open.text === text && open.x + open.w === left) {
        open.w += w;
      } else {
        open = { x: left, y: top, w, h, text };
        regions.push(open);
      }
    }
  }
  return regions;
}

/** "10⁻⁵" as SVG text: 10 with a raised exponent and a real minus sign. */
function powerLabel(v: number): string {
  const k = Math.round(Math.log10(v));
  return `10<tspan dy="-0.55em" font-size="0.72em">${k < 0 ? `\u2212${-k}` : String(k)}</tspan>`;
}

function plainNumber(v: number): string {
  const s = String(Number(v.toFixed(6)));
  return s.startsWith('-') ? `\u2212${s.slice(1)}` : s;
}

/** The vertical colour bar at (x, top) of the given height, with ticks and labels on its right. */
function colourBar(scale: ColourScale, style: MapStyle, x: number, top: number, height: number): string {
  const y = (at: number) => r2(top + (1 - at) * height);
  const ticks = scale.ticks.map((t, k) => {
    const ty = y(t.at);
    const last = k === scale.ticks.length - 1;
    const prefix = k === 0 && t.at <= 1e-9 && scale.clippedLow ? '≤ ' : last && t.at >= 1 - 1e-9 && scale.clippedHigh ? '≥ ' : '';
    const label = scale.kind === 'log' ? `${prefix}${powerLabel(t.value)}` : escapeXml(`${prefix}${plainNumber(t.value)}${t.major && scale.centre !== null ? ' expected' : ''}`);
    return el('g', { class: t.major ? 'bar-tick bar-tick-major' : 'bar-tick', 'data-value': t.value }, [
      el('line', { x1: x + BAR_WIDTH, x2: x + BAR_WIDTH + (t.major ? 7 : 4), y1: ty, y2: ty, stroke: INK, 'stroke-width': 1 }),
      `<text class="bar-label" x="${x + BAR_WIDTH + 9}" y="${r2(ty + 4)}" font-size="11"${t.major && scale.centre !== null ? ' font-weight="600"' : ''}>${label}</text>`,
    ]);
  });
  const range = scale.kind === 'log'
    ? `${sci(scale.domain[0], 2)} to ${sci(scale.domain[1], 2)}, log scale`
    : `${plainNumber(scale.domain[0])} to ${plainNumber(scale.domain[1])}${scale.centre !== null ? `, centred on the expected ${orderText(scale.centre)}` : ''}`;
  return el('g', { class: 'colour-bar' }, [
    el('title', {}, escapeXml(`${style.valueName}: ${range} (${scale.mapName})`)),
    el('text', { class: 'bar-title', x, y: top - 8, 'font-size': 11, fill: MUTED }, escapeXml(style.valueName)),
    el('image', { class: 'bar-image', href: pngDataUri(barPng(scale)), x, y: top, width: BAR_WIDTH, height, preserveAspectRatio: 'none', style: 'image-rendering:pixelated' }),
    el('rect', { x, y: top, width: BAR_WIDTH, height, fill: 'none', stroke: INK, 'stroke-width': 0.75 }),
    el('g', { 'font-size': 11, fill: INK }, ticks),
  ]);
}

/** Linear ticks along one side of the map: below it (x) or left of it (y). */
function frameTicks(lo: number, hi: number, from: number, to: number, fixedAt: number, horizontal: boolean): string {
  const s = scaleLinear().domain([lo, hi]).range([from, to]);
  return s.ticks(horizontal ? 5 : 4).map((v) => {
    const p = r2(s(v));
    return horizontal
      ? el('g', { class: 'frame-tick' }, [
        el('line', { x1: p, x2: p, y1: fixedAt, y2: fixedAt + 4, stroke: INK, 'stroke-width': 1 }),
        el('text', { x: p, y: fixedAt + 16, 'text-anchor': 'middle', 'font-size': 11, fill: INK }, escapeXml(plainNumber(v))),
      ])
      : el('g', { class: 'frame-tick' }, [
        el('line', { x1: fixedAt - 4, x2: fixedAt, y1: p, y2: p, stroke: INK, 'stroke-width': 1 }),
        el('text', { x: fixedAt - 7, y: r2(p + 4), 'text-anchor': 'end', 'font-size': 11, fill: INK }, escapeXml(plainNumber(v))),
      ]);
  }).join('');
}

/** SVG of a raster map: the PNG, scaled without smoothing to keep the domain's aspect, over a hatch that marks what
 *  lies outside the domain, framed with coordinates, the hover grid, and the colour bar. */
export function rasterSvg(map: Extract<ErrorMap, { kind: 'raster' }>, style: MapStyle): string {
  const scale = scaleFor(map, style);
  const [x0, x1, y0, y1] = map.bbox;
  const wide = x1 - x0 >= y1 - y0;
  const mapW = wide ? MAP_SIDE : Math.max(24, Math.round((MAP_SIDE * (x1 - x0)) / (y1 - y0)));
  const mapH = wide ? Math.max(24, Math.round((MAP_SIDE * (y1 - y0)) / (x1 - x0))) : MAP_SIDE;
  const barH = Math.max(mapH, BAR_MIN_HEIGHT);
  const left = M.left, top = M.top;
  const width = left + mapW + M.gap + M.legend;
  const height = top + Math.max(mapH, barH) + M.bottom;
  const png = encodeIndexedPng({ width: map.nx, height: map.ny, indices: rasterIndices(map, scale), palette: scale.palette, transparent: [NO_VALUE] });
  const hatch = `${style.id}-outside`;
  const sx = mapW / map.nx, sy = mapH / map.ny;
  const hover = hoverRegions(map, style.what).map((r) => el('rect', { x: r.x, y: r.y, width: r.w, height: r.h }, el('title', {}, escapeXml(r.text))));
  const sliceText = map.slice ? `, slice ${map.slice.axis} = ${plainNumber(map.slice.at)}` : '';
  let lo = Infinity, hi = -Infinity, outside = 0;
  for (const v of map.values) {
    if (Number.isNaN(v)) outside++;
    else { if (v < lo) lo = v; if (v > hi) hi = v; }
  }
  const desc = `${style.title}${sliceText}: ${map.nx} × ${map.ny} pixels over [${plainNumber(x0)}, ${plainNumber(x1)}] × [${plainNumber(y0)}, ${plainNumber(y1)}]` +
    (lo <= hi ? `, values from ${valueText(style.what, lo)} to ${valueText(style.what, hi)}` : ', no values') +
    (outside > 0 ? `; ${outside} pixels outside the domain (hatched)` : '') + '.';
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="rungs-error-map" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-labelledby="${style.id}-title ${style.id}-desc" font-family="${escapeXml(FONT)}" data-nx="${map.nx}" data-ny="${map.ny}">`,
    el('title', { id: `${style.id}-title` }, escapeXml(style.title + sliceText)),
    el('desc', { id: `${style.id}-desc` }, escapeXml(desc)),
    `<defs><pattern id="${hatch}" width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)"><rect width="6" height="6" fill="#f6f8fa"/><line x1="0" y1="0" x2="0" y2="6" stroke="${GRID}" stroke-width="2"/></pattern></defs>`,
    el('rect', { x: 0, y: 0, width, height, fill: '#ffffff' }),
    el('text', { class: 'map-title', x: left, y: 20, 'font-size': 13, 'font-weight': 600, fill: INK }, escapeXml(style.title + sliceText)),
    el('rect', { class: 'map-outside', x: left, y: top, width: mapW, height: mapH, fill: `url(#${hatch})` }),
    el('image', { class: 'map-image', href: pngDataUri(png), x: left, y: top, width: mapW, height: mapH, preserveAspectRatio: 'none', style: 'image-rendering:pixelated' }),
    el('rect', { class: 'map-frame', x: left, y: top, width: mapW, height: mapH, fill: 'none', stroke: INK, 'stroke-width': 0.75 }),
    frameTicks(x0, x1, left, left + mapW, top + mapH, true),
    frameTicks(y0, y1, top + mapH, top, left, false),
    el('g', { class: 'map-hover', transform: `translate(${left} ${top}) scale(${r2(sx * 1000) / 1000} ${r2(sy * 1000) / 1000})`, fill: 'transparent' }, hover),
    colourBar(scale, style, left + mapW + M.gap, top, barH),
    '</svg>',
  ].join('\n');
}

/** SVG of a 1D profile: the values against x, on a log axis for densities and a linear one for local orders (with
 *  the expected order dashed), and invisible bands with the values on hover. */
export function profileSvg(map: Extract<ErrorMap, { kind: 'profile' }>, style: MapStyle): string {
  const width = 460, plotH = 240;
  const left = 74, right = width - 20, top = 34, bottom = top + plotH;
  const height = bottom + 48;
  const { x: xs, values } = map;
  const n = xs.length;
  const xScale = scaleLinear().domain(n > 0 ? [xs[0]!, xs[n - 1]!] : [0, 1]).range([left, right]);
  if (n === 1) xScale.domain([xs[0]! - 0.5, xs[0]! + 0.5]);
  xScale.nice();
  const density = style.what === 'density';
  const plottable = (v: number) => (density ? Number.isFinite(v) && v > 0 : Number.isFinite(v));
  const shown: number[] = [];
  for (const v of values) if (plottable(v)) shown.push(v);
  const expected = !density && style.expected !== null && style.expected !== undefined && Number.isFinite(style.expected) ? style.expected : null;
  let yOf: (v: number) => number;
  let yAxisSvg: string;
  if (density) {
    const y = logScale(shown, [bottom, top]);
    yOf = (v) => y(v);
    yAxisSvg = yAxis(y, left, right, style.valueName, 18);
  } else {
    const ext = [...shown, ...(expected !== null ? [expected] : [])];
    let lo = Infinity, hi = -Infinity;
    for (const v of ext) { if (v < lo) lo = v; if (v > hi) hi = v; }
    if (!(lo <= hi)) [lo, hi] = [0, 1];
    if (hi - lo < 1) [lo, hi] = [(lo + hi) / 2 - 0.5, (lo + hi) / 2 + 0.5];
    // A little room above and below, so a line on the extreme values stays clear of the frame and the labels.
    [lo, hi] = [lo - 0.05 * (hi - lo), hi + 0.05 * (hi - lo)];
    const y = scaleLinear().domain([lo, hi]).range([bottom, top]).nice();
    yOf = (v) => y(v);
    const ticks = y.ticks(5).map((v) => {
      const p = r2(y(v));
      return el('g', { class: 'tick' }, [
        el('line', { x1: left, x2: right, y1: p, y2: p, stroke: GRID, 'stroke-width': 1 }),
        el('text', { class: 'tick-label', x: left - 9, y: r2(p + 4), 'text-anchor': 'end' }, escapeXml(plainNumber(v))),
      ]);
    });
    const mid = r2((top + bottom) / 2);
    yAxisSvg = el('g', { class: 'axis axis-y', 'font-size': 12, fill: INK }, [
      ...ticks,
      el('line', { class: 'domain', x1: left, x2: left, y1: top, y2: bottom, stroke: INK, 'stroke-width': 1 }),
      el('text', { class: 'axis-label', x: 18, y: mid, 'text-anchor': 'middle', 'font-size': 13, transform: `rotate(-90 18 ${mid})` }, escapeXml(style.valueName)),
    ]);
  }
  const xTicks = xScale.ticks(6).map((v) => {
    const p = r2(xScale(v));
    return el('g', { class: 'tick' }, [
      el('line', { x1: p, x2: p, y1: bottom, y2: bottom + 5, stroke: INK, 'stroke-width': 1 }),
      el('text', { class: 'tick-label', x: p, y: bottom + 19, 'text-anchor': 'middle' }, escapeXml(plainNumber(v))),
    ]);
  });
  const xAxisSvg = el('g', { class: 'axis axis-x', 'font-size': 12, fill: INK }, [
    ...xTicks,
    el('line', { class: 'domain', x1: left, x2: right, y1: bottom, y2: bottom, stroke: INK, 'stroke-width': 1 }),
    el('text', { class: 'axis-label', x: r2((left + right) / 2), y: bottom + 40, 'text-anchor': 'middle', 'font-size': 13 }, 'x'),
  ]);
  // The line, broken where a value cannot be drawn.
  let d = '';
  let pen = false;
  for (let k = 0; k < n; k++) {
    const v = values[k]!;
    if (!plottable(v)) { pen = false; continue; }
    d += `${pen ? 'L' : 'M'}${r2(xScale(xs[k]!))},${r2(yOf(v))}`;
    pen = true;
  }
  // Hover bands: at most 64, each over consecutive points, telling their x range and values.
  const bands: string[] = [];
  const per = Math.max(1, Math.ceil(n / 64));
  for (let s = 0; s < n; s += per) {
    const e = Math.min(n, s + per);
    let lo = Infinity, hi = -Infinity;
    for (let k = s; k < e; k++) {
      const v = values[k]!;
      if (Number.isNaN(v)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    if (lo > hi) continue;
    const xa = s === 0 ? left : (xScale(xs[s - 1]!) + xScale(xs[s]!)) / 2;
    const xb = e === n ? right : (xScale(xs[e - 1]!) + xScale(xs[e]!)) / 2;
    const a = valueText(style.what, lo), b = valueText(style.what, hi);
    const where = e - s === 1 ? `x = ${plainNumber(Number(xs[s]!.toPrecision(4)))}` : `x ${plainNumber(Number(xs[s]!.toPrecision(4)))} to ${plainNumber(Number(xs[e - 1]!.toPrecision(4)))}`;
    bands.push(el('rect', { x: r2(xa), y: top, width: r2(Math.max(0.5, xb - xa)), height: plotH }, el('title', {}, escapeXml(`${where}: ${a === b ? a : `${a} to ${b}`}`))));
  }
  const expectedLine = expected === null ? '' : el('g', { class: 'expected-line' }, [
    el('line', { x1: left, x2: right, y1: r2(yOf(expected)), y2: r2(yOf(expected)), stroke: OKABE_ITO.vermillion, 'stroke-width': 1.25, 'stroke-dasharray': '5 3' }),
    el('text', { x: right - 4, y: r2(yOf(expected) - 5), 'text-anchor': 'end', 'font-size': 11, fill: OKABE_ITO.vermillion }, escapeXml(`expected ${orderText(expected)}`)),
  ]);
  let lo = Infinity, hi = -Infinity;
  for (const v of shown) { if (v < lo) lo = v; if (v > hi) hi = v; }
  const desc = `${style.title}: ${n} points` + (lo <= hi ? `, values from ${valueText(style.what, lo)} to ${valueText(style.what, hi)}` : ', no values') + '.';
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="rungs-error-profile" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-labelledby="${style.id}-title ${style.id}-desc" font-family="${escapeXml(FONT)}">`,
    el('title', { id: `${style.id}-title` }, escapeXml(style.title)),
    el('desc', { id: `${style.id}-desc` }, escapeXml(desc)),
    el('rect', { x: 0, y: 0, width, height, fill: '#ffffff' }),
    el('text', { class: 'map-title', x: left, y: 20, 'font-size': 13, 'font-weight': 600, fill: INK }, escapeXml(style.title)),
    el('rect', { class: 'plot-area', x: left, y: top, width: right - left, height: plotH, fill: 'none', stroke: GRID }),
    yAxisSvg,
    xAxisSvg,
    expectedLine,
    d === '' ? '' : el('path', { class: 'profile-line', d, fill: 'none', stroke: OKABE_ITO.blue, 'stroke-width': 1.5, 'stroke-linejoin': 'round' }),
    el('g', { class: 'profile-hover', fill: 'transparent' }, bands),
    '</svg>',
  ].join('\n');
}

/** The SVG of any map. */
export function errorMapSvg(map: ErrorMap, style: MapStyle): string {
  return map.kind === 'raster' ? rasterSvg(map, style) : profileSvg(map, style);
}

/** How a norm's density is defined, in words and symbols. */
function densityDefinition(norm: string): string {
  if (norm === 'L2') return '√(∫_K (u − u_h)² / |K|)';
  if (norm === 'H1semi') return '√(∫_K |∇(u − u_h)|² / |K|)';
  return `√(∫_K e² / |K|) of the ${norm} error integrand e`;
}

function entryTitle(e: ErrorMapEntry): string {
  return e.what === 'density' ? `${e.norm} error density, level ${levelNumber(e.level)}` : `Local order of the ${e.norm} error, level ${levelNumber(e.level)}`;
}

/** A share of the area in words: "3%", "under 1%" for a small non-zero share, "none" for zero. */
function shareText(x: number): string {
  if (x === 0) return 'none';
  if (x < 0.005) return 'under 1%';
  if (x > 0.995 && x < 1) return 'over 99%';
  return `${Math.round(100 * x)}%`;
}

/** The local orders of a map in one sentence: "Local orders over 98% of the area (the rest at round-off): median 2.98,
 *  90% of the area between 2.85 and 3.10; 3% of it below 2.9 and none above 3.1 (expected 3 ± 0.1)." */
export function localOrderSummaryText(s: LocalOrderSummary): string {
  const where = s.covered < 0.995 ? `over ${shareText(s.covered)} of the area (the rest at round-off)` : 'over the whole area';
  const band = s.expected !== null && s.below !== null && s.above !== null
    ? `; ${shareText(s.below)} of it below ${orderText(s.expected - s.tolerance)} and ${shareText(s.above)} above ${orderText(s.expected + s.tolerance)} (expected ${orderText(s.expected)} ± ${orderText(s.tolerance)})`
    : '';
  return `Local orders ${where}: median ${fixed(s.median)}, 90% of the area between ${fixed(s.p05)} and ${fixed(s.p95)}${band}.`;
}

function entryCaption(r: StudyResult, e: ErrorMapEntry, map: ErrorMap, expected: number | null): string {
  const finest = r.levels.length > 0 && e.level === r.levels[r.levels.length - 1]!.index;
  const levelWords = `level ${levelNumber(e.level)}${finest ? ' (the finest)' : ''}`;
  const where = map.kind === 'profile'
    ? `along the interval, ${map.x.length} points (the cells' midpoints, or equally spaced samples on finer meshes)`
    : `drawn as ${map.nx} × ${map.ny} pixels, each with the value of the cell that holds its centre${map.slice ? `, on the slice ${map.slice.axis} = ${plainNumber(map.slice.at)} through the middle of the box` : ''}${map.values.some(Number.isNaN) ? `; hatched: outside the domain${e.what === 'local-order' ? ', or no order there (an error at round-off)' : ''}` : ''}`;
  const hover = map.kind === 'profile' ? 'Point at the plot for the values.' : 'Point at the map for the range of values in a small region.';
  if (e.what === 'density') {
    return `Error density ${densityDefinition(e.norm)} on each cell K of ${levelWords}, ${where}. Colours: viridis on a log scale. ${hover}`;
  }
  const scaleWords = map.kind === 'profile'
    ? expected !== null ? `; dashed: the expected order ${orderText(expected)}` : ''
    : expected !== null
      ? `. Colours: red below the expected order ${orderText(expected)}, blue above it, pale on it (ColorBrewer RdBu)`
      : '. Colours: viridis on a linear scale (no expected order)';
  const summary = e.summary ? ` ${localOrderSummaryText(e.summary)}` : '';
  return `Local observed order of the ${e.norm} error on each cell K of ${levelWords}, from its error and that of its children on level ${levelNumber(e.level + 1)}, ${where}${scaleWords}.${summary} ${hover}`;
}

/** Added to the stylesheet only when some study has maps, so reports without them stay as they were. */
export const ERROR_MAP_CSS = `
.error-maps { display: flex; flex-wrap: wrap; gap: 16px 28px; align-items: flex-start; }
.error-maps figure { margin: 8px 0; max-width: 100%; }
.error-maps figure svg { border: 1px solid var(--line); border-radius: 6px; }
table.regions td.low, table.regions td.named { color: var(--bad); }
table.regions td.named { font-weight: 600; }
ul.region-reasons { margin: 2px 0 8px; padding-left: 18px; font-size: 13.5px; }
@media print { .error-maps { gap: 8px 16px; } }
`;

/** The "Where the error lives" section of a study, or '' when it has no maps. */
export function errorMapSection(r: StudyResult): string {
  const entries = r.errorMaps ?? [];
  if (entries.length === 0) return '';
  const figures = entries.map((e, k) => {
    let map: ErrorMap;
    try {
      map = decodeErrorMap(e.map, `${r.study}: errorMaps[${k}].map`);
    } catch (err) {
      // One unreadable map (a hand-edited results file, say) costs its figure, not the page.
      return `<p class="warnings">⚠ ${escapeXml(`map ${k + 1} not drawn: ${err instanceof Error ? err.message : String(err)}`)}</p>`;
    }
    const expected = e.what === 'local-order' ? (analysisOf(r, e.norm)?.expected ?? null) : null;
    const style: MapStyle = {
      what: e.what,
      expected,
      title: entryTitle(e),
      valueName: e.what === 'density' ? `${e.norm} density` : 'local order',
      id: `error-map-${fileStem(r.study)}-${k}`,
    };
    const svg = errorMapSvg(map, style);
    // The figure as wide as its drawing, so that the caption wraps under it and two figures share a row.
    const width = /^<svg [^>]*? width="(\d+)"/.exec(svg)?.[1];
    return (
      `<figure class="error-map" data-norm="${escapeXml(e.norm)}" data-what="${e.what}" data-level="${e.level}"${width ? ` style="width:${width}px"` : ''}>` +
      `${svg}<figcaption>${escapeXml(entryCaption(r, e, map, expected))}</figcaption></figure>`
    );
  });
  return ['<h3>Where the error lives</h3>', `<div class="error-maps">`, ...figures, '</div>', regionTable(r)].filter((x) => x !== '').join('\n');
}

/** A region's name in the table: "interior", "strip along 'top'", "where 'left' and 'top' meet". */
function regionName(o: RegionOrder): string {
  if (o.kind === 'interior') return 'interior';
  if (o.kind === 'strip') return `strip along '${o.tags[0]}'`;
  return `where ${o.tags.map((t) => `'${t}'`).join(' and ')} meet`;
}

/**
 * The order fitted in each region (the interior, the strip along each boundary tag, the cells where two strips meet)
 * for each norm the study analysed by region (src/analysis/regions.ts), a region slower than the interior marked, and
 * the analysis's reason per norm under the table; '' for a study without regions.
 */
export function regionTable(r: StudyResult): string {
  const where = r.where ?? [];
  if (where.length === 0) return '';
  // Rows in the first norm's order (every norm has the same regions: they come from the same mesh tags).
  const rows = [where[0]!.analysis.interior, ...where[0]!.analysis.strips, ...where[0]!.analysis.meets].map(regionName);
  const cell = (o: RegionOrder | undefined, places: readonly string[]): string => {
    if (!o || o.order === null) return '<td class="num">—</td>';
    const ci = o.fit && Number.isFinite(o.fit.ciLow) && Number.isFinite(o.fit.ciHigh) ? ` [${fixed(o.fit.ciLow)}, ${fixed(o.fit.ciHigh)}]` : '';
    const named = o.kind === 'strip' && places.includes(o.tags[0]!);
    const marks = (o.low ? ' <span class="low-mark" title="slower than the interior">▼</span>' : '') +
      (named ? ' <span class="named-mark" title="named as the likely cause">●</span>' : '') +
      (o.singular ? ' <span class="point-mark" title="its error gathers at a point where the exact solution is singular">✱</span>' : '');
    return `<td class="num${o.low ? ' low' : ''}${named ? ' named' : ''}">${escapeXml(`${fixed(o.order)}${ci}`)}${marks}</td>`;
  };
  const byName = where.map((w) => {
    const all = [w.analysis.interior, ...w.analysis.strips, ...w.analysis.meets];
    return new Map(all.map((o) => [regionName(o), o]));
  });
  const body = rows.map((name) => `<tr><td class="text">${escapeXml(name)}</td>${byName.map((m, k) => cell(m.get(name), where[k]!.analysis.places)).join('')}</tr>`);
  const expected = where.map((w) => `${w.norm} ${orderText(w.analysis.expected)}`).join(', ');
  return [
    '<table class="regions">',
    `<caption>${escapeXml(`Observed order in each region, fitted like the global order over the finest levels before any floor, with its 95% interval (expected: ${expected}). ▼: slower than the interior; ●: a strip named as the likely cause in the reason below; ✱: a strip whose error gathers at a point where the exact solution is singular.`)}</caption>`,
    `<thead><tr><th class="text">region</th>${where.map((w) => `<th>${escapeXml(w.norm)}</th>`).join('')}</tr></thead>`,
    `<tbody>${body.join('\n')}</tbody>`,
    '</table>',
    `<ul class="region-reasons">${where.map((w) => `<li>${escapeXml(`${w.norm}: ${w.analysis.reason}`)}</li>`).join('')}</ul>`,
  ].join('\n');
}
