// Task modules built into the one-file worker (dist/rungs-worker.mjs, scripts/bundle-cli.ts), by the URL a job names
// them with (the URL each has as a file in dist/, taskUrl): that worker finds them here instead of importing each,
// with its own modules, from a file (worker.ts). Empty in a worker started from separate modules.
import type { TaskModule } from './protocol.ts';

const held = new Map<string, TaskModule>();

/** Holds task modules by URL (the one-file worker's entry, before any job arrives). */
export function holdTaskModules(modules: Readonly<Record<string, TaskModule>>): void {
  for (const [url, mod] of Object.entries(modules)) held.set(url, mod);
}

/** The task module held for this URL, if any. */
export function heldTaskModule(url: string): TaskModule | undefined {
  return held.get(url);
}
