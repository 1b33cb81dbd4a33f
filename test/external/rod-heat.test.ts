// End to end: examples/external/rod_heat.py (heat in a kiln rod: P1/P2 in space, four implicit steppers, two
// deliberate flaws) run with python3 on data rungs generates; its orders in time are measured from its VTK output.
//
// The manufactured temperature u = (1 + x) sin t + 1 with constant k = 2 on [0, 2] is linear in x, so u(·, t) lies in
// the P1 (and P2) space at every t: then u itself satisfies the Galerkin equations (u_t, v) + (k u_x, v_x) = (f, v)
// for every test function, the semi-discrete solution is u's nodal values (by hand: the weak form holds for all v,
// and the load f = (1 + x) cos t times a basis function is a polynomial the cell rule integrates exactly), and every
// error at the nodes is the time stepper's. The interval [0, 2] comes from problem.json, not from the command.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { interval } from '../../src/study/domain.ts';
import { heat } from '../../src/equation/presets.ts';
import { external } from '../../src/external/types.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { buildProblem } from '../../src/study/problem.ts';
import { writeStudyData } from '../../src/study/data-files.ts';
import { readVtkFile } from '../../src/external/vtk/read.ts';
import { gridToField } from '../../src/external/vtk/to-field.ts';

const solver = join(import.meta.dirname, '..', '..', 'examples', 'external', 'rod_heat.py');
const hasPython = spawnSync('python3', ['--version']).status === 0;
const T = 1;
const CELLS = 4;
const exactAt = (x: number) => (1 + x) * Math.sin(T) + 1;
const rate = (coarse: number, fine: number) => Math.log2(coarse / fine);
// A clean environment: no RUNGS_* variable of whoever runs the tests reaches the solver.
const cleanEnv = { PATH: process.env.PATH ?? '/usr/bin:/bin' };

