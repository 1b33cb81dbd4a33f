/**
 * Pictures of where the error lives. The PNG inside each map is read back here by a decoder of its own (chunk layout
 * from the PNG specification, W3C 2003, 2nd ed. §5) with node:zlib as the outside reference for the CRC and the
 * deflate stream; the expected pixel rows and ticks are worked out by hand from the scales' definitions.
 */
import * as zlib from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { lShapeMesh, meshFromArrays } from '../../src/mesh/index.ts';
import { encodeErrorMap, rasterizeCells, type ErrorMap } from '../../src/mesh/raster.ts';
import { densityScale, orderScale } from '../../src/report/colour-scale.ts';
import { errorMapSection, errorMapSvg, hoverRegions, localOrderSummaryText, ERROR_MAP_CSS } from '../../src/report/error-map.ts';
import { htmlReport } from '../../src/report/html.ts';
import { crc32, encodeIndexedPng, PNG_SIGNATURE } from '../../src/report/png.ts';
import { demoResults } from './fixture.ts';
import { mapResults } from './error-map-fixture.ts';

type Raster = Extract<ErrorMap, { kind: 'raster' }>;

interface Chunk { type: string; data: Buffer; crc: number; crcOk: boolean }

/** Splits a PNG into its chunks: 4-byte length, 4-byte type, data, CRC-32 over type and data (PNG 2nd ed. §5.3),
 *  each CRC checked against node:zlib's. */
function chunks(png: Uint8Array): Chunk[] {
  const buf = Buffer.from(png);
  const out: Chunk[] = [];
  for (let at = 8; at < buf.length;) {
    const length = buf.readUInt32BE(at);
    const type = buf.toString('latin1', at + 4, at + 8);
    const data = buf.subarray(at + 8, at + 8 + length);
    const crc = buf.readUInt32BE(at + 8 + length);
    const reference = typeof zlib.crc32 === 'function' ? zlib.crc32(buf.subarray(at + 4, at + 8 + length)) : crc32(buf, at + 4, at + 8 + length);
    out.push({ type, data, crc, crcOk: reference === crc });
    at += 12 + length;
  }
  return out;
}

/** Width, height, colour type and the raw pixel rows (filter byte + indices each) of an indexed PNG. */
function decode(png: Uint8Array) {
  const list = chunks(png);
  const ihdr = list.find((c) => c.type === 'IHDR')!.data;
  const idat = Buffer.concat(list.filter((c) => c.type === 'IDAT').map((c) => c.data));
  return {
    signature: Array.from(png.subarray(0, 8)),
    types: list.map((c) => c.type),
    crcsOk: list.every((c) => c.crcOk),
    width: ihdr.readUInt32BE(0),
    height: ihdr.readUInt32BE(4),
    bitDepth: ihdr[8],
    colourType: ihdr[9],
    interlace: ihdr[12],
    palette: list.find((c) => c.type === 'PLTE')?.data,
    alpha: list.find((c) => c.type === 'tRNS')?.data,
    raw: zlib.inflateSync(idat),
  };
}

function pngsIn(svg: string): Uint8Array[] {
  return [...svg.matchAll(/href="data:image\/png;base64,([A-Za-z0-9+/=]+)"/g)].map((m) => new Uint8Array(Buffer.from(m[1], 'base64')));
}

describe('crc32', () => {
  it('gives the CRC-32 check value and the CRC of an IEND chunk', () => {
    // Check value of CRC-32 over "123456789": 0xCBF43926 (Williams 1993, "A painless guide to CRC error detection
    // algorithms", the CRC-32 parameter set; from memory). Every PNG ends in IEND with CRC AE 42 60 82 (from memory).
    expect(crc32(new TextEncoder().encode('123456789'))).toBe(0xcbf43926);
    expect(crc32(new TextEncoder().encode('IEND'))).toBe(0xae426082);
  });
});

