import { spawnSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { acquireOutputLock, LOCK_NAME } from '../../src/parallel/lock.ts';
import { gone, killAll, kilnStudy, solverPids, startRungs, waitFor } from './kiln-run.ts';

// One run at a time per output folder: a second run refuses at once (exit 2) naming the first run's pid and start
// time; a lock left by a process that is gone is taken over with a note. Waits poll with limits that only catch hangs.
const root = mkdtempSync(join(tmpdir(), 'rungs-lock-'));
const started: ChildProcess[] = [];
const pidFiles: string[] = [];
afterAll(() => {
  killAll(started, pidFiles.flatMap((f) => solverPids(f).flatMap((p) => [p.solver, p.child])));
  rmSync(root, { recursive: true, force: true });
});

/** The pid of a process that has ended (its pid is free, or reused by a later process: both read as stale). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
  return Number(r.stdout);
}

describe('the output folder lock (in-process)', () => {
  it('refuses a second holder while the first lives, and takes over a dead holder\'s lock with a note', () => {
    const dir = join(root, 'unit');
    mkdirSync(dir);
    const first = acquireOutputLock(dir, 'rungs run studies');
    expect(first.ok).toBe(true);
    const second = acquireOutputLock(dir, 'rungs run other');
    expect(second.ok).toBe(false);
    if (!second.ok) expect(second.message).toContain(`in use by another rungs run: pid ${process.pid} (started `);
    if (first.ok) first.lock.release();
    expect(existsSync(join(dir, LOCK_NAME))).toBe(false);

    const dead = deadPid();
    writeFileSync(join(dir, LOCK_NAME), JSON.stringify({ pid: dead, startedAt: '2020-01-01T00:00:00.000Z', host: hostname(), command: 'rungs run', processStart: null, token: 'old' }));
    const taken = acquireOutputLock(dir, 'rungs run studies');
    expect(taken.ok).toBe(true);
    if (taken.ok) {
      expect(taken.notes.join('\n')).toContain(`no longer running: pid ${dead} (started 2020-01-01T00:00:00.000Z`);
      expect(JSON.parse(readFileSync(join(dir, LOCK_NAME), 'utf8')).pid).toBe(process.pid);
      taken.lock.release();
    }
    // Nothing but the folder's own files is left (no temporary or set-aside lock files).
    expect(readdirSync(dir)).toEqual([]);
  });
});

describe('two runs into one folder', () => {
  it('the second refuses at once with exit 2, naming the first run\'s pid and start time; the first then stops on SIGTERM (143)', async () => {
    const out = join(root, 'shared');
    const pids = join(root, 'pids.jsonl');
    pidFiles.push(pids);
    const study = kilnStudy(join(root, 'study'), [4, 8, 16]);
    const first = startRungs(['run', study, '--out', out, '--jobs', '1'], { KILN_PIDS: pids, KILN_SLOW_LEVEL: '1' });
    started.push(first.child);
    await waitFor('the first run\'s solver', () => solverPids(pids).length > 0 || first.child.exitCode !== null);
    expect(solverPids(pids), first.output()).toHaveLength(1);
    const lock = JSON.parse(readFileSync(join(out, LOCK_NAME), 'utf8'));
    expect(lock.pid).toBe(first.child.pid);

    const second = startRungs(['run', study, '--out', out, '--jobs', '1'], { KILN_PIDS: pids });
    started.push(second.child);
    const r2 = await second.done;
    expect(r2.code).toBe(2);
    expect(r2.err).toContain(`is in use by another rungs run: pid ${first.child.pid} (started ${lock.startedAt}`);
    // It refused before running anything: the first run's solver is the only one started.
    expect(solverPids(pids)).toHaveLength(1);

    first.child.kill('SIGTERM');
    const r1 = await first.done;
    expect(r1.code, r1.err).toBe(143);
    const slow = solverPids(pids)[0]!;
    expect(await gone([slow.solver, slow.child])).toBe(true);
    // No level finished: the study is named as not run in the page's banner, and no report of it is left.
    expect(readFileSync(join(out, 'index.html'), 'utf8')).toMatch(/SIGTERM stopped the run[^<]*not run: kiln-rod-ext/);
    expect(existsSync(join(out, 'kiln-rod-ext.json'))).toBe(false);
    expect(existsSync(join(out, LOCK_NAME))).toBe(false);
    // No private level folder of the stopped level is left behind.
    expect(readdirSync(join(out, 'kiln-rod-ext')).filter((n) => n.startsWith('.'))).toEqual([]);
  });

  it('a stale lock (its run is gone) is taken over with a note, and the run completes', async () => {
    const out = join(root, 'stale');
    mkdirSync(out);
    const dead = deadPid();
    writeFileSync(join(out, LOCK_NAME), JSON.stringify({ pid: dead, startedAt: '2021-06-01T08:00:00.000Z', host: hostname(), command: 'rungs run', processStart: null, token: 'gone' }));
    // Reports of an earlier run that this run does not write again are removed, so they cannot pass for its own.
    writeFileSync(join(out, 'kiln-rod-ext.md'), 'old table\n');
    writeFileSync(join(out, 'summary.csv'), 'old\n');
    const study = kilnStudy(join(root, 'stale-study'), [4, 8, 16]);
    const run = startRungs(['run', study, '--out', out, '--jobs', '1', '--quiet']);
    started.push(run.child);
    const r = await run.done;
    expect(r.code, r.err).toBe(0);
    expect(r.err).toContain(`took over the lock of ${out} from a run that is no longer running: pid ${dead}`);
    expect(existsSync(join(out, LOCK_NAME))).toBe(false);
    expect(readFileSync(join(out, 'summary.csv'), 'utf8')).toContain('kiln-rod-ext');
    expect(readFileSync(join(out, 'kiln-rod-ext.md'), 'utf8')).not.toBe('old table\n');
  });
});
