import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { groupByResources, levelResources, memoryMegabytes } from '../../src/scheduler/resources.ts';
import { levelScript, readScriptExit, shellQuote } from '../../src/scheduler/script.ts';
import { sbatchArgs } from '../../src/scheduler/slurm.ts';
import { BACKOFF, nextPause } from '../../src/scheduler/wait.ts';
import { readJobRecord, writeJobRecord, type JobEntry } from '../../src/scheduler/record.ts';
import { schedulerSettingsSchema } from '../../src/scheduler/schema.ts';

let root = '';
beforeAll(() => { root = mkdtempSync(join(tmpdir(), 'rungs-jobs-parts-')); });
afterAll(() => { if (root) rmSync(root, { recursive: true, force: true }); });

describe('resources per level', () => {
  const ladder = { n: [4, 8, 16, 32], dim: 2 };
  it('takes one value for all levels, a list per level, or the finest value scaled with dofs or n', () => {
    const tasks = (rule: unknown) => ladder.n.map((_, i) => levelResources({ kind: 'slurm', tasks: rule as number }, i, ladder, 600, 'scheduler').tasks);
    expect(tasks(4)).toEqual([4, 4, 4, 4]);
    expect(tasks([1, 1, 2, 8])).toEqual([1, 1, 2, 8]);
    // (n / 32)^2 · 64 = 1, 4, 16, 64; with n alone 8, 16, 32, 64.
    expect(tasks({ finest: 64, scale: 'dofs' })).toEqual([1, 4, 16, 64]);
    expect(tasks({ finest: 64, scale: 'n' })).toEqual([8, 16, 32, 64]);
    expect(tasks({ finest: 64, scale: 'dofs', min: 2 })).toEqual([2, 4, 16, 64]);
  });

  it('reads memory in Slurm units (powers of 1024) and follows the timeout for the time limit', () => {
    expect([memoryMegabytes('512M', 'm'), memoryMegabytes('4G', 'm'), memoryMegabytes('1.5G', 'm'), memoryMegabytes(300, 'm'), memoryMegabytes('1T', 'm')])
      .toEqual([512, 4096, 1536, 300, 1048576]);
    // 600 s is 10 whole minutes, plus one for starting and measuring; 61 s is 2, plus one.
    expect(levelResources({ kind: 'slurm' }, 0, ladder, 600, 's').minutes).toBe(11);
    expect(levelResources({ kind: 'slurm' }, 0, ladder, 61, 's').minutes).toBe(3);
    expect(levelResources({ kind: 'slurm', minutes: [1, 2, 3, 4] }, 2, ladder, 61, 's').minutes).toBe(3);
  });

  it('refuses a list whose length is not the ladder\'s, naming the field', () => {
    expect(() => levelResources({ kind: 'slurm', tasks: [1, 2] }, 0, ladder, 600, 'study.scheduler')).toThrow(RungsInputError);
    expect(() => levelResources({ kind: 'slurm', tasks: [1, 2] }, 0, ladder, 600, 'study.scheduler')).toThrow(/study\.scheduler\.tasks: 2 values for a ladder of 4 levels/);
  });

  it('groups levels whose resources agree (one job array each), in level order', () => {
    const r = (tasks: number) => ({ tasks, minutes: 5, extra: [] as string[] });
    const groups = groupByResources([{ i: 0, resources: r(1) }, { i: 1, resources: r(1) }, { i: 2, resources: r(4) }, { i: 3, resources: r(1) }]);
    expect(groups.map((g) => g.map((j) => j.i))).toEqual([[0, 1, 3], [2]]);
  });

  it('the schema refuses what sbatch would not take', () => {
    expect(schedulerSettingsSchema.safeParse({ kind: 'pbs' }).success).toBe(false);
    expect(schedulerSettingsSchema.safeParse({ kind: 'slurm', memory: 'lots' }).success).toBe(false);
    expect(schedulerSettingsSchema.safeParse({ kind: 'slurm', tasks: 1.5 }).success).toBe(false);
    expect(schedulerSettingsSchema.safeParse({ kind: 'slurm', tasks: { finest: 64, scale: 'dofs' }, memory: ['1G', 2048], sbatch: ['--qos=short'] }).success).toBe(true);
  });
});

