/**
 * A no-change guard: reports of studies without time must stay byte for byte what they were before studies with time
 * were added. The files in golden/steady/ were rendered from the demo fixtures (fixture.ts) by the report code as it
 * stood before that change, with the same calls as below. They vouch for nothing but sameness; the numbers in them
 * are checked by the other report tests against their own sources.
 */
import { mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { resultsJson } from '../../src/report/json.ts';
import { formatStudyTable } from '../../src/report/terminal.ts';
import { writeReportFiles } from '../../src/report/write.ts';
import { demoResults, tileP2TwoLevels } from './fixture.ts';

const GOLDEN = join(import.meta.dirname, 'golden', 'steady');

describe('reports of studies without time', () => {
  const out = mkdtempSync(join(tmpdir(), 'rungs-steady-'));
  afterAll(() => rmSync(out, { recursive: true, force: true }));
  const results = [...demoResults(), tileP2TwoLevels()];
  const outcome = writeReportFiles(out, results, {
    formats: ['csv', 'json', 'md', 'tex', 'svg', 'summary', 'html', 'junit'],
    meta: { generatedAt: '2025-03-14T09:30:00Z', title: 'Tile report' },
  });
  writeFileSync(join(out, 'terminal.txt'), formatStudyTable(results, { color: false }));
  writeFileSync(join(out, 'terminal-color.txt'), formatStudyTable(results, { color: true }));
  writeFileSync(join(out, 'all.json'), resultsJson(results));

  it('writes the same set of files', () => {
    expect(outcome.failed).toEqual([]);
    expect(readdirSync(out).sort()).toEqual(readdirSync(GOLDEN).sort());
  });

  it('writes every file byte for byte as before', () => {
    const differing = readdirSync(GOLDEN).filter((name) => !readFileSync(join(out, name)).equals(readFileSync(join(GOLDEN, name))));
    expect(differing).toEqual([]);
  });
});
