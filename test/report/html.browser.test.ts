import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeReportFiles } from '../../src/report/write.ts';
import { showsSlope } from '../../src/report/svg.ts';
import { demoResults } from './fixture.ts';
import { timeResults } from './time-fixture.ts';
import { mapResults } from './error-map-fixture.ts';
import { decodeErrorMap } from '../../src/mesh/raster.ts';
import { densityScale } from '../../src/report/colour-scale.ts';

const CHROMIUM = '/usr/bin/chromium';
const hasChromium = existsSync(CHROMIUM);

/** A page in a fresh chromium that records console errors and every request made. */
async function openInChromium(consoleErrors: string[], requests: string[]): Promise<{ browser: Browser; page: Page }> {
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  const page = await browser.newPage({ viewport: { width: 1100, height: 900 } });
  page.on('console', (m) => {
    if (m.type() === 'error') consoleErrors.push(m.text());
  });
  page.on('pageerror', (e) => consoleErrors.push(e.message));
  page.on('request', (r) => requests.push(r.url()));
  return { browser, page };
}
describe.skipIf(!hasChromium)(`HTML report in a real browser${hasChromium ? '' : ` (skipped: ${CHROMIUM} not found; install chromium to run it)`}`, () => {
  const results = demoResults();
  let browser: Browser;
  let page: Page;
  const consoleErrors: string[] = [];
  const requests: string[] = [];

  // Tests write only into temporary folders, never into the user's reports/.
  let REPORTS = '';
  let OUT = '';

  beforeAll(async () => {
    REPORTS = mkdtempSync(join(tmpdir(), 'rungs-browser-'));
    OUT = join(REPORTS, 'demo');
    const outcome = writeReportFiles(OUT, results, {
      meta: { generatedAt: '2025-03-14T09:30:00Z' },
      inputProblems: [{ study: 'tile-p3', file: 'studies/tile-p3.study.ts', message: 'ladder.n must be increasing; got [8, 4, 16]' }],
    });
    expect(outcome.failed).toEqual([]);
    ({ browser, page } = await openInChromium(consoleErrors, requests));
    await page.goto(pathToFileURL(join(OUT, 'index.html')).href, { waitUntil: 'load' });
  });

  afterAll(async () => {
    await browser?.close();
    if (REPORTS) rmSync(REPORTS, { recursive: true, force: true });
  });

  it('loads without console errors and without fetching anything but the page itself', () => {
    expect(consoleErrors).toEqual([]);
    expect(requests.filter((u) => !u.startsWith('file://'))).toEqual([]);
  });

  it('shows every study with its verdicts in words', async () => {
    for (const r of results) {
      const section = page.locator(`section.study[data-study="${r.study}"]`);
      await expect(section.locator('h2').isVisible()).resolves.toBe(true);
      const badge = (await section.locator('.study-head .outcome').innerText()).trim();
      expect(badge).toBe(r.asExpected ? '✓ as expected' : '✗ not as expected');
      for (const a of r.analyses) {
        const card = section.locator(`.card[data-norm="${a.name}"] .card-verdict`);
        expect(await card.isVisible()).toBe(true);
        expect((await card.innerText()).trim()).toMatch(new RegExp(`^. ${a.verdict}$`));
      }
    }
    const overview = await page.locator('table.overview').innerText();
    expect(overview).toContain('✗ below-order');
    expect(await page.locator('p.caution').isVisible()).toBe(true);
    expect(await page.locator('.problems').innerText()).toContain('tile-p3');
  });

  it('draws every plot with both axes, visible power-of-ten tick labels and a slope triangle per norm', async () => {
    const plots = page.locator('svg.rungs-plot');
    expect(await plots.count()).toBe(results.length);
    for (let i = 0; i < results.length; i++) {
      const plot = plots.nth(i);
      const box = (await plot.boundingBox())!;
      for (const axis of ['axis-x', 'axis-y']) {
        const labels = plot.locator(`.${axis} .tick-label`);
        expect(await labels.count()).toBeGreaterThanOrEqual(2);
        for (const text of await labels.allTextContents()) expect(text).toMatch(/^10[−]?\d+$/);
        const first = (await labels.first().boundingBox())!;
        expect(first.width).toBeGreaterThan(0);
        expect(first.x).toBeGreaterThanOrEqual(box.x - 1);
        expect(first.y + first.height).toBeLessThanOrEqual(box.y + box.height + 1);
      }
      // An exact series (the patch test) and a non-converging one get no triangle (svg.ts, showsSlope).
      const sloped = results[i].analyses.filter(showsSlope).length;
      expect(await plot.locator('.slope-triangle').count()).toBe(sloped);
      if (sloped) expect(await plot.locator('.slope-triangle .slope-label').first().isVisible()).toBe(true);
      // Legend lines fit inside the drawing.
      for (const entry of await plot.locator('.legend-entry text').all()) {
        const b = (await entry.boundingBox())!;
        expect(b.x + b.width).toBeLessThanOrEqual(box.x + box.width + 1);
      }
    }
  });

  it('starts each study on a new page when printed', async () => {
    await page.emulateMedia({ media: 'print' });
    const breaks = await page.locator('section.study').evaluateAll((els) => els.map((e) => getComputedStyle(e).breakBefore));
    expect(breaks.every((b) => b === 'page')).toBe(true);
    await page.emulateMedia({ media: 'screen' });
  });

  it('saves a screenshot of the page', async () => {
    const path = join(REPORTS, 'index.png');
    await page.screenshot({ path, fullPage: true });
    expect(existsSync(path)).toBe(true);
  });
});

