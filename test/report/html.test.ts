import { describe, expect, it } from 'vitest';
import { htmlReport } from '../../src/report/html.ts';
import { demoResults } from './fixture.ts';

describe('htmlReport (text checks; the browser test renders it)', () => {
  const results = demoResults();
  const html = htmlReport(results, {
    generatedAt: '2025-03-14T09:30:00Z',
    inputProblems: [{ study: 'tile-p3', file: 'studies/tile-p3.study.ts', message: 'ladder.n <must> increase' }],
  });

  it('is self-contained: no scripts, no external resources', () => {
    expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
    expect(html).not.toMatch(/<script|<link|@import|url\(|src=|https?:\/\/(?!www\.w3\.org\/2000\/svg)/);
    expect((html.match(/<svg /g) ?? []).length).toBe(results.length);
  });

  it('has a print stylesheet and the verification-is-not-validation caution', () => {
    expect(html).toContain('@media print');
    expect(html).toMatch(/<p class="caution">.*does not validate a model.*local codes and licensed practice/);
  });

  it('lists every study and norm in the overview with text verdicts and escapes input problems', () => {
    const overview = html.slice(html.indexOf('<table class="overview">'), html.indexOf('</table>'));
    expect((overview.match(/<tr>/g) ?? []).length).toBe(1 + results.reduce((n, r) => n + r.analyses.length, 0));
    expect(overview).toContain('✗ departure');
    expect(overview).toContain('≡ exact');
    expect(html).toContain('ladder.n &lt;must&gt; increase');
  });
});
