import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { fitCommand } from '../../src/cli/fit-command.ts';
import { RungsInputError } from '../../src/errors.ts';
import { fitTable } from '../../src/fit/fit-table.ts';
import { formatQuantityReports } from '../../src/fit/quantity-terminal.ts';

// A kiln rod's mean temperature on six meshes (invented): exactly 1 + 0.5 h², so every procedure sees the exact value 1.
const hs = [0.4, 0.3, 0.2, 0.15, 0.1, 0.075];
const table = (rows: number[]) => ['h,rod_mean_temperature', ...rows.map((i) => `${hs[i]},${1 + 0.5 * hs[i]! ** 2}`)].join('\n') + '\n';
const dir = mkdtempSync(join(tmpdir(), 'rungs-fit-quantities-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('rungs fit: the least-squares uncertainty and the mixed-order fit of quantity columns', () => {
  it('six levels: every level gets U, the exact value 1 lies in every interval, and the terminal shows every table', () => {
    const { quantities } = fitTable(table([0, 1, 2, 3, 4, 5]), { file: 'rod.csv', quantities: ['rod_mean_temperature'] });
    const q = quantities[0]!;
    const ls = q.leastSquares!;
    expect(ls.intervals).toHaveLength(6);
    ls.intervals.forEach((iv) => expect(iv.low <= 1 && 1 <= iv.high).toBe(true));
    // Exact second order: Roy's three-point fit has g1 = 0, g2 = 0.5, φ0 = 1 (algebra).
    expect(Math.abs(q.mixedOrder!.extrapolated - 1)).toBeLessThan(1e-10);
    expect(Math.abs(q.mixedOrder!.g2 - 0.5)).toBeLessThan(1e-8);
    const text = formatQuantityReports(quantities, { color: false });
    for (const s of ['Quantities: grid convergence index', 'Least-squares uncertainty over every level (Eça & Hoekstra 2014)', 'rod_mean_temperature: uncertainty of every level', 'Roy 2003', '95% coverage intended', 'not validating a model']) {
      expect(text).toContain(s);
    }
  });

  it('too few levels for a procedure asked for: one message naming the file, the column and the levels needed', () => {
    const ask = (rows: number[], procedures: string) => {
      try { fitTable(table(rows), { file: 'rod.csv', quantities: ['rod_mean_temperature'], procedures }); } catch (e) { expect(e).toBeInstanceOf(RungsInputError); return (e as Error).message; }
      throw new Error('expected a RungsInputError');
    };
    expect(ask([0, 1, 2], 'least-squares')).toBe("rod.csv, column 'rod_mean_temperature': the least-squares uncertainty (Eça & Hoekstra 2014) needs at least 4 levels; the table has 3");
    expect(ask([0, 1], 'mixed-order')).toBe("rod.csv, column 'rod_mean_temperature': the mixed-order fit (Roy 2003) needs at least 3 levels; the table has 2");
    expect(ask([0], 'gci')).toContain("rod.csv: column 'rod_mean_temperature': the grid convergence index needs at least 2 levels");
  });

  it('by default a procedure the levels cannot support is left out and said so, not an error', () => {
    const { quantities } = fitTable(table([0, 1, 2]), { file: 'rod.csv', quantities: ['rod_mean_temperature'] });
    expect(quantities[0]!.leastSquares).toBeNull();
    expect(formatQuantityReports(quantities, { color: false })).toContain('needs at least 4 levels; 3 given');
  });

  it('the command exits 2 with the message on stderr, and writes the quantity CSV for a good table', async () => {
    const short = join(dir, 'short.csv');
    writeFileSync(short, table([0, 1, 2]));
    const err: string[] = [];
    const errSpy = vi.spyOn(process.stderr, 'write').mockImplementation((t) => { err.push(String(t)); return true; });
    const outSpy = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    try {
      const status = await fitCommand(short, { out: join(dir, 'out-short'), quantity: ['rod_mean_temperature'], uncertainty: 'least-squares' });
      expect(status).toBe(2);
      expect(err.join('')).toBe(`error: ${short}, column 'rod_mean_temperature': the least-squares uncertainty (Eça & Hoekstra 2014) needs at least 4 levels; the table has 3\n`);
      const good = join(dir, 'rod.csv');
      writeFileSync(good, table([0, 1, 2, 3, 4, 5]));
      expect(await fitCommand(good, { out: join(dir, 'out'), quantity: ['rod_mean_temperature'] })).toBe(0);
    } finally {
      errSpy.mockRestore();
      outSpy.mockRestore();
    }
    const csv = readFileSync(join(dir, 'out', 'rod-quantities.csv'), 'utf8').trim().split('\n');
    expect(csv).toHaveLength(7);
    expect(csv[0]!.startsWith('quantity,level,h,value,ls_fitted,ls_error,ls_uncertainty,ls_low,ls_high')).toBe(true);
  });
});
