// Reports a user can hand in: axes fitted to the data, package versions once per run, no wording of the bundled demo
// scenario in a user's own report, and no "NaN" for sizes a table did not give.
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { fitTable } from '../../src/fit/fit-table.ts';
import { htmlReport } from '../../src/report/html.ts';
import { logScale } from '../../src/report/svg-axes.ts';
import { latexTable, markdownTable } from '../../src/report/tables.ts';
import { formatStudyTable } from '../../src/report/terminal.ts';
import { writeReportFiles } from '../../src/report/write.ts';
import { demoResults, tileP2 } from './fixture.ts';

describe('log axes fitted to the data', () => {
  it.each([
    [[0.0221, 0.354]],
    [[3.23e-7, 1.32e-3]],
    [[2e-3, 3e-3]],
  ])('%j: every value inside, at least two decades, no more than needed', (values) => {
    const [lo, hi] = logScale(values, [0, 100]).domain() as [number, number];
    expect(lo).toBeLessThan(Math.min(...values));
    expect(hi).toBeGreaterThan(Math.max(...values));
    const decades = Math.floor(Math.log10(hi) + 1e-9) - Math.ceil(Math.log10(lo) - 1e-9) + 1;
    expect(decades).toBeGreaterThanOrEqual(2);
    // Widened only to the nearest decades that give a second label: never a whole decade past the data.
    const below = Math.log10(Math.min(...values) / lo), above = Math.log10(hi / Math.max(...values));
    expect(Math.max(below, above)).toBeLessThanOrEqual(1);
  });

  it.each([[[3.23e-7, 1.32e-3]], [[0.0221, 0.354]]])('%j gets a padding of at most a factor 1.6 on one side at least, not whole decades', (values) => {
    const [lo, hi] = logScale(values, [0, 100]).domain() as [number, number];
    const below = Math.min(...values) / lo, above = hi / Math.max(...values);
    expect(Math.min(below, above)).toBeLessThan(1.6);
    if (values[0] === 3.23e-7) expect([lo > 1e-7, hi < 1e-2]).toEqual([true, true]);
  });
});

describe('package versions once per run', () => {
  it('one table for the run; none repeated per study when every study shares them', () => {
    const html = htmlReport(demoResults());
    expect(html.match(/<table class="versions">/g)).toHaveLength(1);
    expect(html).toContain('<h2 id="versions">Package versions</h2>');
  });

  it('a study with another version (resumed from an older run) lists only what differs', () => {
    const results = demoResults();
    results[1]!.versions = { ...results[1]!.versions, mathjs: '0.0.1-old' };
    const html = htmlReport(results);
    expect(html.match(/<table class="versions">/g)).toHaveLength(2);
    const own = html.slice(html.indexOf('Package versions of this study'));
    expect(own.slice(0, own.indexOf('</table>'))).toContain('0.0.1-old');
    const shared = html.slice(html.indexOf('<h2 id="versions">'));
    expect(shared).not.toContain('mathjs');
  });
});

describe('a user study: no wording of the bundled demo', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rungs-user-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  it('no report file mentions tiles, kilns, rods, ceramics, glaze or invented data', () => {
    const r = tileP2();
    r.study = 'beam-q2';
    r.description = 'Quadratic elements on a cantilever';
    r.file = 'verification/beam.study.ts';
    r.inputs = { mesh: 'structured', n: [4, 8, 16] } as unknown as typeof r.inputs;
    // Quantities too: their caution is the part most likely to speak of the demo.
    const hs = [0.4, 0.2, 0.1, 0.05, 0.025];
    const q = fitTable(['h,L2,deflection', ...hs.map((h) => `${h},${0.3 * h * h},${1.5 + 0.8 * h * h}`)].join('\n') + '\n', { file: 'b.csv', quantities: ['deflection'], expect: 'L2=2' });
    r.quantities = q.quantities;
    const outcome = writeReportFiles(dir, [r], { formats: ['csv', 'json', 'md', 'tex', 'svg', 'summary', 'html', 'junit'] });
    expect(outcome.failed).toEqual([]);
    const hits = readdirSync(dir).flatMap((name) => {
      const text = readFileSync(join(dir, name), 'utf8');
      return [...text.matchAll(/\b(tiles?|kilns?|rods?|ceramics?|glazes?|invented)\b/gi)].map((m) => `${name}: ${m[0]}`);
    });
    expect(hits).toEqual([]);
  });
});

describe('sizes a table did not give', () => {
  const hs = [0.5, 0.25, 0.125, 0.0625];
  const { result } = fitTable(['h,L2', ...hs.map((h) => `${h},${0.04 * h * h}`)].join('\n') + '\n', { file: 't.csv', expect: '2' });
  it('no NaN and no empty dofs or cells column in the terminal, Markdown, LaTeX or HTML', () => {
    const texts = { terminal: formatStudyTable(result, { color: false }), md: markdownTable(result), tex: latexTable(result), html: htmlReport([result]) };
    for (const [name, text] of Object.entries(texts)) {
      expect(`${name}: ${/NaN|n\/a/.test(text)}`).toBe(`${name}: false`);
      expect(`${name}: ${/\bdofs\b|\bcells\b/.test(text.replace(/degrees of freedom/g, ''))}`).toBe(`${name}: false`);
    }
  });
  it('a table with dofs keeps that column', () => {
    const withDofs = fitTable(['h,dofs,L2', ...hs.map((h) => `${h},${Math.round(1 / (h * h))},${0.04 * h * h}`)].join('\n') + '\n', { file: 't.csv', expect: '2' }).result;
    expect(markdownTable(withDofs)).toMatch(/\| level \| h \| dofs \| L2 error \|/);
    expect(formatStudyTable(withDofs, { color: false })).toMatch(/dofs/);
    expect(htmlReport([withDofs])).toContain('<th>dofs</th>');
    expect(htmlReport([withDofs])).not.toContain('<th>cells</th>');
  });
});
