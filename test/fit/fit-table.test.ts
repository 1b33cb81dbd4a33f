import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { fitTable, readTableFile } from '../../src/fit/fit-table.ts';
import { parseExpectations } from '../../src/fit/expectations.ts';
import { formatQuantityReports } from '../../src/fit/quantity-terminal.ts';
import { levelsCsv } from '../../src/report/csv.ts';
import { htmlReport } from '../../src/report/html.ts';
import { resultJson } from '../../src/report/json.ts';
import { junitXml } from '../../src/report/junit.ts';
import { svgPlot } from '../../src/report/svg.ts';
import { markdownTable } from '../../src/report/tables.ts';
import { formatStudyTable } from '../../src/report/terminal.ts';

// Errors that follow e = C h^p exactly: the log-log least-squares slope is p exactly (a line fits itself; algebra).
const hs = [0.2, 0.1, 0.05, 0.025];
const powerTable = (rows: number[] = [0, 1, 2, 3]) =>
  ['h,dofs,L2,H1semi,note', ...rows.map((i) => `${hs[i]},${Math.round(1 / hs[i]! ** 2)},${0.5 * hs[i]! ** 2},${0.8 * hs[i]!},"run ${i}, ok"`)].join('\r\n') + '\r\n';

describe('fitTable: error columns', () => {
  it('fits every numeric column by default and gives on-order verdicts with per-column expectations', () => {
    const { result } = fitTable(powerTable(), { file: 'tile.csv', expect: 'L2=2,H1semi=1' });
    expect(result.study).toBe('tile');
    expect(result.analyses.map((a) => a.name)).toEqual(['L2', 'H1semi']);
    expect(result.analyses[0]!.fit!.order).toBeCloseTo(2, 12);
    expect(result.analyses[1]!.fit!.order).toBeCloseTo(1, 12);
    expect(result.analyses.map((a) => a.verdict)).toEqual(['on-order', 'on-order']);
    expect(result.asExpected).toBe(true);
    expect(result.levels.map((l) => l.h)).toEqual(hs);
    expect(result.levels[2]!.errors).toEqual({ L2: 0.5 * 0.05 ** 2, H1semi: 0.8 * 0.05 });
    expect((result.inputs.columns as { unused: string[] }).unused).toEqual(['note']);
  });

  it('a single --expect applies to every error column; a wrong one gives below-order', () => {
    const { result } = fitTable(powerTable(), { file: 't.csv', expect: 2 });
    expect(result.analyses.map((a) => a.verdict)).toEqual(['on-order', 'below-order']);
    expect(result.asExpected).toBe(false);
  });

  it('sorts rows coarse to fine and says so', () => {
    const { result } = fitTable(powerTable([2, 0, 3, 1]), { file: 't.csv', errors: ['L2'], expect: '2' });
    expect(result.levels.map((l) => l.h)).toEqual(hs);
    expect(result.warnings).toContain('rows sorted from coarse to fine by decreasing h');
    expect(result.analyses[0]!.rates.slice(1).every((r) => Math.abs(r! - 2) < 1e-12)).toBe(true);
  });

  it('fits in dofs with the dimension: N = h^-2 in 2-D gives the same order (p = −d · slope in N)', () => {
    const { result } = fitTable(powerTable(), { file: 't.csv', by: 'dofs', dim: 2, errors: ['L2'], expect: 2 });
    // dofs are rounded to integers, so the order is 2 up to that rounding.
    expect(Math.abs(result.analyses[0]!.fit!.order - 2)).toBeLessThan(1e-3);
    expect(() => fitTable(powerTable(), { file: 't.csv', by: 'dofs', errors: ['L2'] })).toThrow('t.csv: fitting in dofs needs the spatial dimension; give --dim 1, 2 or 3');
  });

  it('reads rungs\'s own level CSV: the *_error columns, named without the suffix, and every report writer works', () => {
    const first = fitTable(powerTable(), { file: 'tile.csv', expect: 'L2=2,H1semi=1' }).result;
    const csv = levelsCsv(first);
    const again = fitTable(csv, { file: 'tile-levels.csv', expect: 'L2=2,H1semi=1' });
    expect(again.result.analyses.map((a) => a.name)).toEqual(['L2', 'H1semi']);
    expect(again.result.analyses.map((a) => a.fit!.order)).toEqual(first.analyses.map((a) => a.fit!.order));
    const r = again.result;
    expect(formatStudyTable(r, { color: false })).toContain('H1semi');
    expect(resultJson(r)).toContain('"study": "tile-levels"');
    expect(markdownTable(r)).toContain('L2');
    expect(svgPlot(r)).toContain('<svg');
    expect(htmlReport([r])).toContain('tile-levels');
    expect(junitXml([r], { suiteName: 'rungs' })).toContain('name="L2"');
  });
});

