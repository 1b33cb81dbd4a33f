// The launcher in a checkout: `--version`, and the source run (bin/rungs.mjs finds src/ beside it) lending study files
// the very modules it runs, whether 'rungs' resolves through a node_modules link to this checkout (as the bundled
// studies' self-reference does) or through nothing at all (a study in a bare folder).
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

const BIN = resolve('bin/rungs.mjs');

function rungs(args: string[], cwd = process.cwd(), env: Record<string, string> = {}) {
  return spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', CI: 'true', ...env } });
}

const WHERE_STUDY = `import { writeFileSync } from 'node:fs';
import { defineStudy, interval, lagrange } from 'rungs';

writeFileSync(process.env.RUNGS_WHERE_FILE!, import.meta.resolve('rungs'));
export default defineStudy({
  name: 'rod-where',
  description: 'Kiln rod, P1, reports which rungs it was given.',
  domain: interval(0, 1),
  exact: 'sin(3*x) + x',
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [8, 16, 32] },
  norms: ['L2'],
});
`;

describe('rungs launcher', () => {
  it('prints the version of package.json with --version and -V', () => {
    const version = (JSON.parse(readFileSync('package.json', 'utf8')) as { version: string }).version;
    for (const flag of ['--version', '-V']) {
      const r = rungs([flag]);
      expect(r.status).toBe(0);
      expect(r.stdout).toBe(`${version}\n`);
    }
  });

  it('gives a study the running source, through a node_modules link and without one', () => {
    const root = mkdtempSync(join(tmpdir(), 'rungs-source-'));
    const linked = join(root, 'linked');
    const bare = join(root, 'bare');
    mkdirSync(join(linked, 'node_modules'), { recursive: true });
    mkdirSync(bare);
    symlinkSync(resolve('.'), join(linked, 'node_modules', 'rungs'), 'dir');
    const expected = pathToFileURL(resolve('src/index.ts')).href;
    for (const dir of [linked, bare]) {
      writeFileSync(join(dir, 'rod-where.study.ts'), WHERE_STUDY);
      const where = join(dir, 'where.txt');
      const r = rungs(['run', 'rod-where.study.ts', '--out', join(dir, 'reports'), '--quiet', '--jobs', '1'], dir, { RUNGS_WHERE_FILE: where });
      expect(r.stderr).toBe('');
      expect(r.status).toBe(0);
      expect(readFileSync(where, 'utf8')).toBe(expected);
    }
  });
});
