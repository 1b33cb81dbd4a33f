import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { computed, gone, startRungs, waitFor } from '../cli/kiln-run.ts';
import { readProcessIdentity, sessionMembers } from '../../src/scheduler/process-identity.ts';
import { rodStudy } from '../slurm/rod-study.ts';

// The local-process implementation of the scheduler interface (src/scheduler/local.ts) through the same lane as Slurm
// (src/cli/jobs-lane.ts): same CSV as a plain local run, failures named, and a stopped rungs whose jobs ran on is
// collected by --resume from the jobs' own record (job.exit). Waits poll with limits that only catch a hang.
let root = '';
const started: ChildProcess[] = [];
beforeAll(() => { root = mkdtempSync(join(tmpdir(), 'rungs-local-jobs-')); });
afterAll(() => {
  for (const c of started) if (c.exitCode === null && c.signalCode === null) try { c.kill('SIGKILL'); } catch { /* gone */ }
  if (root) rmSync(root, { recursive: true, force: true });
});

const csv = (file: string) => readFileSync(file, 'utf8').trim().split('\n').map((l) => l.split(','));
const TIMED = /^(t_|peak_rss)/;
const errorColumns = (rows: string[][]) => {
  const keep = rows[0]!.map((h, i) => (TIMED.test(h) ? -1 : i)).filter((i) => i >= 0);
  return rows.map((r) => keep.map((i) => r[i]));
};

