import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { fitTable } from '../../src/fit/fit-table.ts';
import { QUANTITY_COLUMNS, quantitiesCsv } from '../../src/report/csv.ts';
import { htmlReport } from '../../src/report/html.ts';
import { resultJson } from '../../src/report/json.ts';
import { plusMinus, quantityStatements } from '../../src/report/quantity-tables.ts';
import { latexTable, markdownTable } from '../../src/report/tables.ts';
import { writeReportFiles } from '../../src/report/write.ts';
import { parseCsv } from './csv-parse.ts';

// Invented tile data: heat flux through a ceramic tile's top edge, 1.5 + 0.8 h² exactly, on five meshes, with the
// L2 error of the temperature beside it.
const hs = [0.4, 0.2, 0.1, 0.05, 0.025];
const text = ['h,L2,tile_flux', ...hs.map((h) => `${h},${0.3 * h * h},${1.5 + 0.8 * h * h}`)].join('\n') + '\n';
const { result, quantities } = fitTable(text, { file: 'tile.csv', quantities: ['tile_flux'], expect: 'L2=2' });
result.quantities = quantities;
const dir = mkdtempSync(join(tmpdir(), 'rungs-report-quantities-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('plusMinus: U with two significant digits, the value to the same digit (GUM, JCGM 100:2008, 7.2.6)', () => {
  it.each([
    [1.04321, 0.002134, '1.0432 ± 0.0021'],
    [2.2031, 0.134, '2.20 ± 0.13'],
    [1234.5, 56.7, '1235 ± 57'],
    [3.5e-9, 2.1e-10, '3.50e-9 ± 2.1e-10'],
  ])('%d ± %d → %s', (v, u, s) => expect(plusMinus(v, u)).toBe(s));
});

describe('quantity reports in every format', () => {
  const q = quantities[0]!;
  const ls = q.leastSquares!;

  it('the CSV has one row per level with its U and the interval, and the quantity-wide columns', () => {
    const rows = parseCsv(quantitiesCsv(result));
    expect(rows[0]).toEqual([...QUANTITY_COLUMNS]);
    expect(rows).toHaveLength(1 + hs.length);
    const col = (name: string) => rows[0]!.indexOf(name);
    rows.slice(1).forEach((r, i) => {
      expect(Number(r[col('h')])).toBe(hs[i]);
      expect(Number(r[col('ls_uncertainty')])).toBe(ls.uncertainty[i]);
      expect(Number(r[col('ls_low')])).toBe(q.values[i]! - ls.uncertainty[i]!);
      expect(Number(r[col('gci')])).toBe(q.gci);
      expect(r[col('coverage')]).toBe('0.95');
    });
    // The exact value 1.5 lies in the finest interval (the data are exact; Fs|ε| ≥ |ε|).
    const last = rows[hs.length]!;
    expect(Number(last[col('ls_low')]) <= 1.5 && 1.5 <= Number(last[col('ls_high')])).toBe(true);
  });

  it('Markdown has the GCI, least-squares, per-level and mixed-order tables, the intervals and the caution', () => {
    const md = markdownTable(result);
    for (const s of ['Grid convergence index from the three finest levels', 'Least-squares uncertainty over every level', 'tile_flux: uncertainty of every level', 'Roy 2003', 'not validating a model', 'local codes and licensed practice']) {
      expect(md).toContain(s);
    }
    expect(md).toContain(`- ${quantityStatements(quantities)[0]!.replace(/\|/g, '\\|')}`);
    // Every pipe-table row of a quantity table has as many cells as its header.
    const lines = md.split('\n');
    const headerAt = lines.findIndex((l) => l.startsWith('| quantity | levels |'));
    const cells = (l: string) => l.split(/(?<!\\)\|/).length;
    expect(cells(lines[headerAt + 2]!)).toBe(cells(lines[headerAt]!));
  });

  it('LaTeX: a booktabs table per quantity table, plain ASCII, each row with as many cells as the column spec', () => {
    const tex = latexTable(result);
    expect(tex.match(/\\begin\{table\}/g)).toHaveLength(5);
    expect(/[^\x00-\x7f]/.test(tex)).toBe(false);
    // The first tabular is the level table (its group header spans columns); the others are the quantity tables.
    const blocks = tex.split('\\begin{tabular}').slice(2);
    expect(blocks).toHaveLength(4);
    for (const b of blocks) {
      const spec = b.match(/^\{([lr]+)\}/)![1]!.length;
      const body = b.slice(0, b.indexOf('\\end{tabular}')).split('\n').filter((l) => l.trim().endsWith('\\\\'));
      for (const row of body) expect(row.split(/(?<!\\)&/).length).toBe(spec);
    }
    expect(tex).toContain('$\\pm$');
  });

  it('HTML has a quantities section with the tables, the intervals and the caution', () => {
    const html = htmlReport([result]);
    expect(html).toContain('<h3>Quantities of interest</h3>');
    expect(html.match(/<table class="quantities">/g)).toHaveLength(4);
    expect(html).toContain('95% coverage intended');
    expect(html).toContain('not validating a model');
  });

  it('JSON holds the least-squares result with every level and the mixed-order fit', () => {
    const json = JSON.parse(resultJson(result));
    expect(json.quantities[0].leastSquares.uncertainty).toHaveLength(hs.length);
    expect(json.quantities[0].mixedOrder.g2).toBeCloseTo(0.8, 8);
  });

  it('writeReportFiles writes <study>-quantities.csv only for a study with quantities', () => {
    const out = writeReportFiles(dir, [result], ['csv']);
    expect(out.failed).toEqual([]);
    expect(readFileSync(join(dir, 'tile-quantities.csv'), 'utf8')).toBe(quantitiesCsv(result));
    const plain = fitTable(text, { file: 'plain.csv', errors: ['L2'] }).result;
    expect(writeReportFiles(dir, [plain], ['csv']).written.map((p) => p.slice(dir.length + 1))).toEqual(['plain.csv']);
  });
});
