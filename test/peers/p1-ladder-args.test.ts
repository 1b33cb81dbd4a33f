// The argument parsing of the benchmark's Python peer (test/bench/peers/p1_ladder.py), which must work without
// NumPy, SciPy or pyamg: --plan prints the settings and imports none of them. Bad input exits with status 2 and a
// message naming the option (argparse's convention, the same status rungs uses). Skipped where python3 is missing.
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const script = join(import.meta.dirname, '..', 'bench', 'peers', 'p1_ladder.py');
const python = process.env.PYTHON ?? 'python3';
const hasPython = spawnSync(python, ['-c', 'import sys'], { encoding: 'utf8' }).status === 0;
// -S: no site packages, so NumPy and SciPy cannot be imported even where they are installed.
const run = (...args: string[]) => spawnSync(python, ['-S', script, ...args], { encoding: 'utf8' });

describe.skipIf(!hasPython)('p1_ladder.py arguments', () => {
  it('expands one tolerance to every level and keeps per-level ones', () => {
    const one = run('--plan', '--levels', '16,32,64', '--rtol', '1e-8');
    const each = run('--plan', '--levels', '16,32', '--rtol', '1e-6,2e-7', '--direct');
    expect([one.status, each.status, JSON.parse(one.stdout), JSON.parse(each.stdout)]).toEqual([
      0, 0,
      { levels: [16, 32, 64], rtol: [1e-8, 1e-8, 1e-8], direct: false },
      { levels: [16, 32], rtol: [1e-6, 2e-7], direct: true },
    ]);
  });

  it('rejects a tolerance list of the wrong length, a tolerance out of range and a bad level with status 2', () => {
    const bad = [['--levels', '16,32', '--rtol', '1e-8,1e-8,1e-8'], ['--rtol', '2'], ['--levels', '16,x']].map((a) => run('--plan', ...a));
    expect(bad.map((r) => [r.status, /--rtol|--levels/.test(r.stderr)])).toEqual([[2, true], [2, true], [2, true]]);
  });
});