describe.skipIf(!hasChromium)(`HTML report of studies with time in a real browser${hasChromium ? '' : ' (skipped: no chromium)'}`, () => {
  const results = timeResults();
  let browser: Browser;
  let page: Page;
  const consoleErrors: string[] = [];
  const requests: string[] = [];
  let REPORTS = '';

  beforeAll(async () => {
    REPORTS = mkdtempSync(join(tmpdir(), 'rungs-browser-time-'));
    const out = join(REPORTS, 'rod');
    expect(writeReportFiles(out, results, { meta: { generatedAt: '2025-03-14T10:30:00Z' } }).failed).toEqual([]);
    ({ browser, page } = await openInChromium(consoleErrors, requests));
    await page.goto(pathToFileURL(join(out, 'index.html')).href, { waitUntil: 'load' });
  });

  afterAll(async () => {
    await browser?.close();
    if (REPORTS) rmSync(REPORTS, { recursive: true, force: true });
  });

  it('loads without console errors and without fetching anything but the page itself', () => {
    expect(consoleErrors).toEqual([]);
    expect(requests.filter((u) => !u.startsWith('file://'))).toEqual([]);
  });

  it('shows each ladder sentence, and the Δt label under the plot of the ladder in Δt', async () => {
    for (const r of results) {
      const line = r.study === 'rod-be-dt' ? 'Δt refined on a fixed mesh (n = 64)' : 'time: T = ';
      expect(await page.locator(`section.study[data-study="${r.study}"] .time-design`).innerText()).toContain(line);
    }
    const dt = page.locator('section.study[data-study="rod-be-dt"] svg.rungs-plot');
    expect(await dt.locator('.axis-x .axis-label').textContent()).toBe('time step Δt');
    expect(await dt.locator('.axis-x .axis-label').isVisible()).toBe(true);
    expect(await dt.locator('.slope-triangle').count()).toBe(2);
  });

  it('draws every panel of a two-axis plot with labelled decades, and its legends inside the drawing without overlap', async () => {
    for (const study of ['rod-be-grid', 'rod-cn-grid-slow']) {
      const plot = page.locator(`section.study[data-study="${study}"] svg.rungs-grid-plot`);
      const box = (await plot.boundingBox())!;
      // Fits the page's content column without scaling its 12 px text below legibility.
      expect(box.width).toBeGreaterThan(800);
      const panels = plot.locator('.panel');
      expect(await panels.count()).toBe(4);
      for (let i = 0; i < 4; i++) {
        const panel = panels.nth(i);
        for (const axis of ['axis-x', 'axis-y']) {
          const labels = panel.locator(`.${axis} .tick-label`);
          expect(await labels.count()).toBeGreaterThanOrEqual(2);
          for (const text of await labels.allTextContents()) expect(text).toMatch(/^10[−]?\d+$/);
        }
        expect(await panel.locator('.slice-line').count()).toBe(4);
        expect(await panel.locator('.slice-fit').count()).toBe(4);
        const boxes = [];
        for (const entry of await panel.locator('.legend-entry text').all()) {
          const b = (await entry.boundingBox())!;
          expect(b.width).toBeGreaterThan(0);
          expect(b.x + b.width).toBeLessThanOrEqual(box.x + box.width + 1);
          expect(b.y + b.height).toBeLessThanOrEqual(box.y + box.height + 1);
          boxes.push(b);
        }
        // No two legend texts of a panel overlap (axis-aligned boxes, 1 px slack).
        for (let a = 0; a < boxes.length; a++) {
          for (let b = a + 1; b < boxes.length; b++) {
            const p = boxes[a];
            const q = boxes[b];
            const overlap = p.x < q.x + q.width - 1 && q.x < p.x + p.width - 1 && p.y < q.y + q.height - 1 && q.y < p.y + p.height - 1;
            expect(overlap).toBe(false);
          }
        }
        // The left legend column stays clear of the right panel.
        if (i % 2 === 0) {
          const next = (await panels.nth(i + 1).locator('.plot-area').boundingBox())!;
          for (const b of boxes) expect(b.x + b.width).toBeLessThanOrEqual(next.x);
        }
      }
    }
  });

  it('shows the joint-fit table with both verdicts and the reasons, within the page width', async () => {
    const table = page.locator('section.study[data-study="rod-cn-grid-slow"] table.joint-fits');
    expect(await table.isVisible()).toBe(true);
    const text = await table.innerText();
    expect(text).toContain('✗ below-order');
    expect(text).toContain('q = 1.01 [0.98, 1.04] is below the expected 2 (tolerance 0.1)');
    const main = (await page.locator('main').boundingBox())!;
    const b = (await table.boundingBox())!;
    expect(b.x + b.width).toBeLessThanOrEqual(main.x + main.width + 1);
  });

  it('saves a screenshot of the page', async () => {
    const path = join(REPORTS, 'index.png');
    await page.screenshot({ path, fullPage: true });
    expect(existsSync(path)).toBe(true);
  });
});