describe('fitTable: bad input names the file, the line and the column', () => {
  const bad = (text: string, opts = {}) => {
    try { fitTable(text, { file: 'in.csv', ...opts }); } catch (e) { expect(e).toBeInstanceOf(RungsInputError); return (e as Error).message; }
    throw new Error('expected a RungsInputError');
  };
  it.each([
    ['h,L2\n0.1,1e-2\n0.05,abc\n', {}, "in.csv line 3, column 'L2': 'abc' is not a finite number"],
    ['h,L2\n0.1,1e-2\n0.05,\n', { errors: ['L2'] }, "in.csv line 3, column 'L2': the value is empty"],
    ['h,L2\n0.1,1e-2\n0.05,-1e-3\n', { errors: ['L2'] }, "in.csv line 3, column 'L2': -1e-3 is negative"],
    ['h,L2\n0.1,1e-2\n-0.05,1e-3\n', {}, "in.csv line 3, column 'h': -0.05 must be positive"],
    ['h,L2\n0.1,1e-2\n0.1,1e-3\n', {}, 'in.csv: lines 2 and 3 have the same h (0.1)'],
    ['h,L2\n0.1,1e-2\n', {}, 'in.csv: the table has 1 data row; a fit needs at least 2 levels'],
    ['x,L2\n1,1e-2\n2,1e-3\n', {}, "the table needs an 'h' or a 'dofs' column; the columns are x, L2"],
    ['h,L2\n0.1,1e-2\n0.05,1e-3\n', { errors: ['H1'] }, "no error column 'H1' (nor 'H1_error'); the columns are h, L2"],
    ['h,L2\n0.1,1e-2\n0.05,1e-3\n', { expect: 'H1=1' }, "--expect names 'H1', which is not an analysed column; the analysed columns are L2"],
    ['h,dofs,L2\n0.1,100,1e-2\n0.05,50,1e-3\n', {}, "lines 2 and 3: 'h' and 'dofs' disagree on which level is finer"],
  ])('%j', (text, opts, message) => {
    expect(bad(text, opts)).toContain(message);
  });

  it('parseExpectations reads 2 and L2=2,H1semi=1 and rejects malformed text', () => {
    expect(parseExpectations(' 2 ')).toBe(2);
    expect(parseExpectations('L2=2, H1semi = 1')).toEqual({ L2: 2, H1semi: 1 });
    expect(() => parseExpectations('L2=two')).toThrow('--expect: "L2=two" — the order must be a finite number');
    expect(() => parseExpectations('=2')).toThrow('"=2" is not NAME=ORDER');
    expect(() => parseExpectations('L2=2,L2=3')).toThrow('L2 is given twice');
  });

  it('readTableFile names a missing file', () => {
    expect(() => readTableFile('/nonexistent/rungs-table.csv')).toThrow('/nonexistent/rungs-table.csv: cannot read the table (no such file)');
  });
});

