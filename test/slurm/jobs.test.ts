import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { ChildProcess } from 'node:child_process';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { computed, startRungs, waitFor } from '../cli/kiln-run.ts';
import { ensureCluster, jobState } from './cluster.ts';
import { rodStudy } from './rod-study.ts';

// Levels of external studies as jobs of a real Slurm (a single-node cluster started by scripts/slurm-local.sh). Nothing
// here depends on the machine's speed: every wait polls with a limit that only catches a hang, the one timeout is a
// solver that never finishes, and jobs that must stay running wait for a file the test writes.
const cluster = ensureCluster();
// Made when the tests run (not when the file is collected, which a filtered or skipped run also does).
let root = '';
const started: ChildProcess[] = [];
const jobsToCancel: string[] = [];

const LIB = pathToFileURL(resolve('src/index.ts')).href;
const TILE = resolve('examples/external/tile_solver.py');
const LONG = 600_000;

/** The bundled Python tile study (studies/tile-python.study.ts) on a shorter ladder, with a scheduler field or none. */
function tileStudy(dir: string, scheduler: string): string {
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, 'package.json'), '{ "type": "module" }\n');
  const file = join(dir, 'tile.study.ts');
  writeFileSync(file, [
    `import { defineStudy, rectangle, external } from '${LIB}';`,
    'export default defineStudy({',
    "  name: 'tile-jobs', description: 'Heat in a ceramic tile (invented), P1 in plain Python.',",
    '  domain: rectangle([0, 1], [0, 1]),',
    "  exact: 'sin(pi*x) * sinh(pi*y) / sinh(pi) + x*(1 - x)/2',",
    "  boundary: { dirichlet: ['left', 'bottom', 'right', 'top'] },",
    `  discretization: external({ command: 'python3 ${TILE} --n {n} --data {data} --out {out} --write vtk --quantities', output: 'vtk', degree: 1, timeoutSeconds: 120${scheduler} }),`,
    '  ladder: { n: [4, 8, 16] },',
    "  norms: ['L2', 'H1semi'],",
    "  quantities: ['mean_temperature', 'flux_top'],",
    '});',
    '',
  ].join('\n'));
  return file;
}

const run = async (args: string[], env: Record<string, string> = {}) => {
  const r = startRungs(args, { ...cluster.env, ...env });
  started.push(r.child);
  return r.done;
};
const csv = (file: string) => readFileSync(file, 'utf8').trim().split('\n').map((l) => l.split(','));
const record = (out: string, stem: string) => {
  const f = join(out, '.rungs', 'jobs', `${stem}.json`);
  return existsSync(f) ? (JSON.parse(readFileSync(f, 'utf8')) as { jobs: { index: number; id: string; status: string }[] }).jobs : [];
};
/** Columns that are measured wall time or memory, which no two runs share. */
const TIMED = /^(t_|peak_rss)/;
const errorColumns = (rows: string[][]) => {
  const keep = rows[0]!.map((h, i) => (TIMED.test(h) ? -1 : i)).filter((i) => i >= 0);
  return rows.map((r) => keep.map((i) => r[i]));
};

