// The report printed to PDF by headless Chromium: a real PDF with a page per study at least (each study starts a new
// page in print), written beside index.html. Skipped, with a message, when no Chromium is installed.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { findChromium, writePdfReport } from '../../src/report/pdf.ts';
import { writeReportFiles } from '../../src/report/write.ts';
import { demoResults } from './fixture.ts';

const browser = findChromium();
const found = 'path' in browser;

describe('finding a browser', () => {
  it('a RUNGS_CHROMIUM that does not exist is reported, not replaced by another browser', () => {
    const r = findChromium({ RUNGS_CHROMIUM: '/nonexistent/chromium' });
    expect(r).toEqual({ missing: 'RUNGS_CHROMIUM=/nonexistent/chromium does not exist' });
  });

  it('a missing browser skips the PDF with the reason, and writes nothing', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rungs-pdf-skip-'));
    try {
      writeReportFiles(dir, demoResults(), { formats: ['html'] });
      const saved = process.env.RUNGS_CHROMIUM;
      process.env.RUNGS_CHROMIUM = '/nonexistent/chromium';
      try {
        expect(await writePdfReport(dir)).toEqual({ skipped: 'PDF not written: RUNGS_CHROMIUM=/nonexistent/chromium does not exist' });
      } finally {
        if (saved === undefined) delete process.env.RUNGS_CHROMIUM; else process.env.RUNGS_CHROMIUM = saved;
      }
    } finally { rmSync(dir, { recursive: true, force: true }); }
  });
});

describe.skipIf(!found)(`PDF of the report${found ? '' : ' (skipped: no Chromium found; install chromium or set RUNGS_CHROMIUM)'}`, () => {
  const dir = mkdtempSync(join(tmpdir(), 'rungs-pdf-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('writes index.pdf, a PDF with at least one page per study', async () => {
    const results = demoResults();
    expect(writeReportFiles(dir, results, { formats: ['html'] }).failed).toEqual([]);
    const outcome = await writePdfReport(dir);
    expect(outcome).toEqual({ written: join(dir, 'index.pdf') });
    const bytes = readFileSync(join(dir, 'index.pdf'));
    // PDF 1.x files start with "%PDF-" and end with "%%EOF" (ISO 32000-1:2008, 7.5.2 and 7.5.5).
    expect(bytes.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(bytes.subarray(-8).toString('latin1')).toContain('%%EOF');
    const pages = bytes.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? [];
    expect(pages.length).toBeGreaterThanOrEqual(results.length);
  });

  it('rungs run --pdf writes index.pdf beside index.html; a browser that is not there is a note, not a failed run', () => {
    const work = mkdtempSync(join(tmpdir(), 'rungs-pdf-cli-'));
    try {
      // A kiln rod with P1 elements (invented data), three levels: the smallest study that makes a report.
      writeFileSync(join(work, 'rod.study.ts'), [
        "import { defineStudy, interval, lagrange } from 'rungs';",
        "export default defineStudy({ name: 'rod-pdf', domain: interval(0, 1), exact: 'sin(x) + x*x', discretization: lagrange({ degree: 1 }), ladder: { n: [4, 8, 16] }, norms: ['L2'] });",
      ].join('\n'));
      const bin = resolve(import.meta.dirname, '../../bin/rungs.mjs');
      const run = (out: string, env: NodeJS.ProcessEnv) =>
        spawnSync(process.execPath, [bin, 'run', join(work, 'rod.study.ts'), '--pdf', '--quiet', '--out', join(work, out)], { cwd: work, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', ...env } });
      const printed = run('with', {});
      const pdf = join(work, 'with', 'index.pdf');
      expect([printed.status, existsSync(pdf) && readFileSync(pdf).subarray(0, 5).toString('latin1')]).toEqual([0, '%PDF-']);
      const none = run('without', { RUNGS_CHROMIUM: join(work, 'no-such-browser') });
      expect([none.status, existsSync(join(work, 'without', 'index.pdf')), existsSync(join(work, 'without', 'index.html'))]).toEqual([0, false, true]);
      expect(none.stderr).toContain('PDF not written: RUNGS_CHROMIUM=');
    } finally { rmSync(work, { recursive: true, force: true }); }
  });
});
