/**
 * The plot of a two-axis (h, Δt) design: per norm a row of two log-log panels, the error against h with one line per
 * Δt (a slice of the design) and the error against Δt with one line per mesh. The joint fit e = C_h h^p + C_t Δt^q,
 * evaluated along each slice, is drawn dashed in the slice's colour, so that one sees where each slice leaves the
 * h^p (or Δt^q) line for the floor the other axis sets. Colours and markers are those of the one-axis plot.
 */
import type { ScaleLogarithmic } from 'd3-scale';
import type { TwoAxisAnalysis } from '../analysis/types.ts';
import type { StudyResult } from '../study/result.ts';
import { marker } from './markers.ts';
import { levelNumber, orderText, sci } from './numbers.ts';
import { seriesStyle } from './palette.ts';
import { fileStem, normNames } from './series.ts';
import type { PlotOptions } from './svg.ts';
import { FONT, GRID, INK, logScale, MUTED, r2, xAxis, yAxis } from './svg-axes.ts';
import { gridSlices, jointFitText, jointModel, jointOrderText, twoAxisOf, type Slice } from './time.ts';
import { verdictLabel } from './verdict.ts';
import { el, escapeXml } from './xml.ts';

const PANEL_MARGIN = { left: 70, right: 18, top: 26, bottom: 50 };
const TITLE_HEIGHT = 34;
const ROW_TITLE = 22;
const ROW_GAP = 18;
const LEGEND_ROW = 18;
/** Points of each dashed fitted slice: the model is a sum of two powers, a curve on log-log axes. */
const FIT_SAMPLES = 24;

interface PanelSpec {
  axis: 'h' | 'dt';
  word: string;
  title: string;
  slices: Slice[];
  /** The abscissa of level i. */
  xOf: (i: number) => number;
  /** The model along a slice at abscissa x. */
  model: ((slice: Slice, x: number) => number) | null;
  /** The order this panel shows, for its legend. */
  orderLine: string;
}

function logSpace(lo: number, hi: number, n: number): number[] {
  if (!(lo > 0) || !(hi > 0)) return [];
  if (lo === hi) return [lo];
  const a = Math.log(lo);
  const b = Math.log(hi);
  return Array.from({ length: n }, (_, k) => Math.exp(a + ((b - a) * k) / (n - 1)));
}

const positive = (v: number) => Number.isFinite(v) && v > 0;

/** Rows the slice legend takes: two columns when there are more than three slices. */
const sliceRows = (slices: number) => (slices > 3 ? Math.ceil(slices / 2) : slices);

