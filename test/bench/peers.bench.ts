/**
 * rungs against hand-written peers on the seven-level P1 ladder of study.bench.ts (16² … 1024² squares, mesh to
 * errors), each as a whole process: `rungs run` of that study as installed (installed.ts: compiled dist/; the study
 * file, in a temporary folder, imports 'rungs' as a user's does; reports written as a user's run writes them) and
 * peers/p1_ladder.py, the same problem assembled with NumPy/SciPy and solved by pyamg's smoothed aggregation + CG,
 * and, with --direct, by SciPy's sparse direct solver. Runs alternate (rungs, pyamg, direct, rungs, …) so that a
 * shared machine's load falls on all alike; median wall times and the ratios are printed with the machine and the
 * load average.
 * Targets (issue): rungs at most 0.5× the pyamg script's wall time and at most 0.1× the direct script's; the finest
 * level's phases at most 1.5 s each; the whole run's peak memory at most 0.7 GB.
 * Same tolerance: rungs stops CG by its own rule (algebraic error below 1e-3 × the level's interpolation error), so
 * the first rungs run's relative residual per level is handed to the pyamg script as its per-level tolerance
 * (both measure ||b − A x||₂ / ||b||₂ on the system with the Dirichlet unknowns eliminated).
 * Agreement: both codes solve the same discrete problem (the same mesh and numbering, the same 6-point degree-4 rule
 * for the load and the errors), so their L2 and H1-seminorm errors must agree per level to within ERROR_AGREEMENT;
 * the largest differences are printed (a wrong problem would differ by O(1)).
 * Needs python3 with NumPy, SciPy and pyamg (PYTHON names another interpreter); without them it says so and exits 0.
 * BLAS settings: OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE, if set, are removed for the Python runs only (they pin an
 * older kernel and slow a current NumPy); the script's BLAS is printed.
 * Run: npx tsx test/bench/peers.bench.ts [rounds, default 3] [--no-direct] [--levels n,n,...]
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { printFigure } from './figures.ts';
import { LADDERS, ladderStudyFile } from './ladder-studies.ts';
import { installedLayout } from './installed.ts';

const TARGET_PYAMG = 0.5;
const TARGET_DIRECT = 0.1;
/** The finest level's phases at 1M P1 unknowns, each. */
const PHASE_TARGET = 1.5;
/** The ladder's peak memory: the "0.7 GB" was measured as GiB (study.bench.ts: maxRSS / 2^20, 717 MiB);
 *  taken here as 700 MiB, the stricter reading. */
const PEAK_TARGET_MIB = 700;
/** Largest relative difference of a level's error between rungs and a peer that still counts as the same problem:
 *  the solvers stop at an algebraic error of about 1e-3 × the discretization error in the energy norm, which can
 *  move an L2 error by more than that fraction of itself only in the worst case (measured: under 1e-6). */
const ERROR_AGREEMENT = 1e-3;

const here = dirname(fileURLToPath(import.meta.url));
const repo = resolve(here, '..', '..');
const args = process.argv.slice(2);
const opt = (flag: string): string | undefined => { const i = args.indexOf(flag); return i >= 0 ? args[i + 1] : undefined; };
const rounds = Number(args.find((a, i) => /^\d+$/.test(a) && args[i - 1] !== '--levels') ?? 3);
const direct = !args.includes('--no-direct');
const levels = (opt('--levels') ?? LADDERS.p1.n.join(',')).split(',').map(Number);
const python = process.env.PYTHON ?? 'python3';
const script = join(here, 'peers', 'p1_ladder.py');
const pyEnv = { ...process.env };
delete pyEnv.OPENBLAS_CORETYPE;
delete pyEnv.OPENBLAS_L2_SIZE;

