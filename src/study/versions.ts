import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

let cached: Record<string, string> | null = null;

/** rungs's version, Node's, and the versions of the packages the numerics depend on (for reproducible reports). */
export function packageVersions(): Record<string, string> {
  if (cached) return cached;
  const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
  const own = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { version: string; dependencies?: Record<string, string> };
  const out: Record<string, string> = { rungs: own.version, node: process.versions.node };
  const req = createRequire(join(root, 'package.json'));
  for (const dep of Object.keys(own.dependencies ?? {})) {
    try {
      const p = JSON.parse(readFileSync(req.resolve(`${dep}/package.json`), 'utf8')) as { version: string };
      out[dep] = p.version;
    } catch {
      out[dep] = own.dependencies![dep];
    }
  }
  cached = out;
  return out;
}
