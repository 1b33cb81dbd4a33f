import { describe, expect, it } from 'vitest';
import { OKABE_ITO, SERIES_COLORS } from '../../src/report/palette.ts';
import { svgPlot } from '../../src/report/svg.ts';
import { tileP1Patch, tileP2, tileP1Flawed } from './fixture.ts';
import { byClass, byTag, hasClass, parseXml, textOf, type XmlNode } from './xml-tree.ts';
import { logAxisOf as axisOf, markerCentre, pixelOf as pixel, triangleSlope } from './plot-geometry.ts';

const MARKER_TAGS = new Set(['circle', 'rect', 'polygon']);

describe('svgPlot against h', () => {
  const result = tileP2();
  const svg = parseXml(svgPlot(result));
  const x = axisOf(svg, 'axis-x');
  const y = axisOf(svg, 'axis-y');

  it('is well-formed SVG with a title and a description for assistive technology', () => {
    expect(svg.tag).toBe('svg');
    expect(svg.attrs.xmlns).toBe('http://www.w3.org/2000/svg');
    expect(svg.attrs.role).toBe('img');
    const title = svg.children.find((c) => c.tag === 'title')!;
    const desc = svg.children.find((c) => c.tag === 'desc')!;
    expect(textOf(title)).toBe('tile-p2: error against mesh size h');
    expect(textOf(desc)).toContain('L2: fitted');
    expect(svg.attrs['aria-labelledby']).toBe(`${title.attrs.id} ${desc.attrs.id}`);
  });

  it('labels decade ticks as powers of ten, equally spaced, on both axes, with axis names', () => {
    for (const axis of [x, y]) {
      expect(axis.at.size).toBeGreaterThanOrEqual(2);
      // On a log axis equal ratios are equal distances (common practice, no source).
      const ks = [...axis.at.keys()].sort((a, b) => a - b);
      for (let i = 1; i < ks.length; i++) {
        expect(axis.at.get(ks[i])! - axis.at.get(ks[i - 1])!).toBeCloseTo(axis.perDecade * (ks[i] - ks[i - 1]), 1);
      }
    }
    expect(textOf(byClass(byClass(svg, 'axis-x')[0], 'axis-label')[0])).toBe('mesh size h');
    expect(textOf(byClass(byClass(svg, 'axis-y')[0], 'axis-label')[0])).toBe('error');
    // Minor ticks (2·10^k … 9·10^k) carry no label.
    expect(byClass(svg, 'tick-minor').every((t) => byClass(t, 'tick-label').length === 0)).toBe(true);
  });

  it('draws one path per norm through markers placed at (h, error) on the log axes', () => {
    const paths = byClass(svg, 'series-line');
    expect(paths.map((p) => p.attrs['data-norm'])).toEqual(['L2', 'H1semi']);
    for (const series of byClass(svg, 'series')) {
      const norm = series.attrs['data-norm'];
      const marks = series.children.filter((c) => MARKER_TAGS.has(c.tag));
      expect(marks).toHaveLength(result.levels.length);
      marks.forEach((m, i) => {
        const [cx, cy] = markerCentre(m);
        expect(cx).toBeCloseTo(pixel(x, result.levels[i].h), 0);
        expect(cy).toBeCloseTo(pixel(y, result.levels[i].errors[norm]), 0);
      });
      const path = paths.find((p) => p.attrs['data-norm'] === norm)!;
      expect(path.attrs.d.split(/[ML]/).filter((s) => s.trim())).toHaveLength(result.levels.length);
    }
  });

  it('gives each norm its own marker shape and an Okabe–Ito colour', () => {
    const series = byClass(svg, 'series');
    const shapes = series.map((s) => s.children.find((c) => MARKER_TAGS.has(c.tag))!.tag);
    expect(new Set(shapes).size).toBe(series.length);
    const colors = byClass(svg, 'series-line').map((p) => p.attrs.stroke);
    expect(colors).toEqual([OKABE_ITO.blue, OKABE_ITO.vermillion]);
  });

  it('draws a slope triangle per norm labelled with the expected order, whose hypotenuse has that slope', () => {
    const triangles = byClass(svg, 'slope-triangle');
    expect(triangles.map((t) => t.attrs['data-norm'])).toEqual(['L2', 'H1semi']);
    for (const t of triangles) {
      const expected = result.analyses.find((a) => a.name === t.attrs['data-norm'])!.expected!;
      expect(textOf(byClass(t, 'slope-label')[0])).toBe(String(expected));
      // A power law e = C h^p is a straight line of slope p on log-log axes (common practice, no source).
      // perDecade of the y axis is negative (pixels grow downwards), so the slope comes out in data terms.
      expect(triangleSlope(t, x, y)).toBeCloseTo(expected, 2);
    }
  });

  it('has legend entries "norm: fitted p [lo, hi], expected q" with the verdict in words', () => {
    const entries = byClass(svg, 'legend-entry').map((e) => textOf(e));
    expect(entries[0]).toMatch(/^L2: fitted \d\.\d\d \[\d\.\d\d, \d\.\d\d\], expected 3; verdict ✓ on-order$/);
    expect(entries[1]).toMatch(/^H1semi: fitted \d\.\d\d \[\d\.\d\d, \d\.\d\d\], expected 2; verdict ✓ on-order$/);
  });

  it('keeps every marker and triangle inside the plotting area', () => {
    const area = byClass(svg, 'plot-area')[0];
    const [ax, ay, aw, ah] = ['x', 'y', 'width', 'height'].map((k) => Number(area.attrs[k]));
    const inside = ([px, py]: number[]) => px >= ax - 0.5 && px <= ax + aw + 0.5 && py >= ay - 0.5 && py <= ay + ah + 0.5;
    for (const m of byClass(svg, 'marker')) expect(inside(markerCentre(m))).toBe(true);
    for (const t of byClass(svg, 'slope-triangle')) {
      for (const p of byTag(t, 'polygon')[0].attrs.points.split(' ')) expect(inside(p.split(',').map(Number))).toBe(true);
    }
  });
});