/** Runs a process to its end (no timeout: a slow machine only makes it slower) and collects what it printed. */
function run(args: string[], env: Record<string, string> = {}): Promise<{ status: number | null; stdout: string; stderr: string }> {
  return new Promise((resolve, reject) => {
    const child = spawn('python3', args, { env: { ...cleanEnv, ...env } });
    let stdout = '', stderr = '';
    child.stdout.on('data', (d: Buffer) => { stdout += d.toString(); });
    child.stderr.on('data', (d: Buffer) => { stderr += d.toString(); });
    child.on('error', reject);
    child.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}

// The many numerical runs share one interpreter (python3 start-up dominates them on a busy machine): the driver loads
// rod_heat.py as a module and calls its main() with each run's command-line words, so every run goes through the
// same argument parsing as from a shell. Separate processes are started for the command line, the environment
// variables and the bad arguments below.
const DRIVER = `
import contextlib, importlib.util, io, json, sys
spec = importlib.util.spec_from_file_location("rod_heat", sys.argv[1])
rod = importlib.util.module_from_spec(spec)
spec.loader.exec_module(rod)
results = []
for argv in json.load(open(sys.argv[2])):
    err = io.StringIO()
    status = 0
    with contextlib.redirect_stdout(io.StringIO()), contextlib.redirect_stderr(err):
        try:
            rod.main(argv)
        except SystemExit as e:
            status = e.code if isinstance(e.code, int) else (0 if e.code is None else 1)
    results.append({"status": status, "stderr": err.getvalue()})
print(json.dumps(results))
`;

interface Case { key: string; words: string[] }

if (!hasPython) {
  describe('examples/external/rod_heat.py', () => {
    it.skip('python3 is not installed on this machine: the runs of the Python kiln-rod heat solver are skipped', () => {});
  });
}

describe.skipIf(!hasPython)('examples/external/rod_heat.py: heat in a kiln rod, orders in time', () => {
  const root = mkdtempSync(join(tmpdir(), 'rungs-rod-heat-'));
  afterAll(() => rmSync(root, { recursive: true, force: true }));
  let data = '';
  const cases: Case[] = [];
  const driverBad: Case[] = []; // filled below, where the bad arguments are listed
  const outOf = (key: string) => join(root, 'runs', key);
  const add = (key: string, method: string, steps: number, extra: string[] = []) => {
    cases.push({ key, words: ['--n', String(CELLS), '--steps', String(steps), '--T', String(T), '--method', method, '--data', data, '--out', outOf(key), ...extra] });
  };
  let results: { status: number; stderr: string }[] = [];

  beforeAll(async () => {
    const declaration = validateStudy({
      name: 'rod-linear-in-x',
      description: 'a kiln rod warming and cooling, linear in x at every time',
      pde: heat({ k: 2 }),
      exact: '(1 + x)*sin(t) + 1',
      domain: interval(0, 2),
      boundary: { dirichlet: ['left', 'right'] },
      discretization: external({ command: `python3 ${solver} --n {n} --data {data} --out {out} --method dirk3`, output: 'vtk', degree: 1 }),
      time: { final: T, order: 3 },
      ladder: { n: [CELLS], steps: [32, 64] },
      norms: ['L2'],
    }, 'rod-heat.test.ts');
    data = writeStudyData(join(root, 'data'), declaration, buildProblem(declaration, 'rod-heat.test.ts'), ['python']);
    for (const steps of [32, 64]) {
      for (const method of ['be', 'cn', 'bdf2', 'dirk3']) add(`${method}-${steps}`, method, steps);
      add(`dirk3-p2-${steps}`, 'dirk3', steps, ['--degree', '2']);
      add(`cn-old-time-source-${steps}`, 'cn', steps, ['--flaw', 'old-time-source']);
      add(`dirk3-stage-time-${steps}`, 'dirk3', steps, ['--flaw', 'stage-time']);
    }
    cases.push({ key: 'check-rule', words: ['--check-rule'] });
    for (const c of driverBad) cases.push({ key: c.key, words: [...c.words, '--data', data, '--out', outOf(c.key)] });
    writeFileSync(join(root, 'driver.py'), DRIVER);
    writeFileSync(join(root, 'cases.json'), JSON.stringify(cases.map((c) => c.words)));
    const r = await run([join(root, 'driver.py'), solver, join(root, 'cases.json')]);
    if (r.status !== 0) throw new Error(`the driver failed (status ${r.status}): ${r.stderr}`);
    results = JSON.parse(r.stdout) as { status: number; stderr: string }[];
  });

  /** Largest nodal error at T of one run, read through rungs's own VTK reader (which also checks the cells). */
  const nodalError = (key: string, degree = 1): number => {
    const status = results[cases.findIndex((c) => c.key === key)]!;
    expect(status, `${key}: ${status.stderr}`).toEqual({ status: 0, stderr: '' });
    const grid = readVtkFile(join(outOf(key), 'solution.vtk'));
    expect([...new Set(grid.types)]).toEqual([degree === 1 ? 3 : 21]); // VTK_LINE, VTK_QUADRATIC_EDGE (VTK file formats)
    const field = gridToField(grid, { field: 'temperature', degree });
    expect(field.dofs).toBe(CELLS * degree + 1);
    const values = grid.pointData.find((a) => a.name === 'temperature')!.values;
    let worst = 0;
    for (let p = 0; p < grid.nPoints; p++) worst = Math.max(worst, Math.abs(values[p]! - exactAt(grid.points[3 * p]!)));
    return worst;
  };
  const rateOf = (name: string, degree = 1) => rate(nodalError(`${name}-32`, degree), nodalError(`${name}-64`, degree));

  it('the cell rules integrate monomials exactly (∫_{-1}^{1} x^j = 2/(j+1), j even; 0, j odd; by hand)', () => {
    const r = results[cases.findIndex((c) => c.key === 'check-rule')]!;
    expect(r.status).toBe(0);
  });

  it('the mesh spans the interval of the data (problem.json): nodes from 0 to 2 in equal steps', () => {
    nodalError('be-32');
    const grid = readVtkFile(join(outOf('be-32'), 'solution.vtk'));
    const xs = Array.from({ length: grid.nPoints }, (_, p) => grid.points[3 * p]!);
    expect(xs).toEqual([0, 0.5, 1, 1.5, 2]); // [0, 2] in 4 cells: exact binary fractions
  });

  // Orders in time of the sound steppers (Hairer & Wanner 1996, Solving ODEs II, §IV.3 and §V.1: backward Euler 1,
  // trapezoidal rule / Crank–Nicolson 2, BDF2 2; Alexander 1977, SIAM J. Numer. Anal. 14: his three-stage SDIRK 3;
  // from memory). Rate between Δt = 1/32 and 1/64 within ±0.2 of the order (common practice, no source).
  it.each([
    ['be', 1], ['cn', 2], ['bdf2', 2], ['dirk3', 3],
  ] as const)('%s converges at order %d in time', (method, order) => {
    expect(Math.abs(rateOf(method) - order)).toBeLessThan(0.2);
  });

  it('dirk3 on P2 cells (VTK_QUADRATIC_EDGE) converges at order 3 in time (Alexander 1977)', () => {
    expect(Math.abs(rateOf('dirk3-p2', 2) - 3)).toBeLessThan(0.2);
  });

  // The flaws. Crank–Nicolson with dt·F(t_n) in place of dt·(F(t_n) + F(t_n+1))/2 replaces the trapezoidal rule of
  // the source by the left rectangle rule, whose error per step is dt²/2·F' (by hand): first order, since f varies
  // in time here (f = (1 + x) cos t).
  it('flaw old-time-source: Crank–Nicolson drops to order 1 (by hand, see above)', () => {
    expect(Math.abs(rateOf('cn-old-time-source') - 1)).toBeLessThan(0.2);
    expect(Math.abs(rateOf('cn') - 2)).toBeLessThan(0.2); // the sound method on the same data, for contrast
  });

  // The DIRK with F(t_n) at every stage integrates M U' + K U = F(t_n) instead of F(t): a defect F(t) − F(t_n) = O(dt)
  // over each step, local error O(dt²), global order 1 (by hand). Measured with this setting (n = 4, T = 1): rates
  // 1.02, 1.01, 1.00, 1.00 from Δt = 1/16 to 1/256; the test asks order 1 ± 0.2, a loss of two orders.
  it('flaw stage-time: the DIRK drops from order 3 to order 1 (by hand, see above)', () => {
    expect(Math.abs(rateOf('dirk3-stage-time') - 1)).toBeLessThan(0.2);
  });

  it('the command line and the RUNGS_* variables give the same solution, bit for bit', async () => {
    const words = ['--n', '4', '--steps', '8', '--T', '1', '--method', 'bdf2', '--data', data, '--out', join(root, 'cli')];
    const env = { RUNGS_N: '4', RUNGS_STEPS: '8', RUNGS_T: '1', RUNGS_DATA: data, RUNGS_OUT: join(root, 'env') };
    const [viaArgs, viaEnv] = await Promise.all([run([solver, ...words]), run([solver, '--method', 'bdf2'], env)]);
    expect(viaArgs.status, viaArgs.stderr).toBe(0);
    expect(viaEnv.status, viaEnv.stderr).toBe(0);
    const a = readFileSync(join(root, 'cli', 'solution.vtk'), 'utf8');
    expect(a).toBe(readFileSync(join(root, 'env', 'solution.vtk'), 'utf8'));
    const summary = JSON.parse(readFileSync(join(root, 'cli', 'errors.json'), 'utf8')) as { dofs: number; cells: number };
    expect(summary.dofs).toBe(5);
    expect(summary.cells).toBe(4);
  });

  // Bad arguments: most go through the driver (its status is the code main() exits with, which python3 makes the
  // process's exit status); two run as processes of their own to see that status from outside.
  const badCases: [string, string[], RegExp][] = [
    ['n', ['--n', '0', '--steps', '8', '--T', '1', '--method', 'cn'], /--n must be a positive number of cells/],
    ['method', ['--n', '4', '--steps', '8', '--T', '1'], /--method is required/],
    ['flaw', ['--n', '4', '--steps', '8', '--T', '1', '--method', 'cn', '--flaw', 'stage-time'], /--flaw stage-time belongs to --method dirk3/],
    ['degree', ['--n', '4', '--steps', '8', '--T', '1', '--method', 'cn', '--degree', '3'], /--degree must be 1 \(P1\) or 2 \(P2\)/],
    ['T', ['--n', '4', '--steps', '8', '--T', '-1', '--method', 'cn'], /--T must be a positive final time/],
    ['steps', ['--n', '4', '--T', '1', '--method', 'cn'], /--steps must be a positive number of time steps/],
    ['interval', ['--n', '4', '--steps', '8', '--T', '1', '--method', 'cn', '--a', '1'], /--a 1.0 contradicts the data's interval/],
  ];
  for (const [key, words] of badCases) driverBad.push({ key: `bad-${key}`, words });

  it.each(badCases)('bad argument (%s): exit status 2, a message naming it, no solution', (key, _words, message) => {
    const r = results[cases.findIndex((c) => c.key === `bad-${key}`)]!;
    expect(r.status, r.stderr).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(existsSync(join(outOf(`bad-${key}`), 'solution.vtk'))).toBe(false);
  });

  it('as processes: a data folder without rungs_data.py and a malformed RUNGS_STEPS exit with status 2 and a message', async () => {
    const empty = join(root, 'empty');
    mkdirSync(empty, { recursive: true });
    const [noData, badEnv] = await Promise.all([
      run([solver, '--n', '4', '--steps', '8', '--T', '1', '--method', 'cn', '--data', empty, '--out', join(root, 'bad-data')]),
      run([solver, '--n', '4', '--T', '1', '--method', 'cn', '--data', data, '--out', join(root, 'bad-env')], { RUNGS_STEPS: 'eight' }),
    ]);
    expect(noData.status, noData.stderr).toBe(2);
    expect(noData.stderr).toMatch(/no .*rungs_data\.py; run through rungs/);
    expect(badEnv.status, badEnv.stderr).toBe(2);
    expect(badEnv.stderr).toMatch(/RUNGS_STEPS='eight' is not an integer/);
    expect(existsSync(join(root, 'bad-data', 'solution.vtk')) || existsSync(join(root, 'bad-env', 'solution.vtk'))).toBe(false);
  });
});