describe('encodeIndexedPng', () => {
  it('writes signature, IHDR, PLTE, tRNS, IDAT, IEND with valid CRCs and the rows it was given', () => {
    const indices = Uint8Array.of(0, 1, 2, 2, 1, 0);
    const palette = Uint8Array.of(9, 9, 9, 255, 0, 0, 0, 0, 255);
    const png = decode(encodeIndexedPng({ width: 3, height: 2, indices, palette, transparent: [0] }));
    // PNG 2nd ed. §5.2 (signature), §11.2.2 (IHDR: bit depth 8, colour type 3 = indexed, interlace 0).
    expect(png.signature).toEqual(Array.from(PNG_SIGNATURE));
    expect(png.signature).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
    expect(png.types).toEqual(['IHDR', 'PLTE', 'tRNS', 'IDAT', 'IEND']);
    expect(png.crcsOk).toBe(true);
    expect([png.width, png.height, png.bitDepth, png.colourType, png.interlace]).toEqual([3, 2, 8, 3, 0]);
    expect(Array.from(png.palette!)).toEqual(Array.from(palette));
    expect(Array.from(png.alpha!)).toEqual([0]);
    // Each row: filter type 0, then its indices (§7.3, §9.2).
    expect(Array.from(png.raw)).toEqual([0, 0, 1, 2, 0, 2, 1, 0]);
  });
});

/** Four unit squares of [0, 2]^2 with densities 1e-4, 1e-3, 1e-2, 1e-1 (bottom left, bottom right, top left, top right). */
function squaresMap(): Raster {
  const mesh = meshFromArrays({
    cellKind: 'quadrilateral',
    coords: [0, 0, 1, 0, 2, 0, 0, 1, 1, 1, 2, 1, 0, 2, 1, 2, 2, 2],
    cells: [0, 1, 4, 3, 1, 2, 5, 4, 3, 4, 7, 6, 4, 5, 8, 7],
  });
  return rasterizeCells(mesh, Float64Array.of(1e-4, 1e-3, 1e-2, 1e-1), { maxPixels: 4 }) as Raster;
}