describe.skipIf(!hasChromium)(`HTML report with maps of where the error lives in a real browser${hasChromium ? '' : ' (skipped: no chromium)'}`, () => {
  const results = mapResults();
  let browser: Browser;
  let page: Page;
  const consoleErrors: string[] = [];
  const requests: string[] = [];
  let REPORTS = '';

  beforeAll(async () => {
    REPORTS = mkdtempSync(join(tmpdir(), 'rungs-browser-maps-'));
    const out = join(REPORTS, 'maps');
    expect(writeReportFiles(out, results, { meta: { generatedAt: '2025-03-14T11:30:00Z' } }).failed).toEqual([]);
    ({ browser, page } = await openInChromium(consoleErrors, requests));
    await page.goto(pathToFileURL(join(out, 'index.html')).href, { waitUntil: 'load' });
  });

  afterAll(async () => {
    await browser?.close();
    if (REPORTS) rmSync(REPORTS, { recursive: true, force: true });
  });

  it('loads without console errors and without fetching anything but the page itself', () => {
    expect(consoleErrors).toEqual([]);
    expect(requests.filter((u) => !u.startsWith('file://') && !u.startsWith('data:'))).toEqual([]);
  });

  it('decodes every map image at its natural size, shown within the page', async () => {
    const maps = page.locator('svg.rungs-error-map');
    // Two maps of the flawed tile, three of the L-shaped tile, one slice of the brick (the rod has profiles).
    expect(await maps.count()).toBe(6);
    const main = (await page.locator('main').boundingBox())!;
    for (let k = 0; k < 6; k++) {
      const svg = maps.nth(k);
      const expected = [Number(await svg.getAttribute('data-nx')), Number(await svg.getAttribute('data-ny'))];
      const image = svg.locator('image.map-image');
      const natural = await image.evaluate(async (el) => {
        const img = new Image();
        img.src = el.getAttribute('href')!;
        await img.decode();
        return [img.naturalWidth, img.naturalHeight];
      });
      expect(natural).toEqual(expected);
      const box = (await image.boundingBox())!;
      expect(box.width).toBeGreaterThan(100);
      expect(box.x + box.width).toBeLessThanOrEqual(main.x + main.width + 1);
      expect(await svg.locator('.colour-bar .bar-label').count()).toBeGreaterThanOrEqual(2);
    }
    expect(await page.locator('svg.rungs-error-profile .profile-line').count()).toBe(3);
  });

  it('shows the colours the browser decodes: transparent in the notch, the colour of the value inside', async () => {
    const r = results[1];
    const entry = r.errorMaps![0];
    const map = decodeErrorMap(entry.map);
    if (map.kind !== 'raster') throw new Error('expected a raster');
    const scale = densityScale(map.values);
    // Pixel (column 20, row 20 from the top) lies at x < 0, inside; (column 100, row 100) in the notch x > 0, y < 0.
    const inside = map.values[20 + (map.ny - 1 - 20) * map.nx];
    const index = scale.index(inside);
    const rgb = Array.from(scale.palette.subarray(3 * index, 3 * index + 3));
    const image = page.locator(`section.study[data-study="${r.study}"] figure.error-map`).first().locator('image.map-image');
    const pixels = await image.evaluate(async (el) => {
      const img = new Image();
      img.src = el.getAttribute('href')!;
      await img.decode();
      const canvas = document.createElement('canvas');
      canvas.width = img.naturalWidth;
      canvas.height = img.naturalHeight;
      const g = canvas.getContext('2d')!;
      g.drawImage(img, 0, 0);
      return [Array.from(g.getImageData(20, 20, 1, 1).data), Array.from(g.getImageData(100, 100, 1, 1).data)];
    });
    expect(pixels[0]).toEqual([...rgb, 255]);
    expect(pixels[1][3]).toBe(0);
  });

  it('offers the values on hover and a caption under each map', async () => {
    const figure = page.locator('section.study[data-study="l-tile-corner"] figure.error-map').first();
    const titles = await figure.locator('.map-hover rect title').allTextContents();
    expect(titles.length).toBeGreaterThan(100);
    for (const t of titles) expect(t).toMatch(/^\d\.\de[-+]\d\d( to \d\.\de[-+]\d\d)?$/);
    expect(await figure.locator('figcaption').innerText()).toContain('on each cell K of level 5 (the finest)');
    // The hover grid lies over the image.
    const img = (await figure.locator('image.map-image').boundingBox())!;
    const grid = (await figure.locator('.map-hover').boundingBox())!;
    expect(Math.abs(grid.x - img.x)).toBeLessThan(1);
    expect(Math.abs(grid.width - img.width)).toBeLessThan(1);
  });

  it('saves a screenshot of the page', async () => {
    const path = join(REPORTS, 'index.png');
    await page.screenshot({ path, fullPage: true });
    expect(existsSync(path)).toBe(true);
  });
});
