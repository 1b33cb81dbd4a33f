import { spawn } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { removePreviousReports, removeStaleTempFiles, studyJson, writeFileAtomic } from '../../src/report/write.ts';
import { tileP2 } from './fixture.ts';

// Every file rungs writes goes to a temporary name and is renamed over the target (rename(2) replaces it in one
// step: POSIX.1-2017, rename()), so a process killed at any moment leaves the previous file or the new one.
const root = mkdtempSync(join(tmpdir(), 'rungs-atomic-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const WRITER = resolve('test/fixtures/kiln/write-loop.ts');

/** Runs the writer until it has written `writes` more times, then kills it with SIGKILL (no chance to clean up). */
function killWriterAfter(path: string, writes: number): Promise<number> {
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, ['--import', 'tsx', WRITER, path, '20000'], { stdio: ['ignore', 'pipe', 'pipe'] });
    let seen = 0;
    let err = '';
    child.stdout!.on('data', (c: Buffer) => {
      seen += (c.toString().match(/\n/g) ?? []).length;
      if (seen >= writes) child.kill('SIGKILL');
    });
    child.stderr!.on('data', (c: Buffer) => { err += c.toString(); });
    child.on('close', (_code, signal) => (signal === 'SIGKILL' ? done(seen) : fail(new Error(`writer ended without being killed: ${err}`))));
  });
}

describe('writeFileAtomic', () => {
  it('a writer killed in the middle of writing a large report leaves a whole file, old or new, never a truncated one', async () => {
    const path = join(root, 'kiln-rod.json');
    writeFileSync(path, JSON.stringify({ version: 0, levels: [] }));
    // Kills after different numbers of writes land at different points of a write (about 2 MB each).
    for (const writes of [1, 2, 3, 5, 8]) {
      await killWriterAfter(path, writes);
      const parsed = JSON.parse(readFileSync(path, 'utf8')) as { version: number; levels: unknown[] };
      expect([1, 2]).toContain(parsed.version);
      expect(parsed.levels).toHaveLength(20000);
    }
    // What a killed writer left under a temporary name is removed by the next run (never the report itself).
    const removed = removeStaleTempFiles(root);
    expect(readdirSync(root)).toEqual(['kiln-rod.json']);
    expect(removed.every((n) => n.startsWith('.kiln-rod.json.') && n.endsWith('.tmp'))).toBe(true);
  });

  it('replaces the file and leaves no temporary file; a failed write leaves the old file and no temporary one', () => {
    const path = join(root, 'tile.csv');
    writeFileAtomic(path, 'level,h\n1,0.5\n');
    writeFileAtomic(path, 'level,h\n1,0.5\n2,0.25\n');
    expect(readFileSync(path, 'utf8')).toBe('level,h\n1,0.5\n2,0.25\n');
    expect(() => writeFileAtomic(join(root, 'no-such-folder', 'x.csv'), 'x')).toThrow(/ENOENT/);
    expect(readdirSync(root).filter((n) => n.endsWith('.tmp'))).toEqual([]);
  });
});

describe('reports of an earlier run', () => {
  it('removePreviousReports removes the summary, the index and the named studies\' reports, and nothing else', () => {
    const dir = mkdtempSync(join(root, 'prev-'));
    for (const name of ['summary.csv', 'index.html', 'tile-p2.csv', 'tile-p2.json', 'tile-p2-quantities.csv', 'tile-p2.svg', 'rod-p1.csv', 'notes.txt']) {
      writeFileSync(join(dir, name), 'old\n');
    }
    removePreviousReports(dir, ['tile-p2']);
    expect(readdirSync(dir).sort()).toEqual(['notes.txt', 'rod-p1.csv']);
  });

  it('a study\'s JSON says whether it is complete, first', () => {
    const r = tileP2();
    expect(JSON.parse(studyJson(r, false))).toMatchObject({ complete: false, study: r.study });
    expect(Object.keys(JSON.parse(studyJson(r, true)))[0]).toBe('complete');
    expect(JSON.parse(studyJson(r, true)).complete).toBe(true);
  });
});
