// The HTML report printed to PDF by a headless Chromium (its own print engine, the one a reader's "Save as PDF" uses),
// for reviews and journals that take attachments rather than folders. Chromium is driven through playwright-core,
// which is loaded only when a PDF is asked for; neither is needed for any other report.
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { writeFileAtomic } from '../files/atomic-write.ts';

/** Where Chromium or Chrome is usually installed (Debian/Ubuntu packages, Google's packages, macOS). */
const KNOWN_BROWSERS = [
  '/usr/bin/chromium',
  '/usr/bin/chromium-browser',
  '/usr/bin/google-chrome',
  '/usr/bin/google-chrome-stable',
  '/Applications/Google Chrome.app/Contents/MacOS/Google Chrome',
  '/Applications/Chromium.app/Contents/MacOS/Chromium',
];

/** The environment variable that names a Chromium to use, ahead of the usual places. */
export const CHROMIUM_VARIABLE = 'RUNGS_CHROMIUM';

export type PdfOutcome = { written: string } | { skipped: string } | { failed: string };

/** The first Chromium found: $RUNGS_CHROMIUM when set (and then only it), else the usual places. */
export function findChromium(env: NodeJS.ProcessEnv = process.env): { path: string } | { missing: string } {
  const named = env[CHROMIUM_VARIABLE];
  if (named) return existsSync(named) ? { path: named } : { missing: `${CHROMIUM_VARIABLE}=${named} does not exist` };
  const found = KNOWN_BROWSERS.find((p) => existsSync(p));
  return found ? { path: found } : { missing: `no Chromium or Chrome at ${KNOWN_BROWSERS.join(', ')}; install one or set ${CHROMIUM_VARIABLE}` };
}

/**
 * Prints `<outDir>/index.html` to `<outDir>/index.pdf` (A4, backgrounds kept, the page's own print styles and margins). Never
 * throws: a missing browser or a missing playwright-core is `skipped` with the reason, a browser that fails `failed`.
 */
export async function writePdfReport(outDir: string, options: { chromium?: string } = {}): Promise<PdfOutcome> {
  const html = join(outDir, 'index.html');
  const pdf = join(outDir, 'index.pdf');
  if (!existsSync(html)) return { failed: `${html} was not written, so there is nothing to print` };
  const browserPath = options.chromium ? { path: options.chromium } : findChromium();
  if ('missing' in browserPath) return { skipped: `PDF not written: ${browserPath.missing}` };
  let chromium: typeof import('playwright-core').chromium;
  try {
    ({ chromium } = await import('playwright-core'));
  } catch {
    return { skipped: 'PDF not written: the package playwright-core is not installed (npm install playwright-core)' };
  }
  let browser: import('playwright-core').Browser | undefined;
  try {
    browser = await chromium.launch({
      executablePath: browserPath.path,
      // No sandbox: CI containers run as root, where Chromium's sandbox refuses to start. The page is our own file.
      args: ['--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
    });
    const page = await browser.newPage();
    await page.goto(pathToFileURL(html).href, { waitUntil: 'load' });
    await page.emulateMedia({ media: 'print' });
    // The page's own @page rule sets the margins; A4 where it names no size.
    const bytes = await page.pdf({ format: 'A4', printBackground: true, preferCSSPageSize: true });
    writeFileAtomic(pdf, bytes);
    return { written: pdf };
  } catch (err) {
    return { failed: `cannot print ${html} to PDF with ${browserPath.path}: ${(err as Error).message.split('\n')[0]}` };
  } finally {
    await browser?.close().catch(() => undefined);
  }
}
