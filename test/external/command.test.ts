import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { runLevelCommand, runLevelsInParallel } from '../../src/external/command.ts';
import { runExternalLevel } from '../../src/external/level.ts';
import { levelFolder } from '../../src/external/output.ts';
import { external } from '../../src/external/types.ts';
import { isRunning } from '../cli/kiln-run.ts';

const fixtures = join(import.meta.dirname, 'fixtures');
const node = `'${process.execPath}'`;
const root = mkdtempSync(join(tmpdir(), 'rungs-command-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const values = (out: string, extra: Partial<{ n: number; level: number; degree: number }> = {}) => ({
  study: 'tile ext', level: extra.level ?? 2, n: extra.n ?? 8, h: 0.125, degree: extra.degree, out,
});


async function failure(p: Promise<unknown>): Promise<RungsInputError> {
  try {
    await p;
  } catch (err) {
    expect(err).toBeInstanceOf(RungsInputError);
    return err as RungsInputError;
  }
  throw new Error('expected the promise to reject');
}

describe('runLevelCommand: argv and environment (placeholders are argv words, no shell; common practice, no source)', () => {
  it('substitutes placeholders inside words, keeps values with blanks in one word, and sets RUNGS_* variables', async () => {
    const out = join(root, 'with space', 'level-2');
    const run = await runLevelCommand(
      { command: `${node} ${join(fixtures, 'report-level.mjs')} --n {n} --h={h} --degree {degree} --tag study:{study}/{level} --out {out} 'a;b' '$HOME'` },
      values(out, { degree: 2 }),
    );
    expect(run.exitCode).toBe(0);
    const seen = JSON.parse(readFileSync(join(out, 'seen.json'), 'utf8'));
    // A shell would have split "tile ext", expanded $HOME and treated ';' as a command separator.
    expect(seen.args).toEqual(['--n', '8', '--h=0.125', '--degree', '2', '--tag', 'study:tile ext/2', '--out', out, 'a;b', '$HOME']);
    expect(seen.env).toMatchObject({ RUNGS_N: '8', RUNGS_LEVEL: '2', RUNGS_DEGREE: '2', RUNGS_OUT: out, RUNGS_STUDY: 'tile ext', RUNGS_H: '0.125' });
  });

  it('rejects an unknown placeholder and {degree} without a declared degree, naming the level', async () => {
    const out = join(root, 'bad-placeholder');
    await expect(runLevelCommand({ command: `${node} x.mjs --m {m}` }, values(out))).rejects.toThrow(/level 2 \(n = 8\).*unknown placeholder \{m\}/);
    await expect(runLevelCommand({ command: `${node} x.mjs --p {degree}` }, values(out))).rejects.toThrow(/\{degree\}.*declares no degree/);
    await expect(runLevelCommand({ command: `${node} x.mjs`, timeoutSeconds: 0 }, values(out))).rejects.toThrow(/timeoutSeconds must be a positive number/);
  });
});

describe('runLevelCommand: failures name the level, the command and what happened', () => {
  it('a non-zero exit gives the exit code and the last stderr lines', async () => {
    const err = await failure(runLevelCommand({ command: `${node} ${join(fixtures, 'fail-loudly.mjs')} --n {n}` }, values(join(root, 'fail'))));
    expect(err.message).toMatch(/^study 'tile ext' level 2 \(n = 8\): the external solver exited with code 3/);
    expect(err.message).toContain('fail-loudly.mjs --n 8');
    expect(err.message).toContain('fatal: the tile mesh could not be built');
    // Only the last lines are kept in the one-line message.
    expect(err.message).toContain('diagnostic line 12');
    expect(err.message).not.toContain('diagnostic line 1"');
  });

  it('a program that does not exist is reported as such', async () => {
    const err = await failure(runLevelCommand({ command: 'rungs-no-such-solver-xyz --n {n}' }, values(join(root, 'missing'))));
    expect(err.message).toMatch(/level 2.*cannot start the external solver "rungs-no-such-solver-xyz" \(ENOENT\)/);
  });

  it('a hanging solver is stopped at the timeout together with the process it started', async () => {
    // Nothing here depends on the machine's speed: the timeout (3 s) leaves a slow machine time to start node and
    // print the grandchild's pid; the solver would hang for 60 s, so finishing well before that shows it was stopped.
    const t0 = performance.now();
    const err = await failure(runLevelCommand(
      { command: `${node} ${join(fixtures, 'hang.mjs')}`, timeoutSeconds: 3 },
      values(join(root, 'hang'), { level: 4, n: 32 }),
      { killGraceSeconds: 0.5 },
    ));
    expect(performance.now() - t0).toBeLessThan(50_000);
    expect(err.message).toMatch(/^study 'tile ext' level 4 \(n = 32\): the external solver did not finish within the timeout of 3 s/);
    const pid = Number(/grandchild (\d+)/.exec(err.message)?.[1]);
    expect(pid).toBeGreaterThan(0);
    // The grandchild shared the solver's process group, so it was stopped too (polled: a busy machine may take a while).
    let running = isRunning(pid);
    for (let i = 0; i < 100 && running; i++) {
      await new Promise((r) => setTimeout(r, 100));
      running = isRunning(pid);
    }
    expect(running).toBe(false);
  });
});

