import { execFileSync, type ChildProcess } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startRungs } from '../cli/kiln-run.ts';
import { ensureCluster } from './cluster.ts';
import { rodStudy } from './rod-study.ts';

// Slurm's own time limit, end to end: a level whose solver never finishes, under a one-minute limit (Slurm's smallest)
// and a level timeout far beyond it, is stopped by Slurm and named so. Slurm checks limits about every 30 s and then
// waits KillWait (5 s here, scripts/slurm-local.sh) before SIGKILL, so this takes 60–95 s of waiting, whatever the
// machine's speed; it is a file of its own so that it waits beside the other Slurm tests, not after them. The only
// limit on the wait is the suite's hang limit (vitest.config.ts).
const cluster = ensureCluster();
let root = '';
const started: ChildProcess[] = [];
const jobsToCancel: string[] = [];

describe.skipIf(!cluster.ok)(`Slurm's own time limit${cluster.ok ? '' : ` (skipped: ${cluster.reason})`}`, () => {
  beforeAll(() => { root = mkdtempSync(join(tmpdir(), 'rungs-slurm-limit-')); });
  afterAll(() => {
    for (const c of started) if (c.exitCode === null && c.signalCode === null) try { c.kill('SIGKILL'); } catch { /* gone */ }
    if (jobsToCancel.length) try { execFileSync('scancel', jobsToCancel, { env: { ...process.env, ...cluster.env }, stdio: 'ignore' }); } catch { /* gone */ }
    if (root) rmSync(root, { recursive: true, force: true });
  });

  it('a level past its job\'s time limit is named as stopped by Slurm at that limit; the other levels are kept', async () => {
    const out = join(root, 'out');
    // Level 2 alone has a one-minute limit (a job of its own); its own timeout (600 s) is far beyond it.
    const study = rodStudy(join(root, 'limit'), 'rod-limit', "timeoutSeconds: 600, scheduler: { kind: 'slurm', minutes: [20, 1, 20, 20] }");
    const r = startRungs(['run', study, '--out', out], { ...cluster.env, ROD_HANG_LEVEL: '2' });
    started.push(r.child);
    const done = await r.done;
    const file = join(out, '.rungs', 'jobs', 'rod-limit.json');
    const jobs = existsSync(file) ? (JSON.parse(readFileSync(file, 'utf8')) as { jobs: { index: number; id: string; status: string }[] }).jobs : [];
    jobsToCancel.push(...jobs.filter((j) => j.status === 'submitted').map((j) => j.id));
    expect(done.code, done.err).toBe(2);
    expect(done.err).toMatch(/level 2 \(n = 8\): Slurm job \d+ was stopped by Slurm at its time limit of 1 min \(state TIMEOUT\); raise scheduler\.minutes/);
    expect(readFileSync(join(out, 'rod-limit.csv'), 'utf8').trim().split('\n').slice(1).map((row) => row.split(',')[0])).toEqual(['1', '3', '4']);
    expect(jobs.map((j) => [j.index, j.status])).toEqual([[0, 'collected'], [1, 'failed'], [2, 'collected'], [3, 'collected']]);
  });
});