describe('raster maps', () => {
  const style = { what: 'density' as const, title: 'L2 error density, level 3', valueName: 'L2 density', id: 'm' };

  it('embeds a PNG of the map\'s size whose rows are the colour indices, top row first', () => {
    const [mapPng, barPng] = pngsIn(errorMapSvg(squaresMap(), style));
    const png = decode(mapPng);
    expect([png.width, png.height]).toEqual([4, 4]);
    expect(png.crcsOk).toBe(true);
    // Log scale over the decades 1e-4 … 1e-1: positions 0, ⅓, ⅔, 1, palette index 1 + round(254 t) = 1, 86, 170, 255
    // (by hand). The top rows show the top squares (1e-2, 1e-1).
    const top = [0, 170, 170, 255, 255];
    const bottom = [0, 1, 1, 86, 86];
    expect(Array.from(png.raw)).toEqual([...top, ...top, ...bottom, ...bottom]);
    // The palette's ends are viridis' ends, #440154 and #FDE725 (van der Walt & Smith 2015, the matplotlib table;
    // from memory).
    expect(Array.from(png.palette!.subarray(3, 6))).toEqual([0x44, 0x01, 0x54]);
    expect(Array.from(png.palette!.subarray(765, 768))).toEqual([0xfd, 0xe7, 0x25]);
    // The colour bar: one column of the 255 colours, the highest on top (by construction of the bar).
    const bar = decode(barPng);
    expect([bar.width, bar.height]).toEqual([1, 255]);
    expect(Array.from(bar.raw.subarray(0, 4))).toEqual([0, 255, 0, 254]);
    expect(Array.from(bar.raw.subarray(-2))).toEqual([0, 1]);
  });

  it('makes the pixels outside the L-shape transparent', () => {
    const mesh = lShapeMesh(4);
    const map = rasterizeCells(mesh, new Float64Array(mesh.nCells).fill(1e-3), { maxPixels: 16 }) as Raster;
    const png = decode(pngsIn(errorMapSvg(map, style))[0]);
    expect(Array.from(png.alpha!)).toEqual([0]);
    // Rows from the top: rows 0–7 are y > 0 (all inside), rows 8–15 have the notch at columns 8–15 (by hand).
    const wrong: string[] = [];
    for (let r = 0; r < 16; r++) {
      for (let i = 0; i < 16; i++) {
        const index = png.raw[r * 17 + 1 + i];
        const outside = r >= 8 && i >= 8;
        if ((index === 0) !== outside) wrong.push(`row ${r} column ${i}: ${index}`);
      }
    }
    expect(wrong).toEqual([]);
    expect(errorMapSvg(map, style)).toContain('url(#m-outside)');
  });

  it('draws the image without smoothing, at the domain\'s aspect', () => {
    const svg = errorMapSvg(squaresMap(), style);
    expect(svg).toMatch(/<image class="map-image"[^>]*width="280" height="280"[^>]*style="image-rendering:pixelated"/);
  });

  it('shows the values on hover', () => {
    const map = squaresMap();
    // 4 pixels a side → blocks of one pixel; equal neighbours in a row merge: two regions per row (by hand).
    expect(hoverRegions(map, 'density')).toEqual([
      { x: 0, y: 0, w: 2, h: 1, text: '1.0e-02' }, { x: 2, y: 0, w: 2, h: 1, text: '1.0e-01' },
      { x: 0, y: 1, w: 2, h: 1, text: '1.0e-02' }, { x: 2, y: 1, w: 2, h: 1, text: '1.0e-01' },
      { x: 0, y: 2, w: 2, h: 1, text: '1.0e-04' }, { x: 2, y: 2, w: 2, h: 1, text: '1.0e-03' },
      { x: 0, y: 3, w: 2, h: 1, text: '1.0e-04' }, { x: 2, y: 3, w: 2, h: 1, text: '1.0e-03' },
    ]);
    const titles = [...errorMapSvg(map, style).matchAll(/<rect x="\d+" y="\d+" width="\d+" height="\d+"><title>([^<]*)<\/title><\/rect>/g)].map((m) => m[1]);
    expect(titles).toEqual(['1.0e-02', '1.0e-01', '1.0e-02', '1.0e-01', '1.0e-04', '1.0e-03', '1.0e-04', '1.0e-03']);
  });

  it('gives a block the range of its values, and no block outside the domain', () => {
    // A 2-pixel-high, 48-pixel-wide strip: blocks of ⌈48/24⌉ = 2 pixels; pixel values 0.01·i along x, so block k
    // spans 0.02k … 0.02k + 0.01 (by hand); the last 8 pixels are NaN.
    const values = new Float32Array(96);
    for (let j = 0; j < 2; j++) for (let i = 0; i < 48; i++) values[i + 48 * j] = i >= 40 ? Number.NaN : 1 + 0.01 * i;
    const map: Raster = { kind: 'raster', nx: 48, ny: 2, bbox: [0, 24, 0, 1], values };
    const regions = hoverRegions(map, 'local-order');
    expect(regions.length).toBe(20);
    expect(regions[0]).toEqual({ x: 0, y: 0, w: 2, h: 2, text: '1.00 to 1.01' });
    expect(regions[19]).toEqual({ x: 38, y: 0, w: 2, h: 2, text: '1.38 to 1.39' });
  });
});