describe.skipIf(!cluster.ok)(`levels as Slurm jobs${cluster.ok ? '' : ` (skipped: ${cluster.reason})`}`, () => {
  beforeAll(() => { root = mkdtempSync(join(tmpdir(), 'rungs-slurm-')); });
  afterAll(() => {
    for (const c of started) if (c.exitCode === null && c.signalCode === null) try { c.kill('SIGKILL'); } catch { /* gone */ }
    if (jobsToCancel.length) try { execFileSync('scancel', jobsToCancel, { env: { ...process.env, ...cluster.env }, stdio: 'ignore' }); } catch { /* gone */ }
    if (root) rmSync(root, { recursive: true, force: true });
  });

  it('an external study run as jobs gives the local run\'s CSV, bit for bit, with the errors read here or measured in the job', async () => {
    const here = await run(['run', tileStudy(join(root, 'tile-local'), ''), '--out', join(root, 'tile-local-out'), '--jobs', '1']);
    expect(here.code, here.err).toBe(0);
    // The same study file, its levels sent to Slurm from the command line.
    const jobs = await run(['run', join(root, 'tile-local'), '--out', join(root, 'tile-slurm-out'), '--scheduler', 'slurm']);
    expect(jobs.code, jobs.err).toBe(0);
    expect(jobs.err).toMatch(/tile-jobs: submitted levels 1, 2, 3 to Slurm as job array \d+/);
    // The errors integrated inside the jobs, by rungs itself next to the VTK files.
    const inJob = await run(['run', tileStudy(join(root, 'tile-in-job'), ", scheduler: { kind: 'slurm', errors: 'job' }"), '--out', join(root, 'tile-job-out')]);
    expect(inJob.code, inJob.err).toBe(0);
    const local = errorColumns(csv(join(root, 'tile-local-out', 'tile-jobs.csv')));
    expect(local[0]).toContain('L2_interp_error');
    expect(local).toHaveLength(4);
    expect(errorColumns(csv(join(root, 'tile-slurm-out', 'tile-jobs.csv')))).toEqual(local);
    expect(errorColumns(csv(join(root, 'tile-job-out', 'tile-jobs.csv')))).toEqual(local);
    // The level folder holds the job's files and, for errors measured in the job, the errors.json rungs wrote there.
    const level3 = join(root, 'tile-job-out', 'tile-jobs', 'level-3');
    expect(['job.sh', 'job.out', 'job.err', 'job.exit', 'solution.vtk', 'errors.json'].filter((f) => !existsSync(join(level3, f)))).toEqual([]);
    expect(JSON.parse(readFileSync(join(level3, 'errors.json'), 'utf8')).info.format).toBe('rungs level row 1');
  }, LONG);

  describe('a level that exits 3 and a level past its timeout, then --resume', () => {
    let out = '', counter = '', study = '';
    beforeAll(() => {
      out = join(root, 'fail-out');
      counter = join(root, 'fail-counter.txt');
      study = rodStudy(join(root, 'fail'), 'rod-fail', "timeoutSeconds: 2, scheduler: { kind: 'slurm' }");
    });

    it('names the level and the job of each failure, keeps the other levels, exits 2', async () => {
      const r = await run(['run', study, '--out', out], { ROD_COUNTER: counter, ROD_FAIL_LEVEL: '2', ROD_HANG_LEVEL: '3' });
      expect(r.code, r.err).toBe(2);
      expect(r.err).toMatch(/level 2 \(n = 8\): Slurm job \d+_2: the external solver exited with code 3; job folder \S+level-2 .*no solution today/);
      expect(r.err).toMatch(/level 3 \(n = 16\): Slurm job \d+_3: the external solver ran past the level's timeout of 2 s and was stopped inside the job/);
      // Levels 1 and 4 are written and recorded.
      expect(csv(join(out, 'rod-fail.csv')).slice(1).map((row) => row[0])).toEqual(['1', '4']);
      expect(record(out, 'rod-fail').map((j) => [j.index, j.status])).toEqual([[0, 'collected'], [1, 'failed'], [2, 'failed'], [3, 'collected']]);
    }, LONG);

    it('--resume submits only the failed levels again', async () => {
      const before = computed(counter).length;
      const r = await run(['run', study, '--out', out, '--resume'], { ROD_COUNTER: counter });
      expect(r.code, r.err).toBe(0);
      expect(r.err).toContain('rod-fail: reusing levels 1, 4 of 4');
      expect(r.err).toMatch(/submitted levels 2, 3 to Slurm as job array/);
      expect(computed(counter).slice(before).sort((a, b) => a - b)).toEqual([8, 16]);
      expect(csv(join(out, 'rod-fail.csv'))).toHaveLength(5);
    }, LONG);
  });

  it('a stopped rungs leaves its jobs running; --resume re-attaches and collects them without submitting again', async () => {
    const out = join(root, 'keep-out');
    const counter = join(root, 'keep-counter.txt');
    const go = join(root, 'keep-go');
    const study = rodStudy(join(root, 'keep'), 'rod-keep', "scheduler: { kind: 'slurm' }");
    const env = { ROD_COUNTER: counter, ROD_WAIT_LEVEL: '3', ROD_GO: go };
    const r = startRungs(['run', study, '--out', out], { ...cluster.env, ...env });
    started.push(r.child);
    let id = '';
    await waitFor('level 3 to run as a job', () => {
      id = record(out, 'rod-keep').find((j) => j.index === 2)?.id ?? '';
      return (id !== '' && jobState(id, cluster.env) === 'RUNNING') || r.child.exitCode !== null;
    });
    jobsToCancel.push(id);
    r.child.kill('SIGTERM');
    const stopped = await r.done;
    expect(stopped.code, stopped.err).toBe(143);
    expect(stopped.err).toMatch(new RegExp(`rod-keep: SIGTERM: Slurm jobs? [^;]*\\b${id}\\b[^;]* keep running; rungs run --resume collects them`));
    expect(jobState(id, cluster.env)).toBe('RUNNING');
    writeFileSync(go, '');
    const again = await run(['run', study, '--out', out, '--resume'], env);
    expect(again.code, again.err).toBe(0);
    expect(again.err).toMatch(new RegExp(`rod-keep: re-attached to Slurm jobs? [^(]*\\b${id}\\b.*\\(levels? [^)]*\\b3\\b`));
    // Every level was computed once: level 3 by the job the first run submitted.
    expect(computed(counter).sort((a, b) => a - b)).toEqual([4, 8, 16, 32]);
    expect(csv(join(out, 'rod-keep.csv'))).toHaveLength(5);
  }, LONG);

  it('a run stopped with --cancel-jobs cancels its jobs', async () => {
    const out = join(root, 'cancel-out');
    const study = rodStudy(join(root, 'cancel'), 'rod-cancel', "scheduler: { kind: 'slurm' }");
    const r = startRungs(['run', study, '--out', out, '--cancel-jobs'], { ...cluster.env, ROD_WAIT_LEVEL: '2', ROD_GO: join(root, 'never') });
    started.push(r.child);
    let id = '';
    await waitFor('level 2 to run as a job', () => {
      id = record(out, 'rod-cancel').find((j) => j.index === 1)?.id ?? '';
      return (id !== '' && jobState(id, cluster.env) === 'RUNNING') || r.child.exitCode !== null;
    });
    jobsToCancel.push(id);
    r.child.kill('SIGINT');
    const done = await r.done;
    expect(done.code, done.err).toBe(130);
    expect(done.err).toMatch(new RegExp(`rod-cancel: SIGINT: cancelled Slurm jobs? [^\\n]*\\b${id}\\b`));
    await waitFor(`job ${id} to be cancelled`, () => jobState(id, cluster.env) === 'CANCELLED', 120);
    const left = record(out, 'rod-cancel').filter((j) => j.index > 0);
    expect(left.find((j) => j.index === 1)?.status).toBe('cancelled');
    // Every job of the run that had not finished is cancelled, not only the one that was running.
    expect(left.every((j) => j.status === 'cancelled' || j.status === 'collected')).toBe(true);
  }, LONG);

  describe('bad input: one message naming the level and the job, exit 2, finished levels kept', () => {
    it('no sbatch on the path', async () => {
      const study = rodStudy(join(root, 'nopath'), 'rod-nopath', "scheduler: { kind: 'slurm' }");
      const r = await run(['run', study, '--out', join(root, 'nopath-out')], { PATH: '/nonexistent' });
      expect(r.code, r.err).toBe(2);
      expect(r.err).toMatch(/rod-nopath.*discretization\.scheduler: scheduler 'slurm': sbatch is not on PATH, so levels 1, 2, 3, 4 could not be submitted/);
      expect(r.err.match(/sbatch is not on PATH/g)).toHaveLength(1);
    }, LONG);

    it('a partition that does not exist', async () => {
      const study = rodStudy(join(root, 'part'), 'rod-part', "scheduler: { kind: 'slurm' }");
      const r = await run(['run', study, '--out', join(root, 'part-out'), '--partition', 'kiln-nope']);
      expect(r.code, r.err).toBe(2);
      expect(r.err).toMatch(/sbatch refused levels 1, 2, 3, 4: .*Invalid partition name specified; scheduler\.partition: give a partition the cluster has \(sinfo lists them\), not 'kiln-nope'/);
      // rungs check takes the same flags.
      const check = await run(['check', study, '--out', join(root, 'part-check-out'), '--scheduler', 'slurm', '--partition', 'kiln-nope']);
      expect(check.code, check.err).toBe(2);
      expect(check.err).toMatch(/sbatch refused levels 1, 2, 3, 4: .*Invalid partition name specified; scheduler\.partition: give a partition the cluster has \(sinfo lists them\), not 'kiln-nope'/);
    }, LONG);

    it('resources the cluster cannot grant: refused by sbatch, or pending for ever (cancelled by rungs)', async () => {
      const dir = join(root, 'grant');
      rodStudy(dir, 'rod-tasks', "scheduler: { kind: 'slurm', tasks: [1, 64, 1, 1] }");
      rodStudy(dir, 'rod-memory', "scheduler: { kind: 'slurm', memory: [256, 256, '64G', 256] }");
      const out = join(root, 'grant-out');
      const r = await run(['run', dir, '--out', out]);
      expect(r.code, r.err).toBe(2);
      // 64 tasks on a node with fewer CPUs: Slurm takes the job and leaves it pending (Reason=PartitionConfig).
      expect(r.err).toMatch(/rod-tasks'\) level 2 \(n = 8\): Slurm job \d+ can never start: .*PartitionConfig.*rungs cancelled it/);
      // 64 GB on a node with 2: sbatch refuses it.
      expect(r.err).toMatch(/rod-memory'\): discretization\.scheduler: scheduler 'slurm': sbatch refused level 3: Memory specification can not be satisfied/);
      expect(csv(join(out, 'rod-tasks.csv')).slice(1).map((row) => row[0])).toEqual(['1', '3', '4']);
      expect(csv(join(out, 'rod-memory.csv')).slice(1).map((row) => row[0])).toEqual(['1', '2', '4']);
    }, LONG);

    it('a job that vanishes from the controller', async () => {
      const out = join(root, 'gone-out');
      const study = rodStudy(join(root, 'gone'), 'rod-gone', "scheduler: { kind: 'slurm' }");
      const env = { ROD_WAIT_LEVEL: '3', ROD_GO: join(root, 'never') };
      const r = startRungs(['run', study, '--out', out], { ...cluster.env, ...env });
      started.push(r.child);
      let id = '';
      await waitFor('level 3 to run as a job', () => {
        id = record(out, 'rod-gone').find((j) => j.index === 2)?.id ?? '';
        return (id !== '' && jobState(id, cluster.env) === 'RUNNING') || r.child.exitCode !== null;
      });
      r.child.kill('SIGTERM');
      expect((await r.done).code).toBe(143);
      // The job dies without a trace and the controller forgets it: here, cancelled and its id replaced by one that
      // never existed (as after the controller's state was lost).
      execFileSync('scancel', [id], { env: { ...process.env, ...cluster.env } });
      await waitFor(`job ${id} to end`, () => jobState(id, cluster.env) !== 'RUNNING', 120);
      const file = join(out, '.rungs', 'jobs', 'rod-gone.json');
      writeFileSync(file, readFileSync(file, 'utf8').replace(`"${id}"`, '"999999"'));
      const again = await run(['run', study, '--out', out, '--resume'], env);
      expect(again.code, again.err).toBe(2);
      expect(again.err).toMatch(/level 3 \(n = 16\): Slurm job 999999 is no longer known to Slurm and left no record of its end/);
      expect(csv(join(out, 'rod-gone.csv')).slice(1).map((row) => row[0])).toEqual(['1', '2', '4']);
    }, LONG);
  });
});
