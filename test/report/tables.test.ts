import { describe, expect, it } from 'vitest';
import { escapeLatex, latexTable, markdownTable } from '../../src/report/tables.ts';
import { demoResults, tileP2, tileP2TwoLevels } from './fixture.ts';

const MD_SCI = /^\d\.\d\de[+-]\d\d$/;
const RATE = /^-?\d+\.\d\d$/;

function markdownRows(md: string): string[][] {
  return md
    .split('\n')
    .filter((l) => l.startsWith('|'))
    .map((l) => l.slice(1, -1).split(/(?<!\\)\|/).map((c) => c.trim()));
}

describe('markdownTable', () => {
  const result = tileP2();
  const rows = markdownRows(markdownTable(result));
  const columns = 3 + 2 * result.analyses.length;

  it('is a pipe table: header, delimiter row, one row per level, all the same width (GFM tables extension)', () => {
    expect(rows).toHaveLength(2 + result.levels.length);
    for (const r of rows) expect(r).toHaveLength(columns);
    expect(rows[0]).toEqual(['level', 'h', 'dofs', 'L2 error', 'L2 rate', 'H1semi error', 'H1semi rate']);
    expect(rows[1].every((c) => /^:?-{3,}:?$/.test(c))).toBe(true);
  });

  it('writes errors as 1.23e-04 with three significant digits and rates with two decimals, "—" first', () => {
    const body = rows.slice(2);
    body.forEach((r, i) => {
      expect(r[3]).toMatch(MD_SCI);
      expect(r[5]).toMatch(MD_SCI);
      // Three significant digits: within half a unit in the third digit of the true error.
      const e = result.levels[i].errors.L2;
      expect(Math.abs(Number(r[3]) - e) / e).toBeLessThanOrEqual(0.005);
      if (i === 0) {
        expect(r[4]).toBe('—');
        expect(r[6]).toBe('—');
      } else {
        expect(r[4]).toMatch(RATE);
        expect(Number(r[4])).toBeCloseTo(result.analyses[0].rates[i]!, 2);
      }
    });
  });

  it('ends with the fitted orders and the verdicts in words and symbols', () => {
    const md = markdownTable(demoResults()[1]);
    expect(md).toMatch(/Fitted orders: L2 fitted 1\.03 \[0\.91, 1\.14\] over levels 3–5, expected 2: ✗ below-order \(expected on-order\)/);
    expect(md).toContain('H1semi fitted 1.00');
    expect(md).toContain('✓ on-order');
  });

  it('escapes a pipe in a study name so that the table keeps its columns', () => {
    const r = tileP2();
    r.study = 'tile|p2';
    r.analyses[0].name = 'L2|x';
    for (const l of r.levels) {
      l.errors['L2|x'] = l.errors.L2;
      delete l.errors.L2;
    }
    const parsed = markdownRows(markdownTable(r));
    for (const row of parsed) expect(row).toHaveLength(7);
    expect(markdownTable(r)).toContain('**tile\\|p2**');
  });
});

describe('latexTable', () => {
  const result = tileP2();
  const tex = latexTable(result);
  const lines = tex.split('\n').map((l) => l.trim());
  const bodyStart = lines.indexOf('\\midrule');
  const bodyEnd = lines.indexOf('\\bottomrule');
  const body = lines.slice(bodyStart + 1, bodyEnd);

  it('uses the booktabs rules once each, in order (Fear, booktabs package documentation)', () => {
    for (const rule of ['\\toprule', '\\midrule', '\\bottomrule']) expect(lines.filter((l) => l === rule)).toHaveLength(1);
    expect(lines.indexOf('\\toprule')).toBeLessThan(bodyStart);
    expect(bodyStart).toBeLessThan(bodyEnd);
    // booktabs tables have no vertical rules (Fear: "never use vertical rules").
    expect(tex).toMatch(/\\begin\{tabular\}\{r{7}\}/);
    expect(tex).not.toContain('|');
  });

  it('has one row per level with 2 + 2·norms column separators and a row end', () => {
    expect(body).toHaveLength(result.levels.length);
    for (const row of body) {
      expect(row.endsWith('\\\\')).toBe(true);
      expect(row.split('&')).toHaveLength(7);
    }
  });

  it('writes errors as $m\\times10^{k}$, rates as $x.xx$, and an em dash (---) for the first rate', () => {
    const first = body[0].replace(/\\\\$/, '').split('&').map((c) => c.trim());
    expect(first[3]).toMatch(/^\$\d\.\d\d\\times10\^\{-?\d+\}\$$/);
    expect(first[4]).toBe('---');
    const second = body[1].replace(/\\\\$/, '').split('&').map((c) => c.trim());
    expect(second[4]).toMatch(/^\$-?\d+\.\d\d\$$/);
    // 8.41e-04 → $8.41\times10^{-4}$: mantissa and exponent of the true error.
    const e = result.levels[1].errors.L2;
    const [, m, k] = second[3].match(/^\$(\d\.\d\d)\\times10\^\{(-?\d+)\}\$$/)!;
    expect(Math.abs(Number(m) * 10 ** Number(k) - e) / e).toBeLessThan(0.006);
  });

  it('puts the fitted orders and verdicts in the caption, with infinite bounds in math mode', () => {
    expect(tex).toMatch(/\\caption\{.*L2 fitted 3\.01 \[2\.99, 3\.02\] over levels 3--5, expected 3: on-order/);
    expect(latexTable(tileP2TwoLevels())).toContain('[$-\\infty$, $\\infty$]');
  });

  it('escapes the LaTeX special characters in names (_ % & # and the rest)', () => {
    // The ten special characters of LaTeX text mode (Lamport 1994, LaTeX: A Document Preparation System, §2.2.1; from memory).
    expect(escapeLatex('tile_p2 50% & #1')).toBe('tile\\_p2 50\\% \\& \\#1');
    expect(escapeLatex('a$b{c}~^\\')).toBe('a\\$b\\{c\\}\\textasciitilde{}\\textasciicircum{}\\textbackslash{}');
    const r = tileP2();
    r.study = 'tile_p2#3';
    r.analyses[1].name = 'H1_semi';
    for (const l of r.levels) {
      l.errors.H1_semi = l.errors.H1semi;
      delete l.errors.H1semi;
    }
    const out = latexTable(r);
    expect(out).toContain('\\caption{tile\\_p2\\#3');
    expect(out).toContain('\\multicolumn{2}{c}{H1\\_semi}');
    expect(out).not.toMatch(/[^\\]_/);
  });
});
