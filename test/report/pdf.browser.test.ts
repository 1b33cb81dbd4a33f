// The report printed to PDF by headless Chromium: a real PDF with a page per study at least (each study starts a new
// page in print), written beside index.html. Skipped, with a message, when no Chromium is installed.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
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
});