describe('colour bars', () => {
  it('ticks a density bar at whole decades on a log scale', () => {
    // Values 3e-6 … 2e-3: the bar spans the decades 1e-6 … 1e-2 (by hand), one tick each.
    const s = densityScale(Float64Array.of(3e-6, 5e-5, 2e-3, Number.NaN));
    expect(s.kind).toBe('log');
    expect(s.domain[0]).toBeCloseTo(1e-6, 20);
    expect(s.domain[1]).toBeCloseTo(1e-2, 18);
    expect(s.ticks.map((t) => Math.round(Math.log10(t.value)))).toEqual([-6, -5, -4, -3, -2]);
    // Positions: (k + 6)/4 along the bar (by hand).
    expect(s.ticks.map((t) => t.at)).toEqual([0, 0.25, 0.5, 0.75, 1].map((v) => expect.closeTo(v, 12)));
    expect(s.index(Number.NaN)).toBe(0);
    expect(s.index(1e-4)).toBe(128); // 1 + round(254 · ½) (by hand)
  });

  it('caps a density bar at six decades below the largest value, clamping smaller values and zeros', () => {
    const s = densityScale(Float64Array.of(0, 1e-12, 1e-2));
    // 1e-2 · 1e-6 = 1e-8 (by hand).
    expect(Math.round(Math.log10(s.domain[0]))).toBe(-8);
    expect(s.clippedLow).toBe(true);
    expect(s.index(0)).toBe(1);
    expect(s.index(1e-12)).toBe(1);
    const svg = errorMapSvg({ kind: 'raster', nx: 3, ny: 1, bbox: [0, 3, 0, 1], values: Float32Array.of(0, 1e-12, 1e-2) }, { what: 'density', title: 't', valueName: 'L2 density', id: 'c' });
    expect(svg).toContain('>≤ 10<tspan');
  });

  it('centres a local-order bar on the expected order, ticks in halves, and marks the clipped end', () => {
    // |v − 2| ≤ 0.4 → half-width max(1, ⌈0.8⌉/2) = 1: bar 1 … 3, ticks 1, 1.5, 2, 2.5, 3 (d3's 1-2-5 steps; by hand).
    const s = orderScale(Float64Array.of(1.6, 2, 2.3, 2, Number.NaN), 2);
    expect(s.domain).toEqual([1, 3]);
    expect(s.ticks.map((t) => t.value)).toEqual([1, 1.5, 2, 2.5, 3]);
    expect(s.ticks.filter((t) => t.major).map((t) => t.value)).toEqual([2]);
    expect(s.index(2)).toBe(128);
    expect(s.centre).toBe(2);
    // An order of 8 beside 2s: the half-width is capped at 3, so the bar is −1 … 5 and 8 is clipped (by hand).
    const wide = orderScale(Float64Array.of(-1, 2, 2, 2, 8), 2);
    expect(wide.domain).toEqual([-1, 5]);
    expect(wide.clippedHigh).toBe(true);
    const svg = errorMapSvg({ kind: 'raster', nx: 5, ny: 1, bbox: [0, 5, 0, 1], values: Float32Array.of(-1, 2, 2, 2, 8) }, { what: 'local-order', expected: 2, title: 't', valueName: 'local order', id: 'o' });
    expect(svg).toContain('>≥ 5</text>');
    expect(svg).toContain('>2 expected</text>');
  });

  it('draws the diverging map red below the expected order and blue above', () => {
    // RdBu's ends (Harrower & Brewer 2003, ColorBrewer's 11-class RdBu: #67001F dark red, #053061 dark blue; from
    // memory).
    const s = orderScale(Float64Array.of(1, 3), 2);
    expect(Array.from(s.palette.subarray(3, 6))).toEqual([0x67, 0x00, 0x1f]);
    expect(Array.from(s.palette.subarray(765, 768))).toEqual([0x05, 0x30, 0x61]);
  });
});

describe('1D profiles', () => {
  const map = rasterizeCells(
    meshFromArrays({ cellKind: 'interval', coords: [0, 0.25, 0.5, 0.75, 1], cells: [0, 1, 1, 2, 2, 3, 3, 4] }),
    Float64Array.of(1e-5, 1e-4, 1e-3, 1e-2),
  );

  it('draws the density on a log axis, a line through every point, with values on hover', () => {
    const svg = errorMapSvg(map, { what: 'density', title: 'L2 error density', valueName: 'L2 density', id: 'p' });
    expect(svg).toContain('class="rungs-error-profile"');
    const d = /class="profile-line" d="([^"]+)"/.exec(svg)![1];
    expect(d.match(/[ML]/g)).toEqual(['M', 'L', 'L', 'L']);
    // Equal steps in log10 of the value are equal steps in y on a log axis (by hand: one decade each).
    const ys = [...d.matchAll(/[ML][\d.]+,([\d.]+)/g)].map((m) => Number(m[1]));
    const steps = ys.slice(1).map((y, k) => ys[k] - y);
    expect(Math.max(...steps) - Math.min(...steps)).toBeLessThan(0.05);
    const titles = [...svg.matchAll(/<title>(x = [^<]*)<\/title>/g)].map((m) => m[1]);
    expect(titles).toEqual(['x = 0.125: 1.0e-05', 'x = 0.375: 1.0e-04', 'x = 0.625: 1.0e-03', 'x = 0.875: 1.0e-02']);
    expect(svg).toMatch(/class="tick-label"[^>]*>10<tspan[^>]*>−5<\/tspan>/);
  });

  it('draws local orders on a linear axis with the expected order dashed', () => {
    const orders = { ...map, values: Float64Array.of(1, 2, 2, 2) } as ErrorMap;
    const svg = errorMapSvg(orders, { what: 'local-order', expected: 2, title: 'orders', valueName: 'local order', id: 'q' });
    expect(svg).toContain('class="expected-line"');
    expect(svg).toContain('>expected 2</text>');
    expect(svg).toContain('<title>x = 0.125: 1.00</title>');
  });
});