// Is there a Python with the three libraries? (Not an error when not: the benchmark is for machines that have them.)
const probe = spawnSync(python, ['-c', [
  'import sys, numpy, scipy, pyamg',
  'try:\n import threadpoolctl; blas = "; ".join(f"{i[\'internal_api\']} {i.get(\'version\')} {i.get(\'architecture\')}, {i[\'num_threads\']} threads" for i in threadpoolctl.threadpool_info())',
  'except ImportError:\n blas = "unknown (no threadpoolctl)"',
  'print(f"Python {sys.version.split()[0]}, NumPy {numpy.__version__}, SciPy {scipy.__version__}, pyamg {pyamg.__version__}; BLAS {blas}")',
].join('\n')], { encoding: 'utf8', env: pyEnv });
if (probe.status !== 0) {
  console.log(`peers: skipped, ${python} with NumPy, SciPy and pyamg is not available here (${(probe.error?.message ?? probe.stderr.trim().split('\n').pop()) || 'no output'})`);
  process.exit(0);
}

const root = mkdtempSync(join(tmpdir(), 'rungs-peers-'));
const study = join(root, 'p1-ladder.study.ts');
writeFileSync(study, ladderStudyFile('p1', 'p1-ladder', levels));
// rungs as a user runs it: the installed layout (compiled dist/, no TypeScript compiled on the fly; a checkout's
// bin/rungs.mjs would compile src/ through tsx at every start, about 0.3 s more of this ladder).
const rungsBin = await installedLayout(repo, root);

interface Level { n: number; L2: number; H1semi: number; iterations: number; relativeResidual: number }
interface Run { wall: number; levels: Level[]; text: string }
/** A rungs run's finest level: its phases (s) and the process's peak resident memory (MiB): measured by GNU time
 *  around the whole process where /usr/bin/time exists, else the peak rungs recorded at the end of that level. */
interface Finest { meshAndAssembly: number; setupAndSolve: number; errors: number; peakMiB: number; peakFrom: string }

/** GNU time, when the machine has it: the whole process's peak resident memory (its maximum RSS, in KiB). */
const gnuTime = existsSync('/usr/bin/time') ? '/usr/bin/time' : null;
const PEAK_MARK = 'rungs-peers-peak-kib ';

function timed(cmd: string, argv: string[], env: NodeJS.ProcessEnv, peak = false): { wall: number; stdout: string; peakKiB: number | null } {
  const [file, args] = peak && gnuTime ? [gnuTime, ['-f', `${PEAK_MARK}%M`, cmd, ...argv]] : [cmd, argv];
  const t0 = performance.now();
  const p = spawnSync(file, args, { cwd: root, encoding: 'utf8', env, maxBuffer: 1 << 28 });
  const wall = (performance.now() - t0) / 1e3;
  if (p.status !== 0) throw new Error(`${cmd} ${argv.join(' ')} failed (${p.status ?? p.signal}): ${p.stderr}`);
  const mark = p.stderr.split('\n').find((l) => l.startsWith(PEAK_MARK));
  return { wall, stdout: p.stdout, peakKiB: mark ? Number(mark.slice(PEAK_MARK.length)) : null };
}

let round = 0;
const finest: Finest[] = [];
function runRungs(): Run {
  const { wall, stdout, peakKiB } = timed(process.execPath, [rungsBin, 'run', study, '--out', join(root, `out-${round}`), '--json'], { ...process.env, NO_COLOR: '1' }, true);
  type Json = { n: number; errors: Record<string, number>; solver?: { iterations: number; relativeResidual: number }; seconds: Record<string, number>; peakRssBytes?: number };
  const result = JSON.parse(stdout) as Array<{ levels: Json[] }>;
  const lv = result[0]!.levels.map((l) => ({ n: l.n, L2: l.errors.L2!, H1semi: l.errors.H1semi!, iterations: l.solver?.iterations ?? NaN, relativeResidual: l.solver?.relativeResidual ?? NaN }));
  const last = result[0]!.levels[result[0]!.levels.length - 1]!;
  finest.push({
    meshAndAssembly: last.seconds.mesh! + last.seconds.assemble!, setupAndSolve: last.seconds.solve!, errors: last.seconds.errors!,
    peakMiB: peakKiB !== null ? peakKiB / 1024 : (last.peakRssBytes ?? NaN) / 2 ** 20,
    peakFrom: peakKiB !== null ? 'whole process, GNU time' : 'at the end of the finest level, as rungs recorded it',
  });
  return { wall, levels: lv, text: '' };
}

