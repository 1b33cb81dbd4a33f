import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { writeReportFiles, writeReports } from '../../src/report/write.ts';
import { demoResults, tileP2 } from './fixture.ts';

const root = mkdtempSync(join(tmpdir(), 'rungs-write-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe('writeReports', () => {
  it('creates the folder and writes every report per study plus the summary and the page', () => {
    const out = join(root, 'a', 'b');
    const results = demoResults();
    const outcome = writeReportFiles(out, results);
    expect(outcome.failed).toEqual([]);
    const expected = [
      ...results.flatMap((r) => ['csv', 'json', 'md', 'tex', 'svg'].map((ext) => `${r.study}.${ext}`)),
      'summary.csv',
      'index.html',
    ].sort();
    expect(readdirSync(out).sort()).toEqual(expected);
    expect(JSON.parse(readFileSync(join(out, 'tile-p2.json'), 'utf8')).study).toBe('tile-p2');
    expect(readFileSync(join(out, 'tile-p2.svg'), 'utf8').startsWith('<?xml')).toBe(true);
  });

  it('writes only the formats asked for', () => {
    const out = join(root, 'some');
    writeReports(out, [tileP2()], ['csv', 'junit']);
    expect(readdirSync(out).sort()).toEqual(['junit.xml', 'tile-p2.csv']);
  });

  it('throws a RungsInputError naming an output path that cannot be a folder', () => {
    const file = join(root, 'plain-file');
    writeFileSync(file, 'x');
    const out = join(file, 'reports');
    let err: unknown;
    try {
      writeReports(out, [tileP2()]);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(RungsInputError);
    expect((err as RungsInputError).message).toContain(out);
    expect((err as RungsInputError).where).toBe(out);
  });

  it('writes the other files when one cannot be written, and reports the one that failed', () => {
    const out = join(root, 'partial');
    // A folder where tile-p2.csv should go makes that one write fail (EISDIR).
    mkdirSync(join(out, 'tile-p2.csv'), { recursive: true });
    const problems = writeReports(out, [tileP2()]);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toContain(join(out, 'tile-p2.csv'));
    for (const name of ['tile-p2.json', 'tile-p2.md', 'tile-p2.tex', 'tile-p2.svg', 'summary.csv', 'index.html']) {
      expect(readFileSync(join(out, name), 'utf8').length).toBeGreaterThan(0);
    }
  });

  it('gives two studies whose names map to one file stem separate files', () => {
    const out = join(root, 'stems');
    const a = tileP2();
    const b = tileP2();
    a.study = 'tile p2';
    b.study = 'tile/p2';
    writeReports(out, [a, b], ['csv']);
    expect(readdirSync(out).sort()).toEqual(['tile-p2-2.csv', 'tile-p2.csv']);
  });
});
