import { afterEach, describe, expect, it, vi } from 'vitest';
import { linkSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fitCommand } from '../../src/cli/fit-command.ts';
import { RungsInputError } from '../../src/errors.ts';
import { fitTable } from '../../src/fit/fit-table.ts';
import { reportNamesAvoiding } from '../../src/fit/output-names.ts';
import { writeReports } from '../../src/report/write.ts';
import { svgPlot } from '../../src/report/svg.ts';
import { formatStudyTable } from '../../src/report/terminal.ts';

const table = 'h,L2\n0.4,0.16\n0.2,0.04\n0.1,0.01\n0.05,0.0025\n';   // e = h^2 exactly
const temp = () => mkdtempSync(join(tmpdir(), 'rungs-fit-out-'));

function quietly<T>(run: () => Promise<T>): Promise<{ value: T; stderr: string }> {
  let stderr = '';
  const out = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
  const err = vi.spyOn(process.stderr, 'write').mockImplementation((s) => { stderr += String(s); return true; });
  return run().then((value) => ({ value, stderr })).finally(() => { out.mockRestore(); err.mockRestore(); });
}
afterEach(() => vi.restoreAllMocks());

describe('rungs fit never writes over its inputs', () => {
  it('renames the reports when --out is the folder of the table, and leaves the table as it was', async () => {
    const dir = temp();
    const input = join(dir, 'kiln-rod.csv');
    writeFileSync(input, table);
    const { value: status, stderr } = await quietly(() => fitCommand(input, { out: dir, expect: '2' }));
    expect(status).toBe(0);
    expect(readFileSync(input, 'utf8')).toBe(table);
    expect(stderr).toMatch(/note: the reports of 'kiln-rod' in .* would overwrite the input table .*kiln-rod\.csv, so they are named 'kiln-rod-fit'/);
    expect(readdirSync(dir).sort()).toEqual(['index.html', 'kiln-rod-fit.csv', 'kiln-rod-fit.json', 'kiln-rod-fit.md', 'kiln-rod-fit.svg', 'kiln-rod-fit.tex', 'kiln-rod.csv', 'summary.csv']);
  });

  it('refuses (exit 2) a table named like a run-wide report in the output folder, writing nothing', async () => {
    const dir = temp();
    const input = join(dir, 'summary.csv');
    writeFileSync(input, table);
    const { value: status, stderr } = await quietly(() => fitCommand(input, { out: dir, expect: '2' }));
    expect(status).toBe(2);
    expect(stderr).toMatch(/^error: --out .*: the fit would write summary\.csv over its input table .*summary\.csv; give another --out folder/);
    expect(readFileSync(input, 'utf8')).toBe(table);
    expect(readdirSync(dir)).toEqual(['summary.csv']);
  });

  it('sees the input through a hard link and another spelling of the folder', () => {
    const dir = temp();
    writeFileSync(join(dir, 'data.csv'), table);
    linkSync(join(dir, 'data.csv'), join(dir, 'glaze.csv'));
    expect(reportNamesAvoiding(join(dir, '.', 'sub', '..'), 'glaze', [join(dir, 'data.csv')]).study).toBe('glaze-fit');
    expect(reportNamesAvoiding(dir, 'other', [join(dir, 'data.csv')])).toEqual({ study: 'other', renamed: null });
    writeFileSync(join(dir, 'index.html'), 'x');
    expect(() => reportNamesAvoiding(dir, 'x', [join(dir, 'index.html')])).toThrow(RungsInputError);
  });
});

describe('fit report writers on large and extreme tables', () => {
  it('draw the plot and the terminal table of 100k levels (no argument spreading of the whole table)', () => {
    // e = h^2 over 100k levels. Math.max(...values) over the plot's 200k values overflowed the call stack; the plot and
    // the terminal table are the writers that took extremes of whole columns. (About 10 s: the fit and the plot of
    // 100k levels; the other writers are covered by the small tables of fit-table.test.ts.)
    const rows = ['h,L2'];
    for (let i = 0; i < 100_000; i++) { const h = 1 / (10 + i); rows.push(`${h},${h * h}`); }
    const { result } = fitTable(rows.join('\n') + '\n', { file: 'rod-ladder.csv', expect: 'L2=2' });
    expect(result.levels).toHaveLength(100_000);
    expect(svgPlot(result)).toMatch(/<\/svg>$/);
    const table = formatStudyTable(result, { color: false });
    expect(table).toContain('100000');
  }, 600_000);

  it('handle subnormal errors and sizes: reports written, no invented dof count', () => {
    const dir = temp();
    const tables = [
      'h,L2\n0.5,1e-300\n0.25,1e-310\n0.125,5e-324\n0.0625,5e-324\n',
      'h,L2\n5e-321,1e-300\n2.5e-321,1e-310\n1.2e-321,5e-324\n6e-322,5e-324\n',
    ];
    tables.forEach((text, i) => {
      const { result } = fitTable(text, { file: `tile-${i}.csv`, expect: '2' });
      expect(result.analyses).toHaveLength(1);
      expect(writeReports(dir, [result])).toEqual([]);
      expect(readFileSync(join(dir, `tile-${i}.csv`), 'utf8')).toContain('5e-324');
    });
  });
});