describe('runExternalLevel: the level folder and the output protocol', () => {
  it('reads back the errors a solver wrote, and removes stale output before the run', async () => {
    const spec = external({ command: `${node} ${join(fixtures, 'report-level.mjs')} --n {n} --out {out}`, output: 'errors' });
    const outDir = levelFolder(join(root, 'study-a'), 2);
    const r = await runExternalLevel(spec, { study: 'a', index: 2, n: 16, h: 1 / 16, outDir, norms: ['L2', 'H1semi'], quantities: ['heat'] });
    expect(r.output.kind).toBe('errors');
    if (r.output.kind !== 'errors') return;
    // Values exactly as the fixture wrote them (1/n^2, 1/n, (n+1)^2 for n = 16).
    expect(r.output.errors).toEqual({ L2: 1 / 256, H1semi: 1 / 16 });
    expect(r.output.dofs).toBe(289);
    expect(r.output.quantities).toEqual({ heat: 1 + 1 / 16 });
    expect(outDir.endsWith('level-3')).toBe(true);

    // Second run with a solver that writes nothing: the old errors.json must not be read.
    const silent = external({ command: `${node} ${join(fixtures, 'write-nothing.mjs')}`, output: 'errors' });
    const err = await failure(runExternalLevel(silent, { study: 'a', index: 2, n: 16, h: 1 / 16, outDir }));
    expect(existsSync(join(outDir, 'errors.json'))).toBe(false);
    expect(err.message).toMatch(/^study 'a' level 3 \(n = 16\): the external solver exited normally but wrote no .*errors\.json or .*errors\.csv/);
    expect(err.message).toContain('all done (but nothing written)');
  });

  it('a missing error name is reported with the file and what it holds', async () => {
    const spec = external({ command: `${node} ${join(fixtures, 'report-level.mjs')} --n {n} --out {out}`, output: 'errors' });
    const outDir = levelFolder(join(root, 'study-b'), 0);
    const err = await failure(runExternalLevel(spec, { study: 'b', index: 0, n: 4, h: 0.25, outDir, norms: ['L2', 'energy'] }));
    expect(err.message).toMatch(/level 1 \(n = 4\): .*errors\.json line \d+: no error 'energy'; the file has 'L2', 'H1semi'/);
  });

  it('the VTK protocol with no solution file names the expected files', async () => {
    const spec = external({ command: `${node} ${join(fixtures, 'write-nothing.mjs')}`, output: 'vtk' });
    const outDir = levelFolder(join(root, 'study-c'), 1);
    const err = await failure(runExternalLevel(spec, { study: 'c', index: 1, n: 8, h: 0.125, outDir }));
    expect(err.message).toMatch(/level 2 \(n = 8\): .*wrote no .*solution\.vtk or .*solution\.vtu/);
  });
});

describe('runLevelsInParallel', () => {
  const delay = (ms: number) => new Promise((r) => setTimeout(r, ms));
  it('keeps task order, never runs more than `jobs` at once, and reports each result as it comes', async () => {
    let running = 0, peak = 0;
    const done: number[] = [];
    const tasks = [40, 5, 25, 5, 15].map((ms, i) => async () => {
      running++; peak = Math.max(peak, running);
      await delay(ms);
      running--;
      return i * 10;
    });
    const out = await runLevelsInParallel(tasks, 2, (i) => done.push(i));
    expect(out).toEqual([0, 10, 20, 30, 40]);
    expect(peak).toBe(2);
    expect(done.sort()).toEqual([0, 1, 2, 3, 4]);
  });

  it('stops starting tasks after a failure and throws the failure of the lowest-numbered task', async () => {
    const started: number[] = [];
    const tasks = [0, 1, 2, 3, 4, 5].map((i) => async () => {
      started.push(i);
      await delay(i === 1 ? 30 : 5);
      if (i === 1 || i === 2) throw new Error(`task ${i} failed`);
      return i;
    });
    await expect(runLevelsInParallel(tasks, 2)).rejects.toThrow('task 1 failed');
    expect(started).not.toContain(5);
  });
});

describe('runLevelCommand: aborting', () => {
  it('an aborted level stops its solver and rejects with the abort reason', async () => {
    const controller = new AbortController();
    const p = runLevelCommand({ command: `${node} ${join(fixtures, 'hang.mjs')}`, timeoutSeconds: 30 }, values(join(root, 'abort')), { signal: controller.signal, killGraceSeconds: 0.2 });
    setTimeout(() => controller.abort(new Error('another level failed')), 300);
    const t0 = performance.now();
    await expect(p).rejects.toThrow('another level failed');
    // Well before the 30 s timeout (and the 60 s hang): the abort stopped it, however slow the machine.
    expect(performance.now() - t0).toBeLessThan(25_000);
  });
});
