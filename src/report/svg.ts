import type { SeriesAnalysis } from '../analysis/types.ts';
import type { LevelResult, StudyResult } from '../study/result.ts';
import { marker } from './markers.ts';
import { placeTriangle, type PlacedTriangle } from './slope-triangle.ts';
import { fixed, intervalText, levelNumber, orderText, sci } from './numbers.ts';
import { seriesStyle } from './palette.ts';
import { analysisOf, fileStem, normNames } from './series.ts';
import { verdictLabel } from './verdict.ts';
import { el, escapeXml } from './xml.ts';
import { FONT, GRID, INK, logScale, MUTED, r2, xAxis, yAxis } from './svg-axes.ts';
import { gridPlot } from './grid-plot.ts';

export interface PlotOptions {
  /** Abscissa: mesh size h (default) or degrees of freedom, for ladders whose h means little. A ladder that refines
   *  Δt on a fixed mesh is always plotted against Δt, and a two-axis design against both (grid-plot.ts). */
  x?: 'h' | 'dofs';
  /** Outer width in px (default 640). */
  width?: number;
  /** Height of the plotting area in px (default 340); the legend adds a row per norm below it. */
  plotHeight?: number;
}

const MARGIN = { left: 74, right: 22, top: 38, bottom: 52 };
const LEGEND_ROW = 20;

interface Point {
  x: number;
  y: number;
  level: number;
  onFloor: boolean;
}

interface Series {
  norm: string;
  analysis: SeriesAnalysis | undefined;
  points: Point[];
  triangle: (PlacedTriangle & { label: string }) | null;
}

/** What the abscissa of the plot is. */
type Abscissa = 'h' | 'dofs' | 'dt';

const AXIS_WORDS: Record<Abscissa, string> = { h: 'mesh size h', dofs: 'degrees of freedom', dt: 'time step Δt' };

function collectSeries(result: StudyResult, axis: Abscissa): Series[] {
  const xOf = (l: LevelResult) => (axis === 'h' ? l.h : axis === 'dt' ? (l.dt ?? Number.NaN) : l.dofs);
  const series: Series[] = normNames(result).map((norm) => {
    const analysis = analysisOf(result, norm);
    const points = result.levels
      .map((l, i): Point => ({
        x: xOf(l),
        y: l.errors[norm],
        level: l.index,
        onFloor: analysis?.floorFrom !== null && analysis?.floorFrom !== undefined && i >= analysis.floorFrom,
      }))
      // A log axis cannot show zero, negative or missing values.
      .filter((p) => Number.isFinite(p.x) && p.x > 0 && Number.isFinite(p.y) && p.y > 0);
    return { norm, analysis, points, triangle: null };
  });
  const logPoints = series.map((s) => s.points.map((p) => ({ u: Math.log(p.x), v: Math.log(p.y) })));
  const placed: PlacedTriangle[] = [];
  series.forEach((s, k) => {
    const p = s.analysis?.expected;
    if (p === null || p === undefined || !(p > 0) || !showsSlope(s.analysis!) || s.points.length < 2) return;
    // Error ~ h^p (or Δt^q on a ladder in Δt, whose expected order is the temporal one), or ~ N^(-p/d) in d
    // dimensions when plotted against dofs.
    const slope = axis === 'dofs' ? -p / result.dim : p;
    const t = placeTriangle(logPoints[k], slope, logPoints.filter((_, j) => j !== k), placed);
    if (!t) return;
    placed.push(t);
    s.triangle = { ...t, label: orderText(Math.abs(slope)) };
  });
  return series;
}

/**
 * Whether a series gets an expected-slope triangle: not when it is exact (its errors are round-off, and a slope beside
 * them means nothing), nor when it does not converge (no fit, a fitted order at or below zero, or an interval that
 * reaches zero), where a triangle would suggest a rate the data do not have.
 */
