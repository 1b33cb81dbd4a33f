/**
 * The HTML report of studies with time (text checks; html.browser.test.ts renders it): the ladder's sentence, the
 * steps and Δt columns, the plots, and for a two-axis design the table of the joint fit with both orders, their
 * intervals, verdicts and reasons. Values are worked out here from the fixtures' declarations.
 */
import { describe, expect, it } from 'vitest';
import { htmlReport } from '../../src/report/html.ts';
import { tileP2 } from './fixture.ts';
import { timeResults } from './time-fixture.ts';
import { byClass, parseXml, textOf } from './xml-tree.ts';

/** The section of one study. */
function section(html: string, study: string): string {
  const start = html.indexOf(`<section class="study" id="study-${study}"`);
  expect(start).toBeGreaterThan(0);
  return html.slice(start, html.indexOf('</section>', start));
}

/** Markup to text: tags dropped, the entities escapeXml writes decoded. */
const plain = (s: string) =>
  s.replace(/<[^>]+>/g, '').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&apos;/g, "'").replace(/&amp;/g, '&');

describe('htmlReport with studies with time', () => {
  const results = timeResults();
  const html = htmlReport(results, { generatedAt: '2025-03-14T10:30:00Z' });

  it('stays self-contained, with one plot per study, each a well-formed SVG', () => {
    expect(html).not.toMatch(/<script|<link|@import|url\(|src=|https?:\/\/(?!www\.w3\.org\/2000\/svg)/);
    const svgs = html.match(/<svg [\s\S]*?<\/svg>/g) ?? [];
    expect(svgs).toHaveLength(results.length);
    for (const svg of svgs) expect(() => parseXml(svg)).not.toThrow();
  });

  it('says what each ladder refines under the study facts', () => {
    const dt = section(html, 'rod-be-dt');
    expect(dt).toContain('<p class="time-design">time: T = 2, backward Euler (temporal order 1); Δt refined on a fixed mesh (n = 64), fitted against Δt: the temporal order</p>');
    expect(section(html, 'rod-bdf2-h')).toContain('mesh refined at Δt = 1/1024');
    expect(section(html, 'rod-cn-coupled')).toContain('coupled path Δt = 0.5·h^1');
    expect(section(html, 'rod-be-grid')).toContain('two-axis design of 16 (h, Δt) pairs (4 meshes × 4 step counts)');
  });

  it('has steps and Δt columns after h, with Δt = T/steps', () => {
    const dt = section(html, 'rod-be-dt');
    const table = dt.slice(dt.indexOf('<table class="levels">'), dt.indexOf('</table>', dt.indexOf('<table class="levels">')));
    expect(table).toContain('<th>level</th><th>h</th><th>steps</th><th>Δt</th><th>dofs</th>');
    // T = 2 and 8 … 128 steps: 0.25 … 0.015625, to three digits.
    const rows = table.match(/<tr><td[\s\S]*?<\/tr>/g)!;
    expect(rows.map((r) => [...r.matchAll(/<td class="num">([^<]*)<\/td>/g)].map((m) => m[1]).slice(2, 4))).toEqual([
      ['8', '2.50e-01'], ['16', '1.25e-01'], ['32', '6.25e-02'], ['64', '3.13e-02'], ['128', '1.56e-02'],
    ]);
    expect(dt).toContain('<th>fitted in Δt ± std. error</th>');
  });

  it('gives a two-axis design the joint-fit table with both orders, their verdicts and the reasons', () => {
    const grid = section(html, 'rod-cn-grid-slow');
    expect(grid).toContain('<h3>Joint fit in h and Δt</h3>');
    const table = grid.slice(grid.indexOf('<table class="fits joint-fits">'), grid.indexOf('</table>', grid.indexOf('<table class="fits joint-fits">')));
    expect(table).toContain('<th class="text">spatial order (in h)</th><th class="text">temporal order (in Δt)</th>');
    const l2 = table.slice(table.indexOf('<tr data-norm="L2">'), table.indexOf('</tr>', table.indexOf('<tr data-norm="L2">')));
    const text = plain(l2);
    expect(text).toContain('p = 2.98 [2.91, 3.05]expected 3 ± 0.1✓ on-order');
    expect(text).toContain('q = 1.01 [0.98, 1.04]expected 2 ± 0.1✗ below-order');
    expect(text).toContain('q = 1.01 [0.98, 1.04] is below the expected 2 (tolerance 0.1)');
    expect(text).toContain('✗ temporal order (Δt) below-order, expected on-order');
    expect(text).toContain('C_h = 3.90e-01, C_t = 2.05e-01; residual σ = 1.10e-02 over 16 points (12 dof)');
    // No one-axis fit table for the design: its analyses carry no fit in h or Δt alone.
    expect(grid).not.toContain('<th>fit levels</th>');
  });

  it('shows both verdicts of a two-axis norm in the overview and on its card', () => {
    const overview = plain(html.slice(html.indexOf('<table class="overview">'), html.indexOf('</table>')));
    expect(overview).toContain('3 in h, 2 in Δtp 2.98 [2.91, 3.05]; q 1.01 [0.98, 1.04]on-orderh ✓ on-order, Δt ✗ below-order✗ departure');
    expect(overview).toContain('1 in Δt');
    const grid = section(html, 'rod-cn-grid-slow');
    const card = plain(grid.slice(grid.indexOf('<div class="card departure" data-norm="L2">'), grid.indexOf('</aside>')));
    expect(card).toContain('in h: p 2.98, expected 3, ✓ on-order');
    expect(card).toContain('in Δt: q 1.01, expected 2, ✗ below-order');
  });

  it('plots the design as two panels per norm and says so in the caption', () => {
    const grid = section(html, 'rod-be-grid');
    expect(grid).toContain('<div class="plot-row plot-grid">');
    const svg = parseXml(grid.match(/<svg [\s\S]*?<\/svg>/)![0]);
    expect(byClass(svg, 'panel')).toHaveLength(4);
    expect(grid).toContain('against Δt with a line per mesh (right)');
    const dt = parseXml(section(html, 'rod-be-dt').match(/<svg [\s\S]*?<\/svg>/)![0]);
    expect(textOf(byClass(byClass(dt, 'axis-x')[0], 'axis-label')[0])).toBe('time step Δt');
  });

  it('adds the styles for time only to a report that has a study with time', () => {
    expect(html).toContain('.plot-row.plot-grid');
    expect(htmlReport([tileP2()])).not.toContain('.plot-row.plot-grid');
  });
});