describe('the report section', () => {
  const results = mapResults();

  it('draws every map of a study with its caption, in a section of its own', () => {
    const r = results[1]; // the L-shaped tile: L2 and H1semi densities and L2 local orders
    const html = errorMapSection(r);
    expect(html.startsWith('<h3>Where the error lives</h3>')).toBe(true);
    expect(html.match(/<figure class="error-map"/g)).toHaveLength(3);
    expect(html).toContain('√(∫_K (u − u_h)² / |K|) on each cell K of level 5 (the finest)');
    expect(html).toContain('√(∫_K |∇(u − u_h)|² / |K|)');
    expect(html).toContain('hatched: outside the domain');
    expect(html).toContain('red below the expected order 2');
    // Ids are unique on the page.
    const ids = [...htmlReport(results).matchAll(/ id="([^"]+)"/g)].map((m) => m[1]);
    expect(new Set(ids).size).toBe(ids.length);
  });

  it('states the local orders\' summary under their map, in shares of the area', () => {
    const r = structuredClone(results[1]!);
    const entry = r.errorMaps!.find((e) => e.what === 'local-order')!;
    entry.summary = { covered: 0.97, p05: 1.3312, median: 1.98, p95: 2.041, below: 0.031, above: 0, expected: 2, tolerance: 0.1 };
    expect(errorMapSection(r)).toContain(
      'Local orders over 97% of the area (the rest at round-off): median 1.98, 90% of the area between 1.33 and 2.04; 3% of it below 1.9 and none above 2.1 (expected 2 ± 0.1).');
    entry.summary = { covered: 1, p05: 2.9, median: 3, p95: 3.1, below: null, above: null, expected: null, tolerance: 0.1 };
    expect(errorMapSection(r)).toContain('Local orders over the whole area: median 3.00, 90% of the area between 2.90 and 3.10.');
    expect(localOrderSummaryText({ covered: 1, p05: 1, median: 2, p95: 2, below: 0.001, above: 0.9999, expected: 2, tolerance: 0.1 }))
      .toContain('under 1% of it below 1.9 and over 99% above 2.1');
  });

  it('says where a 3D map was sliced, and draws a 1D study as profiles', () => {
    expect(errorMapSection(results[3])).toContain('on the slice z = 0.5 through the middle of the box');
    const rod = errorMapSection(results[2]);
    expect(rod.match(/class="rungs-error-profile"/g)).toHaveLength(3);
    expect(rod).not.toContain('rungs-error-map"');
  });

  it('adds its stylesheet and section only to reports with maps', () => {
    const withMaps = htmlReport(results);
    expect(withMaps).toContain(ERROR_MAP_CSS);
    expect(withMaps.match(/<h3>Where the error lives<\/h3>/g)).toHaveLength(results.length);
    const without = htmlReport(demoResults());
    expect(without).not.toContain('Where the error lives');
    expect(without).not.toContain(ERROR_MAP_CSS);
    // A study whose map list is empty renders as one without the field.
    const empty = demoResults().map((r) => ({ ...r, errorMaps: [] }));
    expect(htmlReport(empty)).toBe(without);
  });

  it('names the study and the field of a malformed map, and still draws the others', () => {
    const bad = { ...results[0].errorMaps![0], map: { ...encodeErrorMap(squaresMap()), values: 'AAAA' } };
    const r = { ...results[0], errorMaps: [bad, results[0].errorMaps![1]] };
    const html = errorMapSection(r);
    expect(html).toMatch(/map 1 not drawn: tile-p1-vertex-k: errorMaps\[0\]\.map\.values: expected 16 float32 numbers/);
    expect(html.match(/<figure class="error-map"/g)).toHaveLength(1);
  });
});