function runPython(extra: string[]): Run {
  const { wall, stdout } = timed(python, [script, '--levels', levels.join(','), '--json', ...extra], pyEnv);
  const lines = stdout.trim().split('\n');
  const json = JSON.parse(lines.pop()!) as { levels: Level[] };
  return { wall, levels: json.levels, text: lines.join('\n') };
}

const cpu = cpus()[0]?.model.trim() ?? 'unknown CPU';
const load = (): string => loadavg().map((v) => v.toFixed(2)).join(' ');
const loadBefore = load();
console.log(`P1 ladder ${levels[0]}² … ${levels[levels.length - 1]}² (${levels.length} levels), whole processes, ${rounds} alternating rounds`);
console.log(`${cpu}, ${cpus().length} logical cores; Node ${process.versions.node}; ${probe.stdout.trim()}`);
console.log(`load average (1/5/15 min) before: ${loadBefore}`);

const times: Record<string, number[]> = { rungs: [], pyamg: [], direct: [] };
let reference: Run | null = null, pyamgRun: Run | null = null, directRun: Run | null = null;
let rtol = '';
for (round = 0; round < rounds; round++) {
  const r = runRungs();
  times.rungs.push(r.wall);
  if (!reference) {
    reference = r;
    // The pyamg script stops at the relative residual rungs reached on each level (never looser than 1e-6).
    rtol = r.levels.map((l) => Math.min(l.relativeResidual, 1e-6).toExponential(3)).join(',');
  }
  const p = runPython(['--rtol', rtol]);
  times.pyamg.push(p.wall);
  pyamgRun ??= p;
  let line = `round ${round + 1}: rungs ${r.wall.toFixed(2)} s, pyamg script ${p.wall.toFixed(2)} s (ratio ${(r.wall / p.wall).toFixed(2)})`;
  if (direct) {
    const d = runPython(['--direct']);
    times.direct.push(d.wall);
    directRun ??= d;
    line += `, direct script ${d.wall.toFixed(2)} s (ratio ${(r.wall / d.wall).toFixed(2)})`;
  }
  console.log(`${line}; load average ${load()}`);
}
const loadAfter = load();

console.log('\nper level (first run of each): errors of rungs, and the relative difference of each peer\'s');
console.log('    n   rungs L2          H1semi            it   rel.res    | pyamg it  rel.res   ΔL2       ΔH1semi   | direct ΔL2  ΔH1semi');
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
let worst = 0;
for (let i = 0; i < reference!.levels.length; i++) {
  const l = reference!.levels[i]!, p = pyamgRun!.levels[i]!, d = directRun?.levels[i];
  const dp = [rel(p.L2, l.L2), rel(p.H1semi, l.H1semi)];
  const dd = d ? [rel(d.L2, l.L2), rel(d.H1semi, l.H1semi)] : [];
  worst = Math.max(worst, ...dp, ...dd);
  console.log(`${String(l.n).padStart(5)}   ${l.L2.toExponential(9)}  ${l.H1semi.toExponential(9)}  ${String(l.iterations).padStart(3)}  ${l.relativeResidual.toExponential(2)}  | ` +
    `${String(p.iterations).padStart(6)}  ${p.relativeResidual.toExponential(2)}  ${dp.map((v) => v.toExponential(1).padEnd(8)).join('  ')}  | ` +
    `${dd.map((v) => v.toExponential(1).padEnd(8)).join('  ')}`);
}
const agree = worst <= ERROR_AGREEMENT;
console.log(`largest relative difference of an error: ${worst.toExponential(2)} (${agree ? 'within' : 'ABOVE'} ${ERROR_AGREEMENT}: ${agree ? 'the same discrete problem' : 'the codes do not solve the same problem'})`);

const median = (a: number[]): number => { const s = [...a].sort((x, y) => x - y); return s.length % 2 ? s[s.length >> 1]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2; };
const range = (a: number[]): string => `${Math.min(...a).toFixed(1)}–${Math.max(...a).toFixed(1)} s`;
const mr = median(times.rungs), mp = median(times.pyamg);
console.log(`\nmedian wall: rungs ${mr.toFixed(2)} s (${range(times.rungs)}), pyamg script ${mp.toFixed(2)} s (${range(times.pyamg)})` +
  (direct ? `, direct script ${median(times.direct).toFixed(2)} s (${range(times.direct)})` : ''));
