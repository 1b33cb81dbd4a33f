import { describe, expect, it } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { errorLines } from '../../src/cli/run-command.ts';
import { OUTCOME } from '../../src/cli/outcome-words.ts';

// The command-line habits: studies chosen by name or pattern, --quiet, list showing every field, errored studies in
// the run summary, one word for each outcome, and rungs run --watch.
const ROOT = resolve(import.meta.dirname, '../..');
const BIN = join(ROOT, 'bin/rungs.mjs');
function rungs(args: string[], cwd = ROOT) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
  return { status: r.status, out: r.stdout, err: r.stderr };
}
const rodStudy = (name: string, extra = '') => [
  "import { defineStudy, interval, lagrange } from 'rungs';",
  `export default defineStudy({ name: '${name}', domain: interval(0, 1), exact: 'sin(x) + x*x', discretization: lagrange({ degree: 1 }), ladder: { n: [4, 8, 16] }, norms: ['L2']${extra} });`,
].join('\n');

describe('--study', () => {
  it('selects by pattern on the file name or the declared name; no match is bad input', () => {
    const names = rungs(['list', 'studies', '--quiet', '--study', 'kiln-rod-*,tile-python-vtk']);
    // tile-python-vtk is the name declared in tile-python.study.ts: matched by name, not by file.
    expect([names.status, names.out.trim().split('\n')]).toEqual([0, ['kiln-rod-bdf2', 'kiln-rod-dirk3', 'tile-python-vtk']]);
    const none = rungs(['list', 'studies', '--study', 'glaze-nothing-*']);
    expect(none.status).toBe(2);
    expect(none.err).toMatch(/--study glaze-nothing-\*: no study under studies/);
  });
  it('runs only the chosen studies', () => {
    const dir = mkdtempSync(join(tmpdir(), 'rungs-pick-'));
    writeFileSync(join(dir, 'rod-one.study.ts'), rodStudy('rod-one'));
    writeFileSync(join(dir, 'rod-two.study.ts'), rodStudy('rod-two'));
    const r = rungs(['run', dir, '--study', 'rod-tw?', '--quiet', '--out', join(dir, 'out')]);
    expect([r.status, /rod-two/.test(r.out), /rod-one/.test(r.out)]).toEqual([0, true, false]);
  });
});

describe('rungs list', () => {
  it('shows every field of an external study without a label, never "undefined"', () => {
    const r = rungs(['list', 'studies/tile-python-errors.study.ts']);
    expect(r.status).toBe(0);
    expect(r.out).not.toMatch(/undefined/);
    expect(r.out).toContain('external code (errors output, degree 1, timeout 60 s): python3 examples/external/tile_solver.py --n {n}');
  });
});

describe('--quiet', () => {
  it('is an option of every subcommand that prints more than its result', () => {
    const missing = ['run', 'check', 'data', 'list', 'init', 'fit'].filter((c) => !/--quiet/.test(rungs([c, '--help']).out));
    expect(missing).toEqual([]);
  });
  it('cuts rungs fit down to its verdict line', () => {
    // e = 0.3 h²: an exact second-order table (invented numbers), so the verdict is on-order.
    const dir = mkdtempSync(join(tmpdir(), 'rungs-fitq-'));
    writeFileSync(join(dir, 'rod.csv'), 'h,L2_error\n' + [0.1, 0.05, 0.025, 0.0125].map((h) => `${h},${0.3 * h * h}`).join('\n') + '\n');
    const r = rungs(['fit', join(dir, 'rod.csv'), '--expect', '2', '--quiet', '--out', join(dir, 'out')]);
    expect([r.status, r.out.trim().split('\n').map((l) => l.trim())]).toEqual([0, ['Summary: 1 study, 1 as expected, 0 not as expected', '✓ rod  L2 ✓ on-order']]);
  });
});

describe('the run summary', () => {
  it('names the studies that could not run, with the outcome word for it', () => {
    const dir = mkdtempSync(join(tmpdir(), 'rungs-errored-'));
    writeFileSync(join(dir, 'good.study.ts'), rodStudy('rod-good'));
    writeFileSync(join(dir, 'broken.study.ts'), rodStudy('rod-broken', ", ladder: { n: [4] }").replace("ladder: { n: [4, 8, 16] }, ", ''));
    const r = rungs(['run', dir, '--out', join(dir, 'out')]);
    expect(r.status).toBe(2);
    const tail = r.out.slice(r.out.indexOf('Summary:'));
    expect(tail).toMatch(/✓ rod-good/);
    expect(tail).toMatch(new RegExp(`${OUTCOME.error}: 1 study or input could not be run[^\\n]*\\n  ✗ \\S*broken\\.study\\.ts  ${OUTCOME.error}`));
  });
  it('lists each errored study once', () => {
    const lines = errorLines([
      { study: 'tile-a', file: 'a.study.ts', message: 'x' }, { study: 'tile-a', file: 'a.study.ts', message: 'y' },
      { study: '', file: 'b.study.ts', message: 'z' }, { study: '', file: '', message: 'no name' },
    ]);
    expect(lines).toEqual(['error: 2 studies or inputs could not be run (messages above):', '  ✗ tile-a  [a.study.ts]  error', '  ✗ b.study.ts  error']);
  });
});

describe('rungs run --watch', () => {
  it('runs again when the study file is rewritten, and stops on SIGTERM', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'rungs-watch-'));
    const file = join(dir, 'tile.study.ts');
    writeFileSync(file, rodStudy('watch-first'));
    const child = spawn(process.execPath, [BIN, 'run', file, '--watch', '--quiet', '--out', join(dir, 'out')], {
      cwd: dir, env: { ...process.env, NO_COLOR: '1' }, stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    const waiters: { re: RegExp; done: () => void }[] = [];
    child.stdout!.on('data', (c: Buffer) => {
      out += c.toString();
      for (const w of waiters.splice(0)) if (w.re.test(out)) w.done(); else waiters.push(w);
    });
    // Waits on the output itself; the guard (minutes) only turns a hang into a failure.
    const seen = (re: RegExp) => new Promise<boolean>((done) => {
      if (re.test(out)) { done(true); return; }
      const guard = setTimeout(() => done(false), 300_000);
      waiters.push({ re, done: () => { clearTimeout(guard); done(true); } });
    });
    const exited = new Promise<number | null>((r) => child.on('exit', (code) => r(code)));
    try {
      expect(await seen(/✓ watch-first/)).toBe(true);
      writeFileSync(file, rodStudy('watch-second'));
      expect(await seen(/✓ watch-second/)).toBe(true);
    } finally {
      child.kill('SIGTERM');
    }
    expect(await exited).toBe(143);
  });
});