describe('sbatch options', () => {
  it('one job array for a group of levels, task id = level number, output into each level\'s folder', () => {
    const job = (level: number) => ({ level, folder: `/o/s/.level-${level}.job-ab`, script: `/o/s/.level-${level}.job-ab/job.sh`, name: 'rungs-s', resources: { tasks: 2, memoryMB: 1024, minutes: 3, partition: 'debug', extra: ['--qos=short'] } });
    const args = sbatchArgs({ dir: '/o/s', token: 'ab', jobs: [job(1), job(2), job(4)] });
    expect(args).toEqual([
      '--parsable', '--job-name=rungs-s', '--ntasks=2', '--mem=1024M', '--time=3', '--partition=debug', '--no-requeue',
      '--output=/o/s/.level-%a.job-ab/job.out', '--error=/o/s/.level-%a.job-ab/job.err', '--array=1,2,4', '--qos=short',
    ]);
    const single = sbatchArgs({ dir: '/o/s', token: 'ab', jobs: [job(3)] });
    expect(single).toContain('--output=/o/s/.level-3.job-ab/job.out');
    expect(single.some((a) => a.startsWith('--array'))).toBe(false);
  });
});

describe('the level script', () => {
  it('quotes every word for sh (checked by sh itself) and records how the solver ended', () => {
    const folder = join(root, "it's a folder");
    execFileSync('mkdir', ['-p', folder]);
    const words = ['a b', "it's", '$HOME', '`x`', '"q"', 'back\\slash', ''];
    const script = join(folder, 'job.sh');
    writeFileSync(script, levelScript({
      title: 'test', folder, cwd: root, env: { RUNGS_X: "two words and a ' quote" }, timeoutSeconds: 30,
      argv: [process.execPath, '-e', 'process.stdout.write(JSON.stringify([process.argv.slice(1), process.env.RUNGS_X])); process.exit(5)', ...words],
    }));
    let out = '';
    try { execFileSync('sh', [script], { stdio: ['ignore', 'pipe', 'pipe'] }); } catch (err) { out = (err as { stdout: Buffer }).stdout.toString(); }
    expect(JSON.parse(out)).toEqual([words, "two words and a ' quote"]);
    const exit = readScriptExit(folder)!;
    expect([exit.exit, exit.stage, exit.end >= exit.start]).toEqual([5, 'solver', true]);
    expect(shellQuote('plain/path-1.2')).toBe('plain/path-1.2');
  });

  it('stops a solver that runs past the level\'s timeout inside the job (timeout: exit 124)', () => {
    const folder = join(root, 'slow');
    execFileSync('mkdir', ['-p', folder]);
    const script = join(folder, 'job.sh');
    writeFileSync(script, levelScript({ title: 't', folder, cwd: root, env: {}, timeoutSeconds: 1, argv: [process.execPath, '-e', 'setInterval(() => {}, 1e6)'] }));
    try { execFileSync('sh', [script], { stdio: 'ignore' }); } catch { /* exits 124 */ }
    expect(readScriptExit(folder)!.exit).toBe(124);
  });
});

describe('back-off', () => {
  it('grows by the factor up to the ceiling and starts again when a job changed', () => {
    const pauses: number[] = [];
    let p: number | null = null;
    for (let k = 0; k < 14; k++) { p = nextPause(p, false); pauses.push(p); }
    expect(pauses[0]).toBe(BACKOFF.first);
    expect(pauses[1]).toBeCloseTo(BACKOFF.first * BACKOFF.factor, 12);
    expect(pauses.at(-1)).toBe(BACKOFF.max);
    expect(pauses.every((x, i) => i === 0 || x >= pauses[i - 1]!)).toBe(true);
    expect(nextPause(BACKOFF.max, true)).toBe(BACKOFF.first);
  });
});

describe('the job record', () => {
  it('reads back what was written; a foreign or broken file reads as no jobs', () => {
    const out = join(root, 'out');
    const e: JobEntry = { index: 2, n: 16, key: 'sha256:x', id: '12_3', scheduler: 'Slurm', folder: '/f', submitted: 't', status: 'submitted' };
    writeJobRecord(out, 'rod', 'rod', [e]);
    expect(readJobRecord(out, 'rod', 'rod').get(2)).toEqual(e);
    expect(readJobRecord(out, 'rod', 'another').size).toBe(0);
    writeFileSync(join(out, '.rungs', 'jobs', 'rod.json'), '{ "format": "rungs jobs 1", "study": "rod", "jobs": [');
    expect(readJobRecord(out, 'rod', 'rod').size).toBe(0);
    expect(readFileSync(join(out, '.rungs', 'jobs', 'rod.json'), 'utf8')).toContain('"jobs": [');
  });
});
