/**
 * SVG plots of studies with time: a ladder in Δt is plotted against Δt, with its expected-slope triangle in Δt; a
 * two-axis design gets per norm a panel against h with a line per Δt and a panel against Δt with a line per mesh,
 * each with the joint fit e = C_h h^p + C_t Δt^q drawn dashed along the line. Positions are read back from the axes'
 * decade ticks and compared with values worked out here.
 */
import { describe, expect, it } from 'vitest';
import { SERIES_COLORS } from '../../src/report/palette.ts';
import { svgPlot } from '../../src/report/svg.ts';
import { logAxisOf, markerCentre, pixelOf, pointsOf, triangleSlope, valueOf } from './plot-geometry.ts';
import { GRID_FITS, rodCoupled, rodDt, rodGrid, rodH } from './time-fixture.ts';
import { byClass, byTag, hasClass, parseXml, textOf, type XmlNode } from './xml-tree.ts';

const MARKER_TAGS = new Set(['circle', 'rect', 'polygon']);
const axisLabel = (node: XmlNode, cls: string) => textOf(byClass(byClass(node, cls)[0], 'axis-label')[0]);

describe('svgPlot of a ladder in Δt', () => {
  const result = rodDt();
  const svg = parseXml(svgPlot(result));
  const x = logAxisOf(svg, 'axis-x');
  const y = logAxisOf(svg, 'axis-y');
  // Δt = T/steps with T = 2 and steps 8 … 128 (worked by hand).
  const dts = [0.25, 0.125, 0.0625, 0.03125, 0.015625];

  it('labels the abscissa Δt and says so in the title', () => {
    expect(axisLabel(svg, 'axis-x')).toBe('time step Δt');
    expect(textOf(svg.children.find((c) => c.tag === 'title')!)).toBe('rod-be-dt: error against time step Δt');
    expect(textOf(svg.children.find((c) => c.tag === 'desc')!)).toContain('against time step Δt');
  });

  it('places each marker at (Δt, error) although h is the same on every level', () => {
    for (const series of byClass(svg, 'series')) {
      const norm = series.attrs['data-norm'];
      const marks = series.children.filter((c) => MARKER_TAGS.has(c.tag));
      expect(marks).toHaveLength(5);
      marks.forEach((m, i) => {
        const [cx, cy] = markerCentre(m);
        expect(cx).toBeCloseTo(pixelOf(x, dts[i]), 0);
        expect(cy).toBeCloseTo(pixelOf(y, result.levels[i].errors[norm]), 0);
      });
    }
    // Five distinct abscissae: the plot did not fall back to the constant h.
    const xs = byClass(svg, 'series')[0].children.filter((c) => MARKER_TAGS.has(c.tag)).map((m) => markerCentre(m)[0]);
    expect(new Set(xs).size).toBe(5);
  });

  it('draws the expected-slope triangle against Δt: slope 1 for backward Euler', () => {
    // e = C Δt^1 is a line of slope 1 on log-log axes; backward Euler is first order (Hairer & Wanner 1996, from memory).
    const triangles = byClass(svg, 'slope-triangle');
    expect(triangles).toHaveLength(2);
    for (const t of triangles) {
      expect(triangleSlope(t, x, y)).toBeCloseTo(1, 2);
      expect(textOf(byClass(t, 'slope-label')[0])).toBe('1');
    }
  });

  it('ignores a request to plot against dofs, which do not change on a fixed mesh', () => {
    const other = parseXml(svgPlot(result, { x: 'dofs' }));
    expect(axisLabel(other, 'axis-x')).toBe('time step Δt');
  });
});

describe('svgPlot of ladders in h with time', () => {
  it('keeps h on the abscissa for a mesh ladder at fixed Δt and for a coupled path', () => {
    for (const r of [rodH(), rodCoupled()]) {
      const svg = parseXml(svgPlot(r));
      expect(axisLabel(svg, 'axis-x')).toBe('mesh size h');
      const x = logAxisOf(svg, 'axis-x');
      const marks = byClass(svg, 'series')[0].children.filter((c) => MARKER_TAGS.has(c.tag));
      marks.forEach((m, i) => expect(markerCentre(m)[0]).toBeCloseTo(pixelOf(x, 1 / r.levels[i].n!), 0));
    }
  });
});

