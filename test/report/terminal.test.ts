import { describe, expect, it } from 'vitest';
import { formatStudyTable } from '../../src/report/terminal.ts';
import { demoResults, tileP2, tileP2TwoLevels } from './fixture.ts';

const ANSI = /\u001b\[[0-9;]*m/;

describe('formatStudyTable', () => {
  const results = demoResults();
  const plain = formatStudyTable(results, { color: false });
  const colored = formatStudyTable(results, { color: true });

  it('uses no escape codes without colour, and only SGR codes with it', () => {
    expect(plain).not.toMatch(ANSI);
    expect(colored).toMatch(ANSI);
    // Stripping the SGR sequences (ECMA-48 §8.3.117) leaves exactly the plain text: colour never carries meaning alone.
    expect(colored.replace(/\u001b\[[0-9;]*m/g, '')).toBe(plain);
  });

  it('prints a row per level with h and errors in 3-digit scientific notation and rates with 2 decimals', () => {
    const r = tileP2();
    const lines = formatStudyTable(r, { color: false }).split('\n');
    const rows = lines.filter((l) => /^\s+\d+\s+\d\.\d\de[+-]\d\d/.test(l));
    expect(rows).toHaveLength(r.levels.length);
    rows.forEach((row, i) => {
      const cells = row.trim().split(/\s+/);
      expect(cells).toHaveLength(3 + 2 * r.analyses.length);
      expect(Number(cells[0])).toBe(i + 1);
      expect(Number(cells[2])).toBe(r.levels[i].dofs);
      expect(cells[3]).toMatch(/^\d\.\d\de[+-]\d\d$/);
      expect(Math.abs(Number(cells[3]) - r.levels[i].errors.L2) / r.levels[i].errors.L2).toBeLessThanOrEqual(0.005);
      expect(cells[4]).toBe(i === 0 ? '—' : r.analyses[0].rates[i]!.toFixed(2));
    });
  });

  it('states every verdict in words next to a symbol, with the fit and its interval', () => {
    for (const label of ['✓ on-order', '✗ below-order', '≡ exact']) expect(plain).toContain(label);
    expect(plain).toMatch(/L2 +fitted 3\.01 ± 0\.0012, 95% CI \[2\.99, 3\.02\], levels 3–5; expected 3 +✓ on-order/);
    expect(plain).toContain('✗ below-order  (expected on-order)');
    for (const reason of results[1].analyses[0].reasons) expect(plain).toContain(reason);
    expect(plain).toContain('! warning: conductivity k is not constant per cell');
  });

  it('ends with a summary across studies naming the departures', () => {
    const summary = plain.slice(plain.indexOf('Summary:'));
    expect(summary.split('\n')[0]).toBe('Summary: 4 studies, 3 as expected, 1 not as expected');
    expect(summary).toMatch(/✗ tile-p1-vertex-k +L2 ✗ below-order \(expected on-order\), H1semi ✓ on-order/);
    expect(summary).toMatch(/✓ l-tile-corner +L2 ✗ below-order, H1semi ✗ below-order/);
  });

  it('prints one study without a summary, and only the summary on request', () => {
    expect(formatStudyTable(tileP2(), { color: false })).not.toContain('Summary:');
    const only = formatStudyTable(results, { color: false, summaryOnly: true });
    expect(only.startsWith('Summary:')).toBe(true);
    expect(only).not.toContain('level');
  });

  it('writes an undefined standard error and an unbounded interval in words and symbols', () => {
    expect(formatStudyTable(tileP2TwoLevels(), { color: false })).toContain('± n/a, 95% CI [−∞, ∞]');
  });
});