/** One panel: frame, axes, the dashed fitted slices under the data, the data slices with markers, the legend. */
function panel(
  result: StudyResult,
  norm: string,
  spec: PanelSpec,
  box: { left: number; top: number; width: number; plotHeight: number },
  y: ScaleLogarithmic<number, number>,
): string {
  const left = box.left + PANEL_MARGIN.left;
  const right = box.left + box.width - PANEL_MARGIN.right;
  const top = box.top + PANEL_MARGIN.top;
  const bottom = top + box.plotHeight;
  const levels = result.levels;
  const xs = levels.map((_, i) => spec.xOf(i)).filter(positive);
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of xs) { if (v < lo) lo = v; if (v > hi) hi = v; }
  const x = logScale(xs, [left, right]);
  const samples = xs.length ? logSpace(lo, hi, FIT_SAMPLES) : [];

  const fits = spec.model === null ? [] : spec.slices.map((s, j) => {
    const { color } = seriesStyle(j);
    const pts = samples.map((v) => [v, spec.model!(s, v)] as const).filter(([, e]) => positive(e));
    if (pts.length < 2) return '';
    return el('polyline', {
      class: 'slice-fit', 'data-slice': s.label, points: pts.map(([v, e]) => `${r2(x(v))},${r2(y(e))}`).join(' '),
      fill: 'none', stroke: color, 'stroke-width': 1.25, 'stroke-dasharray': '5 3', 'stroke-opacity': 0.9,
    });
  });

  const data = spec.slices.map((s, j) => {
    const { color, shape } = seriesStyle(j);
    const pts = s.positions
      .map((i) => ({ i, x: spec.xOf(i), e: levels[i].errors[norm] }))
      .filter((p) => positive(p.x) && positive(p.e))
      .sort((a, b) => b.x - a.x);
    const marks = pts.map((p) => {
      const l = levels[p.i];
      const steps = l.steps === undefined ? '' : `, ${l.steps} steps`;
      const tip = `${norm}, level ${levelNumber(l.index)} (h = ${sci(l.h)}, Δt = ${sci(l.dt)}${steps}): error ${sci(p.e)}`;
      return marker(shape, x(p.x), y(p.e), 4, color, false, 'marker', tip);
    });
    return el('g', { class: 'slice', 'data-slice': s.label }, [
      el('title', {}, escapeXml(`${norm}, ${s.label}`)),
      el('polyline', {
        class: 'slice-line', 'data-slice': s.label, points: pts.map((p) => `${r2(x(p.x))},${r2(y(p.e))}`).join(' '),
        fill: 'none', stroke: color, 'stroke-width': 1.75, 'stroke-linejoin': 'round',
      }),
      ...marks,
    ]);
  });

  // Legend: the slices (in two columns when there are more than three), then the dashed fit and the order it shows.
  const legendTop = bottom + PANEL_MARGIN.bottom + 6;
  const columns = spec.slices.length > 3 ? 2 : 1;
  const columnWidth = (box.width - 24) / columns;
  const rows = sliceRows(spec.slices.length);
  const legend = spec.slices.map((s, j) => {
    const { color, shape } = seriesStyle(j);
    const col = columns === 2 ? Math.floor(j / rows) : 0;
    const lx = box.left + 12 + col * columnWidth;
    const ly = legendTop + (j % rows) * LEGEND_ROW;
    return el('g', { class: 'legend-entry', 'data-slice': s.label }, [
      el('line', { x1: lx, x2: lx + 24, y1: ly, y2: ly, stroke: color, 'stroke-width': 1.75 }),
      marker(shape, lx + 12, ly, 4, color, false, 'legend-marker'),
      el('text', { x: lx + 32, y: ly + 4, 'font-size': 12, fill: INK }, escapeXml(s.label)),
    ]);
  });
  const fy = legendTop + rows * LEGEND_ROW;
  const lx = box.left + 12;
  legend.push(
    el('g', { class: 'legend-entry legend-fit' }, [
      el('line', { x1: lx, x2: lx + 24, y1: fy, y2: fy, stroke: MUTED, 'stroke-width': 1.25, 'stroke-dasharray': '5 3' }),
      el('text', { x: lx + 32, y: fy + 4, 'font-size': 12, fill: MUTED }, escapeXml(spec.model ? 'dashed: e = C_h·h^p + C_t·Δt^q on each slice' : 'no joint fit to draw')),
    ]),
    el('g', { class: 'legend-entry legend-order' }, [
      el('text', { x: lx + 32, y: fy + LEGEND_ROW + 4, 'font-size': 12, fill: INK }, escapeXml(spec.orderLine)),
    ]),
  );

  return el('g', { class: `panel panel-${spec.axis}`, 'data-norm': norm, 'data-axis': spec.axis }, [
    el('text', { class: 'panel-title', x: left, y: top - 9, 'font-size': 12.5, fill: MUTED }, escapeXml(spec.title)),
    el('rect', { class: 'plot-area', x: left, y: top, width: right - left, height: box.plotHeight, fill: 'none', stroke: GRID }),
    xAxis(x, bottom, top, spec.word),
    yAxis(y, left, right, 'error', box.left + 18),
    el('g', { class: 'fits' }, fits),
    el('g', { class: 'data' }, data),
    el('g', { class: 'legend' }, legend),
  ]);
}

/** "p = 2.01 [1.95, 2.07], expected 2: ✓ on-order" for one panel's legend. */
function orderLine(ta: TwoAxisAnalysis | undefined, which: 'p' | 'q'): string {
  if (!ta) return 'not analysed';
  const expected = which === 'p' ? ta.expected.space : ta.expected.time;
  const verdict = which === 'p' ? ta.verdict.space : ta.verdict.time;
  const value = ta.fit ? `${which} = ${jointOrderText(ta.fit, which)}` : `${which}: no fit`;
  const converged = ta.fit && !ta.fit.converged ? ' (fit not converged)' : '';
  return `${value}${converged}, expected ${orderText(expected)}: ${verdictLabel(verdict)}`;
}