export function showsSlope(a: SeriesAnalysis): boolean {
  if (a.verdict === 'exact' || !a.fit) return false;
  const { order, ciLow } = a.fit;
  return order > 0 && (Number.isFinite(ciLow) ? ciLow > 0 : true);
}

/** "L2: fitted 2.98 [2.95, 3.01], expected 3; verdict ✓ on-order" */
export function legendText(series: { norm: string; analysis: SeriesAnalysis | undefined }): string {
  const a = series.analysis;
  if (!a) return `${series.norm}: not analysed`;
  const fitted = a.fit ? `fitted ${fixed(a.fit.order)} ${intervalText(a.fit.ciLow, a.fit.ciHigh)}` : 'no fit';
  return `${series.norm}: ${fitted}, expected ${orderText(a.expected)}; verdict ${verdictLabel(a.verdict)}`;
}

function describe(result: StudyResult, series: Series[], axisWord: string): string {
  const parts = series.map((s) => {
    const errs = s.points.map((p) => sci(p.y)).join(', ');
    return `${legendText(s)}; errors ${errs || 'none plottable'}.`;
  });
  return (
    `Log-log plot of the error against ${axisWord} over ${result.levels.length} levels of study ${result.study}. ` +
    parts.join(' ') +
    ' Each dashed triangle beside the data has the expected slope (none for an exact or a non-converging series); hollow markers sit on an error floor.'
  );
}

/** An SVG log-log plot of error against h (or dofs, or Δt for a ladder in Δt) for each norm of one study, with
 *  expected-slope triangles; a two-axis (h, Δt) design gets the plot of grid-plot.ts. */
