import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { ChildProcess } from 'node:child_process';
import { afterAll, describe, expect, it } from 'vitest';
import { computed, gone, isRunning, killAll, kilnStudy, solverPids, startRungs, waitFor } from './kiln-run.ts';

// Stopping `rungs run` with SIGINT, then resuming it: no process left behind, the finished levels written and marked
// incomplete, exit 130 (128 + SIGINT, as shells report it: common practice, no source); a resume computes only the
// levels it has no unchanged record of. Nothing here depends on the machine's speed: every wait polls with a limit
// that only catches a hang.
const root = mkdtempSync(join(tmpdir(), 'rungs-interrupt-'));
const started: ChildProcess[] = [];
const pidFiles: string[] = [];
afterAll(() => {
  killAll(started, pidFiles.flatMap((f) => solverPids(f).flatMap((p) => [p.solver, p.child])));
  rmSync(root, { recursive: true, force: true });
});

const json = (path: string) => JSON.parse(readFileSync(path, 'utf8'));
const csvRows = (path: string) => readFileSync(path, 'utf8').trim().split('\n').slice(1);

describe('rungs run: SIGINT during a slow external level, then --resume', () => {
  const out = join(root, 'reports');
  const counter = join(root, 'counter.txt');
  const pids = join(root, 'pids.jsonl');
  pidFiles.push(pids);
  const study = kilnStudy(join(root, 'study'), [4, 8, 16, 32]);
  let interruptedLevels: { index: number; seconds: Record<string, number> }[] = [];

  it('stops the solver and its child, writes the finished levels marked incomplete, exits 130', async () => {
    const run = startRungs(['run', study, '--out', out, '--jobs', '1'], { KILN_COUNTER: counter, KILN_PIDS: pids, KILN_SLOW_LEVEL: '3' });
    started.push(run.child);
    // Level 3's solver is running (and has started its own child) once it has written its pids.
    await waitFor('the slow level to start', () => solverPids(pids).some((p) => p.level === 3) || run.child.exitCode !== null);
    const slow = solverPids(pids).find((p) => p.level === 3);
    expect(slow, run.output()).toBeDefined();
    expect(isRunning(slow!.solver) && isRunning(slow!.child)).toBe(true);
    run.child.kill('SIGINT');
    const r = await run.done;
    expect(r.code, r.err).toBe(130);
    expect(r.err).toMatch(/SIGINT stopped the run/);
    // The solver (its process group) and the child it started are gone.
    expect(await gone([slow!.solver, slow!.child])).toBe(true);
    // Reports of what finished: two levels, marked incomplete; nothing left of the lock or of temporary files.
    const result = json(join(out, 'kiln-rod-ext.json'));
    expect(result.complete).toBe(false);
    expect(result.levels.map((l: { index: number }) => l.index)).toEqual([0, 1]);
    expect(csvRows(join(out, 'kiln-rod-ext.csv'))).toHaveLength(2);
    const html = readFileSync(join(out, 'index.html'), 'utf8');
    expect(html).toContain('Incomplete run');
    expect(html).toMatch(/SIGINT stopped the run[^<]*incomplete[^<]*kiln-rod-ext \(2 levels\)/);
    expect(readFileSync(join(out, 'summary.csv'), 'utf8')).toContain('kiln-rod-ext');
    expect(existsSync(join(out, '.rungs.lock'))).toBe(false);
    expect(computed(counter)).toEqual([4, 8, 16]);
    interruptedLevels = result.levels;
  });

  it('--resume reuses the two finished levels (their rows and timings) and computes the other two', async () => {
    expect(interruptedLevels).toHaveLength(2);
    const run = startRungs(['run', study, '--out', out, '--jobs', '1', '--resume'], { KILN_COUNTER: counter, KILN_PIDS: pids });
    started.push(run.child);
    const r = await run.done;
    expect(r.code, r.err).toBe(0);
    expect(r.err).toContain('kiln-rod-ext: reusing levels 1, 2 of 4 (inputs unchanged)');
    // The solver ran only for levels 3 and 4 (n = 16, 32).
    expect(computed(counter)).toEqual([4, 8, 16, 16, 32]);
    const result = json(join(out, 'kiln-rod-ext.json'));
    expect(result.complete).toBe(true);
    expect(result.levels).toHaveLength(4);
    // Wall times are never measured twice alike: equal ones are the recorded rows themselves.
    expect(result.levels.slice(0, 2).map((l: { seconds: unknown }) => l.seconds)).toEqual(interruptedLevels.map((l) => l.seconds));
    expect(readFileSync(join(out, 'index.html'), 'utf8')).not.toContain('Incomplete run');
  });

  it('--resume after one level of the ladder changed recomputes that level only', async () => {
    const before = json(join(out, 'kiln-rod-ext.json')).levels;
    kilnStudy(join(root, 'study'), [4, 8, 16, 64]);
    const run = startRungs(['run', study, '--out', out, '--jobs', '1', '--resume'], { KILN_COUNTER: counter, KILN_PIDS: pids });
    started.push(run.child);
    const r = await run.done;
    expect(r.code, r.err).toBe(0);
    expect(computed(counter)).toEqual([4, 8, 16, 16, 32, 64]);
    const after = json(join(out, 'kiln-rod-ext.json')).levels;
    expect(after.slice(0, 3)).toEqual(before.slice(0, 3));
    expect(after[3].n).toBe(64);
    expect(after[3].seconds).not.toEqual(before[3].seconds);
    // Without --resume every level is computed again.
    const fresh = startRungs(['run', study, '--out', out, '--jobs', '1'], { KILN_COUNTER: counter, KILN_PIDS: pids });
    started.push(fresh.child);
    expect((await fresh.done).code).toBe(0);
    expect(computed(counter)).toEqual([4, 8, 16, 16, 32, 64, 4, 8, 16, 64]);
  });
});

describe('rungs run: what a solver leaves running after it exits normally', () => {
  it('is stopped: no grandchild of a successful solver outlives the run', async () => {
    const pids = join(root, 'leave-pids.jsonl');
    pidFiles.push(pids);
    const study = kilnStudy(join(root, 'leave'), [4, 8, 16]);
    const run = startRungs(['run', study, '--out', join(root, 'leave-reports'), '--jobs', '1', '--quiet'], { KILN_PIDS: pids, KILN_LEAVE_CHILD: '1' });
    started.push(run.child);
    const r = await run.done;
    expect(r.code, r.err).toBe(0);
    const left = solverPids(pids);
    expect(left.map((p) => p.level)).toEqual([1, 2, 3]);
    expect(await gone(left.map((p) => p.child))).toBe(true);
  });
});
