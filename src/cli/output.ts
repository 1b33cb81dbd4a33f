/** Whether to colour terminal output: only on a TTY, never when NO_COLOR is set (https://no-color.org). */
export function useColor(stream: NodeJS.WriteStream): boolean {
  return !!stream.isTTY && !('NO_COLOR' in process.env && process.env.NO_COLOR !== '');
}

/** One clear line for a user mistake. */
export function problemLine(file: string, message: string): string {
  return message.startsWith(file) || !file ? `error: ${message}` : `error: ${file}: ${message}`;
}

/** --pdf: prints the run's index.html to index.pdf. A missing browser is a note (the other reports stand); a browser
 *  that fails is an error. Returns false only on that error. pdf.ts (and playwright-core) load only here. */
export async function writePdfStep(outDir: string, quiet = false): Promise<boolean> {
  const { writePdfReport } = await import('../report/pdf.ts');
  const outcome = await writePdfReport(outDir);
  if ('failed' in outcome) { process.stderr.write(`error: ${outcome.failed}\n`); return false; }
  if ('skipped' in outcome) process.stderr.write(`note: ${outcome.skipped}\n`);
  else if (!quiet) process.stderr.write(`wrote ${outcome.written}\n`);
  return true;
}