describe('fitTable: quantity columns get the grid convergence index', () => {
  // Celik et al. (2008), J. Fluids Eng. 130(7) 078001, Table 1, first column: 2-D grids of 18000, 8000, 4500 cells
  // with φ = 6.063, 5.972, 5.863; printed p = 1.53, φ_ext = 6.1685, e_a = 1.5%, e_ext = 1.71%, GCI = 2.17%
  // (typed from memory, as in test/analysis/gci.test.ts). Sizes from the cell counts: h = (1/N)^(1/2).
  const table = 'dofs,phi\n4500,5.863\n18000,6.063\n8000,5.972\n';
  it('reproduces the published worked example from a table with representative sizes', () => {
    const { result, quantities } = fitTable(table, { file: 'celik.csv', quantities: ['phi'], dim: 2 });
    const q = quantities[0]!;
    expect(result.analyses).toEqual([]);
    expect(q.sizeKind).toBe('representative');
    expect(q.finest).toBe(6.063);
    expect(Math.abs(q.order! - 1.53)).toBeLessThanOrEqual(0.005);
    expect(Math.abs(q.extrapolated! - 6.1685)).toBeLessThanOrEqual(0.00005);
    expect(Math.abs(100 * q.approxRelError - 1.5)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(100 * q.extrapolatedRelError! - 1.71)).toBeLessThanOrEqual(0.005);
    expect(Math.abs(100 * q.gci! - 2.17)).toBeLessThanOrEqual(0.005);
    expect(q.safetyFactor).toBe(1.25);
    expect(q.convergence).toBe('monotone');
    expect(q.oscillatory || q.smallRatio).toBe(false);
    expect(result.inputs.quantities).toEqual({ phi: [5.863, 5.972, 6.063] });
    const text = formatQuantityReports(quantities, { color: false });
    expect(text).toContain('phi');
    expect(text).toContain('2.17%');
    expect(text).not.toContain('\u001b[');
    expect(formatQuantityReports(quantities, { color: true })).toContain('\u001b[1m');
  });

  it('with two grids uses the expected order and Fs = 3 (Roache 1998): GCI = 3 e_a / (r^p − 1)', () => {
    const { quantities } = fitTable('h,heat\n0.2,1.10\n0.1,1.02\n', { file: 't.csv', quantities: ['heat'], expect: 'heat=2' });
    const q = quantities[0]!;
    const ea = Math.abs((1.02 - 1.1) / 1.02);
    expect(q.orderKind).toBe('assumed');
    expect(q.safetyFactor).toBe(3);
    expect(q.gci).toBeCloseTo(3 * ea / (2 ** 2 - 1), 14);
    // Richardson (1911): φ_ext = (r^p φ1 − φ2)/(r^p − 1) = (4·1.02 − 1.10)/3.
    expect(q.extrapolated).toBeCloseTo((4 * 1.02 - 1.1) / 3, 14);
    const none = fitTable('h,heat\n0.2,1.10\n0.1,1.02\n', { file: 't.csv', quantities: ['heat'] }).quantities[0]!;
    expect(none.gci).toBeNull();
    expect(none.warnings[0]).toMatch(/two levels: no observed order/);
  });

  it('flags oscillatory convergence and refinement ratios below 1.3 (Celik et al. 2008)', () => {
    const osc = fitTable('h,q\n0.4,1.0\n0.2,1.1\n0.1,1.05\n', { file: 't.csv', quantities: ['q'] });
    expect(osc.quantities[0]!.oscillatory).toBe(true);
    expect(osc.result.warnings.some((w) => w.startsWith('q: oscillatory convergence'))).toBe(true);
    const close = fitTable('h,q\n1.0,1.3\n0.9,1.2\n0.8,1.15\n', { file: 't.csv', quantities: ['q'] });
    expect(close.quantities[0]!.smallRatio).toBe(true);
    expect(close.quantities[0]!.warnings.some((w) => w.includes('refinement ratio below 1.3'))).toBe(true);
  });
});