export function svgPlot(result: StudyResult, options: PlotOptions = {}): string {
  if (result.time?.axis === 'grid') return gridPlot(result, options);
  const axis: Abscissa = result.time?.axis === 'dt' ? 'dt' : (options.x ?? 'h');
  const width = options.width ?? 640;
  const plotHeight = options.plotHeight ?? 340;
  const series = collectSeries(result, axis);
  const hasFloor = series.some((s) => s.points.some((p) => p.onFloor));
  const legendHeight = (series.length + (hasFloor ? 1 : 0)) * LEGEND_ROW + 12;
  const height = MARGIN.top + plotHeight + MARGIN.bottom + legendHeight;
  const left = MARGIN.left;
  const right = width - MARGIN.right;
  const top = MARGIN.top;
  const bottom = top + plotHeight;

  const xs = series.flatMap((s) => [...s.points.map((p) => p.x), ...(s.triangle?.corners.map((c) => Math.exp(c.u)) ?? [])]);
  // Room for a triangle's "1" label beyond its horizontal leg: a factor e^0.45 ≈ 1.6 past the corners.
  const labelRoom = (t: PlacedTriangle) => (t.placement === 'below' ? -0.45 : 0.45);
  const ys = series.flatMap((s) => [
    ...s.points.map((p) => p.y),
    ...(s.triangle ? s.triangle.corners.map((c) => Math.exp(c.v)) : []),
    ...(s.triangle ? [Math.exp(s.triangle.runLabel.v + labelRoom(s.triangle))] : []),
  ]);
  const x = logScale(xs, [left, right]);
  const y = logScale(ys, [bottom, top]);
  const axisWord = AXIS_WORDS[axis];
  const id = `rungs-plot-${fileStem(result.study)}`;

  const lines = series.map((s, k) => {
    const { color, shape } = seriesStyle(k);
    const d = s.points.map((p, i) => `${i === 0 ? 'M' : 'L'}${r2(x(p.x))},${r2(y(p.y))}`).join(' ');
    const marks = s.points.map((p) =>
      marker(shape, x(p.x), y(p.y), 4.5, color, p.onFloor, 'marker', `${s.norm}, level ${levelNumber(p.level)}: error ${sci(p.y)}`),
    );
    return el('g', { class: 'series', 'data-norm': s.norm }, [
      d === '' ? '' : el('path', { class: 'series-line', 'data-norm': s.norm, d, fill: 'none', stroke: color, 'stroke-width': 1.75, 'stroke-linejoin': 'round' }),
      ...marks,
    ]);
  });

  const triangles = series.map((s, k) => {
    if (!s.triangle) return '';
    const { color } = seriesStyle(k);
    const t = s.triangle;
    const px = (u: number) => x(Math.exp(u));
    const py = (v: number) => y(Math.exp(v));
    const pts = t.corners.map((c) => `${r2(px(c.u))},${r2(py(c.v))}`).join(' ');
    const rise = t.riseLabel;
    const run = t.runLabel;
    return el('g', { class: 'slope-triangle', 'data-norm': s.norm, 'data-order': s.analysis?.expected ?? '', 'data-placement': t.placement }, [
      el('title', {}, escapeXml(`${s.norm}: expected order ${orderText(s.analysis?.expected)}${axis === 'dofs' ? ` (slope ${t.label} against dofs in ${result.dim}-D)` : ''}`)),
      el('polygon', { points: pts, fill: color, 'fill-opacity': 0.08, stroke: color, 'stroke-width': 1, 'stroke-dasharray': '4 2' }),
      el('text', { class: 'slope-label', x: r2(px(rise.u) + (rise.side === 'right' ? 6 : -6)), y: r2(py(rise.v) + 4), 'text-anchor': rise.side === 'right' ? 'start' : 'end', 'font-size': 12, fill: color, 'font-weight': 600 }, escapeXml(t.label)),
      el('text', { class: 'slope-run', x: r2(px(run.u)), y: r2(py(run.v) + (run.side === 'below' ? 14 : -5)), 'text-anchor': 'middle', 'font-size': 11, fill: MUTED }, '1'),
    ]);
  });

  const legend = series.map((s, k) => {
    const { color, shape } = seriesStyle(k);
    const ly = bottom + MARGIN.bottom + 8 + k * LEGEND_ROW;
    return el('g', { class: 'legend-entry', 'data-norm': s.norm }, [
      el('line', { x1: left, x2: left + 28, y1: ly, y2: ly, stroke: color, 'stroke-width': 1.75 }),
      marker(shape, left + 14, ly, 4.5, color, false, 'legend-marker'),
      el('text', { x: left + 38, y: ly + 4, 'font-size': 12.5, fill: INK }, escapeXml(legendText(s))),
    ]);
  });

  if (hasFloor) {
    const ly = bottom + MARGIN.bottom + 8 + series.length * LEGEND_ROW;
    legend.push(
      el('g', { class: 'legend-entry legend-floor' }, [
        marker('circle', left + 14, ly, 4.5, MUTED, true, 'legend-marker'),
        el('text', { x: left + 38, y: ly + 4, 'font-size': 12.5, fill: MUTED }, 'hollow marker: error on a floor (round-off or solver tolerance)'),
      ]),
    );
  }

  const title = `${result.study}: error against ${axisWord}`;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="rungs-plot" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-labelledby="${id}-title ${id}-desc" font-family="${escapeXml(FONT)}">`,
    el('title', { id: `${id}-title` }, escapeXml(title)),
    el('desc', { id: `${id}-desc` }, escapeXml(describe(result, series, axisWord))),
    el('rect', { x: 0, y: 0, width, height, fill: '#ffffff' }),
    el('text', { class: 'plot-title', x: left, y: 22, 'font-size': 14, 'font-weight': 600, fill: INK }, escapeXml(title)),
    el('rect', { class: 'plot-area', x: left, y: top, width: right - left, height: plotHeight, fill: 'none', stroke: GRID }),
    xAxis(x, bottom, top, axisWord),
    yAxis(y, left, right, 'error'),
    el('g', { class: 'slope-triangles' }, triangles),
    el('g', { class: 'data' }, lines),
    el('g', { class: 'legend' }, legend),
    '</svg>',
  ].join('\n');
}