console.log(`rungs / pyamg script: ${(mr / mp).toFixed(3)} (target ≤ ${TARGET_PYAMG}: ${mr / mp <= TARGET_PYAMG ? 'met' : 'NOT met'})`);
if (direct) {
  const md = median(times.direct);
  console.log(`rungs / direct script: ${(mr / md).toFixed(3)} (target ≤ ${TARGET_DIRECT}: ${mr / md <= TARGET_DIRECT ? 'met' : 'NOT met'})`);
}
console.log(`load average (1/5/15 min) after: ${loadAfter}`);
if (Math.max(Number(loadBefore.split(' ')[0]), Number(loadAfter.split(' ')[0])) > cpus().length / 2) {
  console.log('note: the machine was busy (load average above half the cores); the ratios are of a shared machine, not an idle one');
}
// The finest level's phases and the peak memory (the per-phase targets at 1M P1 unknowns, 2 threads when the
// machine has 2 cores, and the ladder's peak memory), medians over the rounds.
const finestN = levels[levels.length - 1]!;
const medianOf = (key: keyof Omit<Finest, 'peakFrom'>): number => median(finest.map((f) => f[key]));
const spread = (key: keyof Omit<Finest, 'peakFrom'>, digits = 2): string => `${Math.min(...finest.map((f) => f[key])).toFixed(digits)}–${Math.max(...finest.map((f) => f[key])).toFixed(digits)}`;
console.log(`finest level (${finestN}², median of ${finest.length}): mesh + assembly ${medianOf('meshAndAssembly').toFixed(2)} s, setup + solve ${medianOf('setupAndSolve').toFixed(2)} s, ` +
  `errors (u_h and I_h u, with the error maps) ${medianOf('errors').toFixed(2)} s; peak memory ${medianOf('peakMiB').toFixed(0)} MiB (${spread('peakMiB', 0)}; ${finest[0]!.peakFrom})`);
const note = `${rounds} round${rounds === 1 ? '' : 's'}, load ${loadBefore.split(' ')[0]} → ${loadAfter.split(' ')[0]}`;
printFigure({ name: `${levels.length}-level P1 ladder ${levels[0]}² … ${levels[levels.length - 1]}², whole process: rungs`, value: mr, unit: 's', note: `median, ${range(times.rungs)}` });
printFigure({ name: 'P1 ladder: rungs / NumPy + pyamg SA-CG script', value: mr / mp, unit: '×', target: `≤ ${TARGET_PYAMG}`, met: mr / mp <= TARGET_PYAMG, note: `script ${mp.toFixed(1)} s; ${note}` });
if (direct) {
  const md = median(times.direct);
  printFigure({ name: 'P1 ladder: rungs / NumPy + SciPy spsolve script', value: mr / md, unit: '×', target: `≤ ${TARGET_DIRECT}`, met: mr / md <= TARGET_DIRECT, note: `script ${md.toFixed(1)} s; ${note}` });
}
for (const [key, what] of [['meshAndAssembly', 'mesh + assembly'], ['setupAndSolve', 'multigrid setup + solve'], ['errors', 'errors of u_h and I_h u, with the error maps']] as const) {
  const v = medianOf(key);
  printFigure({ name: `P1 ladder, finest level (${finestN}²): ${what}`, value: v, unit: 's', target: `≤ ${PHASE_TARGET} s`, met: v <= PHASE_TARGET, note: `median, ${spread(key)} s; ${note}` });
}
const peak = medianOf('peakMiB');
printFigure({ name: 'P1 ladder: peak memory of the rungs process', value: peak, unit: 'MiB', target: `≤ ${PEAK_TARGET_MIB} MiB`, met: peak <= PEAK_TARGET_MIB, note: `median, ${spread('peakMiB', 0)} MiB; ${finest[0]!.peakFrom}; ${note}` });
rmSync(root, { recursive: true, force: true });
if (!agree) process.exit(1);