describe('svgPlot of a two-axis design', () => {
  const result = rodGrid();
  const svg = parseXml(svgPlot(result));
  const rows = byClass(svg, 'norm-row');
  const panelOf = (row: XmlNode, axis: 'h' | 'dt') => byClass(row, `panel-${axis}`)[0];

  it('is one well-formed SVG with a row of two panels per norm', () => {
    expect(hasClass(svg, 'rungs-grid-plot')).toBe(true);
    expect(svg.attrs.role).toBe('img');
    expect(rows.map((r) => r.attrs['data-norm'])).toEqual(['L2', 'H1semi']);
    for (const row of rows) {
      expect(axisLabel(panelOf(row, 'h'), 'axis-x')).toBe('mesh size h');
      expect(axisLabel(panelOf(row, 'dt'), 'axis-x')).toBe('time step Δt');
      for (const p of [panelOf(row, 'h'), panelOf(row, 'dt')]) expect(axisLabel(p, 'axis-y')).toBe('error');
    }
    expect(textOf(svg.children.find((c) => c.tag === 'desc')!)).toContain('joint fit p = 2.98 [2.91, 3.05]');
  });

  it('draws one polyline per slice: per Δt against h, per mesh against Δt, with the slices named in the legend', () => {
    for (const row of rows) {
      const inH = panelOf(row, 'h');
      const inDt = panelOf(row, 'dt');
      // Four step counts (4, 8, 16, 32 over T = 1) and four meshes (n = 4 … 32): Δt = 1/steps, h = 1/n.
      expect(byClass(inH, 'slice-line').map((l) => l.attrs['data-slice'])).toEqual(['Δt = 1/4', 'Δt = 1/8', 'Δt = 1/16', 'Δt = 1/32']);
      expect(byClass(inDt, 'slice-line').map((l) => l.attrs['data-slice'])).toEqual(
        ['n = 4 (h = 2.50e-01)', 'n = 8 (h = 1.25e-01)', 'n = 16 (h = 6.25e-02)', 'n = 32 (h = 3.13e-02)']);
      for (const panel of [inH, inDt]) {
        expect(byClass(panel, 'slice-line').every((l) => l.tag === 'polyline')).toBe(true);
        expect(byTag(byClass(panel, 'data')[0], 'polyline')).toHaveLength(4);
        const legend = byClass(panel, 'legend-entry').filter((e) => e.attrs['data-slice']).map((e) => textOf(e));
        expect(legend).toEqual(byClass(panel, 'slice-line').map((l) => l.attrs['data-slice']));
        // Slice j takes the j-th Okabe–Ito colour of the one-axis plot.
        byClass(panel, 'slice-line').forEach((l, j) => expect(l.attrs.stroke).toBe(SERIES_COLORS[j]));
      }
    }
  });

  it('places the markers of each slice at (h, error) and (Δt, error)', () => {
    for (const row of rows) {
      const norm = row.attrs['data-norm'];
      for (const axis of ['h', 'dt'] as const) {
        const panel = panelOf(row, axis);
        const x = logAxisOf(panel, 'axis-x');
        const y = logAxisOf(panel, 'axis-y');
        const slices = byClass(panel, 'slice');
        expect(slices).toHaveLength(4);
        slices.forEach((slice, j) => {
          const marks = slice.children.filter((c) => hasClass(c, 'marker'));
          expect(marks).toHaveLength(4);
          // Slice j of the panel in h holds 4 · 2^j steps and n runs over 4, 8, 16, 32 (the markers go from the
          // largest abscissa to the smallest); slice j of the panel in Δt holds n = 4 · 2^j and the steps run.
          const fixed = 4 * 2 ** j;
          const running = [4, 8, 16, 32];
          marks.forEach((m, k) => {
            const other = running[k];
            const [n, steps] = axis === 'h' ? [other, fixed] : [fixed, other];
            const h = 1 / n;
            const dt = 1 / steps;
            const e = norm === 'L2' ? 0.4 * h ** 3 + 0.2 * dt : 1.5 * h ** 2 + 0.6 * dt;
            // The box centre of a triangle marker sits 0.2 r (0.8 px) off its anchor; a pixel of slack covers it.
            const [cx, cy] = markerCentre(m);
            expect(Math.abs(cx - pixelOf(x, axis === 'h' ? h : dt))).toBeLessThan(1);
            expect(Math.abs(cy - pixelOf(y, e))).toBeLessThan(1);
            expect(textOf(m)).toContain(`h = ${h.toExponential(2).replace(/e-(\d)$/, 'e-0$1')}`);
          });
        });
      }
    }
  });

  it('draws the joint fit along each slice, dashed, on e = C_h h^p + C_t Δt^q', () => {
    for (const row of rows) {
      const norm = row.attrs['data-norm'] as 'L2' | 'H1semi';
      const f = GRID_FITS[norm];
      for (const axis of ['h', 'dt'] as const) {
        const panel = panelOf(row, axis);
        const x = logAxisOf(panel, 'axis-x');
        const y = logAxisOf(panel, 'axis-y');
        const fits = byClass(panel, 'slice-fit');
        expect(fits).toHaveLength(4);
        fits.forEach((line, j) => {
          expect(line.tag).toBe('polyline');
          expect(line.attrs['stroke-dasharray']).toBeTruthy();
          expect(line.attrs.stroke).toBe(SERIES_COLORS[j]);
          // Slice j holds Δt = 1/(4 · 2^j) in the panel in h, h = 1/(4 · 2^j) in the panel in Δt.
          const fixed = 1 / (4 * 2 ** j);
          let worst = 0;
          for (const [px, py] of pointsOf(line)) {
            const v = valueOf(x, px);
            // The model of the joint fit, evaluated by hand with the fixture's constants.
            const e = axis === 'h' ? f.Ch * v ** f.p + f.Ct * fixed ** f.q : f.Ch * fixed ** f.p + f.Ct * v ** f.q;
            worst = Math.max(worst, Math.abs(Math.log10(valueOf(y, py)) - Math.log10(e)));
          }
          // Pixels are rounded to 0.01 px, a few hundred pixels per decade: 1e-3 decades is well above that.
          expect(worst).toBeLessThan(1e-3);
        });
      }
    }
  });

  it('states in each panel the order it shows, with interval, expected value and verdict', () => {
    const l2 = rows[0];
    expect(textOf(byClass(panelOf(l2, 'h'), 'legend-order')[0])).toBe('p = 2.98 [2.91, 3.05], expected 3: ✓ on-order');
    expect(textOf(byClass(panelOf(l2, 'dt'), 'legend-order')[0])).toBe('q = 1.01 [0.98, 1.04], expected 1: ✓ on-order');
  });

  it('draws no dashed fit when the norm has no joint fit', () => {
    const r = rodGrid();
    r.twoAxis = r.twoAxis!.map((t) => ({ ...t, fit: null }));
    const s = parseXml(svgPlot(r));
    expect(byClass(s, 'slice-fit')).toHaveLength(0);
    expect(byClass(s, 'slice-line')).toHaveLength(16);
    expect(textOf(byClass(s, 'legend-order')[0])).toBe('p: no fit, expected 3: ✓ on-order');
  });
});
