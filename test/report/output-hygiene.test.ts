import { describe, expect, it } from 'vitest';
import { levelsCsv, neutraliseCsvText, quantitiesCsv, summaryCsv } from '../../src/report/csv.ts';
import { escapeMarkdownCell, markdownTable } from '../../src/report/tables.ts';
import { csvRecords } from './csv-parse.ts';
import { tileP2 } from './fixture.ts';

// OWASP, "CSV Injection": a cell starting with = + - @ (or tab, carriage return) is run as a formula by spreadsheets;
// prefixing a single quote makes it text. Numbers must stay numbers.
describe('CSV cells that a spreadsheet would run as formulas', () => {
  it('neutralises text starting with = + - @, tab or carriage return, and leaves plain numbers alone', () => {
    for (const bad of ['=HYPERLINK("http://x","kiln")', '+1+cmd|', '-2+3', '@SUM(A1:A9)', '\tkiln', '\rkiln']) {
      expect(neutraliseCsvText(bad)).toBe(`'${bad}`);
    }
    for (const fine of ['-0.5', '1e-5', '+3', '-1.25E+03', 'tile-p2', 'on-order', '']) expect(neutraliseCsvText(fine)).toBe(fine);
  });

  it('quotes the study name and the reasons in summary.csv, and keeps negative and tiny numbers numeric', () => {
    const result = tileP2();
    result.study = '=cmd|\' /C calc\'!A0';
    const a = result.analyses[0]!;
    a.reasons = ['-rates fall away', '@once'];
    a.fit = { ...a.fit!, order: -0.5, ciLow: 1e-5 };
    const { records } = csvRecords(summaryCsv([result]));
    const row = records.find((r) => r.norm === a.name)!;
    expect(row.study).toBe(`'=cmd|' /C calc'!A0`);
    expect(row.reasons).toBe(`'-rates fall away; @once`);
    expect(row.fitted).toBe('-0.5');
    expect(row.ci_low).toBe('0.00001');
    expect(Number(row.ci_low)).toBe(1e-5);
  });

  it('neutralises a norm name used as a column header and a text cell of the level table', () => {
    const result = tileP2();
    result.analyses[0]!.name = '=L2';
    for (const l of result.levels) { l.errors['=L2'] = l.errors[Object.keys(l.errors)[0]!]!; l.solver = { ...l.solver!, method: '@cg' as never }; }
    const { header, records } = csvRecords(levelsCsv(result));
    expect(header).toContain(`'=L2_error`);
    expect(records[0]!.solver_method).toBe(`'@cg`);
    expect(Number(records[0]!.h)).toBe(result.levels[0]!.h);
  });

  it('neutralises a quantity name', () => {
    const result = tileP2();
    result.quantities = [{
      name: '+flux', values: [1, 1.5, 1.6], h: [0.4, 0.2, 0.1], order: 2, extrapolated: 1.63, gci: 0.01, finest: 1.6,
      safetyFactor: 1.25, convergence: 'monotone',
    } as never];
    const { records } = csvRecords(quantitiesCsv(result));
    expect(records[0]!.quantity).toBe(`'+flux`);
    expect(records[0]!.value).toBe('1');
  });
});

describe('Markdown reports', () => {
  it('escapes raw HTML and pipes from study text', () => {
    expect(escapeMarkdownCell('<img src=x onerror=alert(1)> | 1')).toBe('&lt;img src=x onerror=alert(1)&gt; \\| 1');
    expect(escapeMarkdownCell('&lt;b&gt; Eça & Hoekstra')).toBe('&amp;lt;b&amp;gt; Eça & Hoekstra');
    const result = tileP2();
    result.study = 'tile<script>';
    result.description = 'glaze <!-- hidden --> | kiln';
    const md = markdownTable(result);
    expect(md).not.toMatch(/<script>|<!--/);
    expect(md.split('\n')[0]).toBe('**tile&lt;script&gt;**: glaze &lt;!-- hidden --&gt; \\| kiln');
  });
});
