// esbuild, which compiles study files (TypeScript) in the compiled package (load.ts, compiledStudyModule), runs as a
// child process that its first request starts: about 40–60 ms before the first study's text comes back (measured
// with the one-file command, AMD EPYC 2 cores). Started as soon as a command that loads study files begins, that
// start overlaps the loading of the command's own code. Loaded with require, not import(): a dynamic import would
// wait for this thread's event loop, which turns only once the command's code is loaded.
import { createRequire } from 'node:module';

/** Whether this is the compiled package (dist/): from the source, tsx compiles study files as it loads them. */
export const COMPILED = !import.meta.url.endsWith('.ts');

let warm: Promise<unknown> | null = null;

/** Starts esbuild's process with an empty request (compiled package only; once; failures are left to the real
 *  request, which reports them). */
export function warmStudyCompiler(): void {
  if (!COMPILED || warm) return;
  try {
    const esbuild = createRequire(import.meta.url)('esbuild') as typeof import('esbuild');
    warm = esbuild.transform('', { loader: 'ts' }).catch(() => undefined);
  } catch {
    warm = Promise.resolve();
  }
}