/** An SVG with, per norm, the error against h (a line per Δt) and against Δt (a line per mesh), and the joint fit. */
export function gridPlot(result: StudyResult, options: PlotOptions = {}): string {
  const width = options.width ?? 900;
  const plotHeight = options.plotHeight ?? 260;
  const norms = normNames(result);
  const { inH, inDt } = gridSlices(result);
  const levels = result.levels;
  const half = width / 2;
  const legendHeight = (Math.max(sliceRows(inH.length), sliceRows(inDt.length)) + 2) * LEGEND_ROW + 8;
  const rowHeight = ROW_TITLE + PANEL_MARGIN.top + plotHeight + PANEL_MARGIN.bottom + legendHeight + ROW_GAP;
  const height = TITLE_HEIGHT + norms.length * rowHeight;
  const id = `rungs-plot-${fileStem(result.study)}`;

  const rows = norms.map((norm, k) => {
    const ta = twoAxisOf(result, norm);
    const fit = ta?.fit ?? null;
    const top = TITLE_HEIGHT + k * rowHeight;
    const specs: PanelSpec[] = [
      {
        axis: 'h', word: 'mesh size h', title: 'error against h, a line per Δt', slices: inH,
        xOf: (i) => levels[i].h,
        model: fit ? (s, h) => jointModel(fit, h, s.fixed) : null,
        orderLine: orderLine(ta, 'p'),
      },
      {
        axis: 'dt', word: 'time step Δt', title: 'error against Δt, a line per mesh', slices: inDt,
        xOf: (i) => levels[i].dt ?? Number.NaN,
        model: fit ? (s, dt) => jointModel(fit, s.fixed, dt) : null,
        orderLine: orderLine(ta, 'q'),
      },
    ];
    // Both panels share the error scale, so that a slice's height reads the same left and right.
    const ys = levels.map((l) => l.errors[norm]).filter(positive);
    if (fit) {
      for (const spec of specs) {
        const xs = levels.map((_, i) => spec.xOf(i)).filter(positive);
        const lo = Math.min(...xs);
        const hi = Math.max(...xs);
        for (const s of spec.slices) for (const v of [lo, hi]) { const e = spec.model!(s, v); if (positive(e)) ys.push(e); }
      }
    }
    const panelTop = top + ROW_TITLE;
    const y = logScale(ys, [panelTop + PANEL_MARGIN.top + plotHeight, panelTop + PANEL_MARGIN.top]);
    return el('g', { class: 'norm-row', 'data-norm': norm }, [
      el('text', { class: 'row-title', x: 12, y: top + 16, 'font-size': 13.5, 'font-weight': 600, fill: INK }, escapeXml(`${norm} error`)),
      panel(result, norm, specs[0], { left: 0, top: panelTop, width: half, plotHeight }, y),
      panel(result, norm, specs[1], { left: half, top: panelTop, width: half, plotHeight }, y),
    ]);
  });

  const title = `${result.study}: error against h and Δt (two-axis design)`;
  const describe =
    `Two-axis design of study ${result.study}, ${levels.length} (h, Δt) pairs. For each norm, the error against mesh size h ` +
    `with a line per time step Δt (${inH.map((s) => s.label).join('; ')}), and against Δt with a line per mesh ` +
    `(${inDt.map((s) => s.label).join('; ')}); dashed lines are the joint fit e = C_h·h^p + C_t·Δt^q on each slice. ` +
    norms.map((norm) => {
      const ta = twoAxisOf(result, norm);
      const errors = levels.map((l) => `(h ${sci(l.h)}, Δt ${sci(l.dt)}) ${sci(l.errors[norm])}`).join(', ');
      return `${norm}: ${ta ? `joint fit ${jointFitText(ta)}` : 'not analysed'}; errors ${errors}.`;
    }).join(' ');
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="rungs-plot rungs-grid-plot" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-labelledby="${id}-title ${id}-desc" font-family="${escapeXml(FONT)}">`,
    el('title', { id: `${id}-title` }, escapeXml(title)),
    el('desc', { id: `${id}-desc` }, escapeXml(describe)),
    el('rect', { x: 0, y: 0, width, height, fill: '#ffffff' }),
    el('text', { class: 'plot-title', x: 12, y: 22, 'font-size': 14, 'font-weight': 600, fill: INK }, escapeXml(title)),
    ...rows,
    '</svg>',
  ].join('\n');
}