describe('levels as local jobs (the other implementation of the scheduler interface)', () => {
  it('gives the CSV of a plain run; {tasks} is the level\'s tasks', async () => {
    const study = rodStudy(join(root, 'same'), 'rod-same', "scheduler: { kind: 'local', tasks: [1, 1, 2, 3] }");
    const plain = await startRungs(['run', study, '--out', join(root, 'plain'), '--scheduler', 'local', '--jobs', '1']).done;
    expect(plain.code, plain.err).toBe(0);
    expect(plain.err).toMatch(/rod-same: submitted levels 1, 2 to local as job array/);
    const level4 = readFileSync(join(root, 'plain', 'rod-same', 'level-4', 'job.sh'), 'utf8');
    expect(level4).toMatch(/--tasks 3\b/);
    expect(level4).toContain('RUNGS_TASKS=3');
    // Without a scheduler (the study file without its scheduler field): a child process per level, {tasks} = 1.
    const bare = rodStudy(join(root, 'bare'), 'rod-same', '');
    const child = await startRungs(['run', bare, '--out', join(root, 'bare-out'), '--jobs', '1']).done;
    expect(child.code, child.err).toBe(0);
    expect(errorColumns(csv(join(root, 'plain', 'rod-same.csv')))).toEqual(errorColumns(csv(join(root, 'bare-out', 'rod-same.csv'))));
  }, 300_000);

  it('names the level and the job of a failure and keeps the other levels', async () => {
    const study = rodStudy(join(root, 'fail'), 'rod-local-fail', "scheduler: { kind: 'local' }");
    const r = startRungs(['run', study, '--out', join(root, 'fail-out')], { ROD_FAIL_LEVEL: '3' });
    started.push(r.child);
    const done = await r.done;
    expect(done.code, done.err).toBe(2);
    expect(done.err).toMatch(/level 3 \(n = 16\): local job local-\d+-\d+: the external solver exited with code 3; .*no solution today/);
    expect(csv(join(root, 'fail-out', 'rod-local-fail.csv')).slice(1).map((row) => row[0])).toEqual(['1', '2', '4']);
  }, 300_000);

  it('a stopped rungs leaves its local jobs running; --resume collects a finished one from its job.exit', async () => {
    const out = join(root, 'keep-out');
    const counter = join(root, 'keep-counter.txt');
    const go = join(root, 'go');
    const study = rodStudy(join(root, 'keep'), 'rod-local-keep', "scheduler: { kind: 'local' }");
    const env = { ROD_COUNTER: counter, ROD_WAIT_LEVEL: '2', ROD_GO: go };
    const r = startRungs(['run', study, '--out', out, '--jobs', '1'], env);
    started.push(r.child);
    await waitFor('level 2 to start', () => computed(counter).includes(8) || r.child.exitCode !== null);
    r.child.kill('SIGTERM');
    const stopped = await r.done;
    expect(stopped.code, stopped.err).toBe(143);
    const jobs = JSON.parse(readFileSync(join(out, '.rungs', 'jobs', 'rod-local-keep.json'), 'utf8')).jobs as { index: number; folder: string; status: string }[];
    const level2 = jobs.find((j) => j.index === 1)!;
    expect(level2.status).toBe('submitted');
    writeFileSync(go, '');
    await waitFor('the job of level 2 to end', () => existsSync(join(level2.folder, 'job.exit')));
    const again = await startRungs(['run', study, '--out', out, '--resume'], env).done;
    expect(again.code, again.err).toBe(0);
    expect(again.err).toMatch(/re-attached to local jobs? [^(]*\(levels? [^)]*\b2\b/);
    expect(computed(counter).filter((n) => n === 8)).toHaveLength(1);
    expect(csv(join(out, 'rod-local-keep.csv'))).toHaveLength(5);
  }, 300_000);

  it('--resume re-attaches to a local job still running under a stopped rungs and waits for it: each level runs once', async () => {
    const out = join(root, 'attach-out');
    const counter = join(root, 'attach-counter.txt');
    const go = join(root, 'attach-go');
    const study = rodStudy(join(root, 'attach'), 'rod-local-attach', "scheduler: { kind: 'local' }");
    const env = { ROD_COUNTER: counter, ROD_WAIT_LEVEL: '2', ROD_GO: go };
    const r = startRungs(['run', study, '--out', out], env);
    started.push(r.child);
    await waitFor('level 2 to start', () => computed(counter).includes(8) || r.child.exitCode !== null);
    r.child.kill('SIGTERM');
    const stopped = await r.done;
    expect(stopped.code, stopped.err).toBe(143);
    const jobs = JSON.parse(readFileSync(join(out, '.rungs', 'jobs', 'rod-local-attach.json'), 'utf8')).jobs as { index: number; id: string; folder: string; status: string }[];
    const level2 = jobs.find((j) => j.index === 1)!;
    expect(level2.status).toBe('submitted');
    // The job's process, recorded in its folder, runs on after its rungs has gone.
    expect(readProcessIdentity(level2.folder)).not.toBeNull();
    const again = startRungs(['run', study, '--out', out, '--resume'], env);
    started.push(again.child);
    await waitFor('the resumed run to re-attach', () => /re-attached/.test(again.output()) || again.child.exitCode !== null);
    // Still running when the resumed run takes it over: only now may it finish.
    expect(existsSync(join(level2.folder, 'job.exit'))).toBe(false);
    writeFileSync(go, '');
    const done = await again.done;
    expect(done.code, done.err).toBe(0);
    expect(done.err).toMatch(new RegExp(`re-attached to local jobs? [^(]*\\b${level2.id}\\b[^(]*\\(levels? [^)]*\\b2\\b`));
    // Every level was computed once: level 2 by the job the stopped run started.
    expect(computed(counter).sort((a, b) => a - b)).toEqual([4, 8, 16, 32]);
    expect(csv(join(out, 'rod-local-attach.csv'))).toHaveLength(5);
  }, 300_000);

  it('rungs check takes --scheduler and --cancel-jobs as rungs run does', async () => {
    const out = join(root, 'check-out');
    const counter = join(root, 'check-counter.txt');
    // No scheduler field: the levels are local jobs because of --scheduler alone.
    const study = rodStudy(join(root, 'check'), 'rod-check', '');
    const r = startRungs(['check', study, '--out', out, '--scheduler', 'local', '--cancel-jobs'],
      { ROD_COUNTER: counter, ROD_WAIT_LEVEL: '3', ROD_GO: join(root, 'never') });
    started.push(r.child);
    const file = join(out, '.rungs', 'jobs', 'rod-check.json');
    const level3 = () => existsSync(file)
      ? (JSON.parse(readFileSync(file, 'utf8')).jobs as { index: number; folder: string; status: string }[]).find((j) => j.index === 2)
      : undefined;
    await waitFor('level 3 to run as a local job', () => (computed(counter).includes(16) && level3()?.status === 'submitted') || r.child.exitCode !== null);
    const identity = readProcessIdentity(level3()!.folder);
    expect(identity).not.toBeNull();
    // The job's session holds its shell, timeout (in a process group of its own) and the solver.
    const session = sessionMembers(identity!.pid);
    expect(session.length).toBeGreaterThanOrEqual(3);
    r.child.kill('SIGINT');
    const done = await r.done;
    expect(done.code, done.err).toBe(130);
    expect(done.out).toMatch(/check stopped \(exit 130\)/);
    // --cancel-jobs: the job is cancelled (recorded so) and its process is stopped, not left running.
    expect(level3()?.status).toBe('cancelled');
    expect(await gone([identity!.pid])).toBe(true);
    // Every process of the job is stopped, the solver under timeout's own process group included (Linux proc(5)).
    expect(await gone(session)).toBe(true);
  }, 300_000);
});