describe('svgPlot variants', () => {
  it('plots against dofs with a triangle of slope −p/d', () => {
    const result = tileP2();
    const svg = parseXml(svgPlot(result, { x: 'dofs' }));
    const x = axisOf(svg, 'axis-x');
    const y = axisOf(svg, 'axis-y');
    expect(textOf(byClass(byClass(svg, 'axis-x')[0], 'axis-label')[0])).toBe('degrees of freedom');
    for (const t of byClass(svg, 'slope-triangle')) {
      const p = Number(t.attrs['data-order']);
      // Error ~ N^(−p/d) since h ~ N^(−1/d) on quasi-uniform meshes in d dimensions (common practice, no source).
      expect(triangleSlope(t, x, y)).toBeCloseTo(-p / result.dim, 2);
      expect(textOf(byClass(t, 'slope-label')[0])).toBe(String(p / result.dim));
    }
  });

  it('moves a triangle above its data when below it would cover another series', () => {
    const svg = parseXml(svgPlot(tileP1Flawed()));
    const placements = Object.fromEntries(byClass(svg, 'slope-triangle').map((t) => [t.attrs['data-norm'], t.attrs['data-placement']]));
    // The H1 seminorm line lies just above the L2 line: a triangle under it would sit on the L2 data.
    expect(placements).toEqual({ L2: 'below', H1semi: 'above' });
  });

  it('draws floor levels with hollow markers and says so in the legend', () => {
    const svg = parseXml(svgPlot(tileP1Patch()));
    const marks = byClass(svg, 'marker');
    expect(marks.length).toBe(10);
    expect(marks.every((m) => m.attrs.fill === '#ffffff')).toBe(true);
    expect(byClass(svg, 'legend-floor')).toHaveLength(1);
  });

  it('leaves out errors a log axis cannot show (zero) without breaking the path', () => {
    const r = tileP2();
    r.levels[4].errors.L2 = 0;
    const svg = parseXml(svgPlot(r));
    const path = byClass(svg, 'series-line').find((p) => p.attrs['data-norm'] === 'L2')!;
    expect(path.attrs.d.split(/[ML]/).filter((s) => s.trim())).toHaveLength(4);
    expect(svgPlot(r)).not.toMatch(/NaN|Infinity/);
  });

  it('uses unique ids per study so that several plots can share one page', () => {
    const a = parseXml(svgPlot(tileP2()));
    const b = parseXml(svgPlot(tileP1Patch()));
    const ids = (n: XmlNode) => [n, ...byTag(n, 'title'), ...byTag(n, 'desc')].map((e) => e.attrs.id).filter(Boolean);
    expect(ids(a).some((id) => ids(b).includes(id))).toBe(false);
    expect(hasClass(a, 'rungs-plot')).toBe(true);
  });
});

describe('palette', () => {
  it('holds the Okabe–Ito colours as published', () => {
    // RGB triples of the Okabe & Ito (2008) palette as printed in Wong (2011), Nature Methods 8:441, Fig. 2 (from memory).
    const published: Record<string, [number, number, number]> = {
      orange: [230, 159, 0],
      skyBlue: [86, 180, 233],
      bluishGreen: [0, 158, 115],
      blue: [0, 114, 178],
      vermillion: [213, 94, 0],
      reddishPurple: [204, 121, 167],
      black: [0, 0, 0],
    };
    for (const [name, rgb] of Object.entries(published)) {
      const hex = OKABE_ITO[name as keyof typeof OKABE_ITO];
      expect([1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16))).toEqual(rgb);
    }
    expect(new Set(SERIES_COLORS).size).toBe(SERIES_COLORS.length);
  });
});
