/** The heat equation's time steppers (src/fem/time/heat.ts) at up to a million unknowns, against one steady solve of
 *  the same size. 2D P1 on the unit square, m×m squares of two triangles each (rectangleMesh), k = 1, the manufactured
 *  temperature of a ceramic tile cooling while its rim is heated and cooled again,
 *    u = (1 + xy) cos t + sin(πx) sin(πy) e^(−2t),  f = u_t − Δu = −(1 + xy) sin t + (2π² − 2) sin(πx) sin(πy) e^(−2t)
 *  (by hand), Dirichlet data u on the whole boundary (they move with t, ∂g/∂t given), quadrature degrees stiffness 0,
 *  mass 2, load 4 (k + deg f with f counted as degree k + 2), CG + smoothed-aggregation AMG to relative residual 1e-12
 *  (solveHeat's default). Each case runs in a fresh process:
 *  - steady: −Δu = f(·, 0) with the boundary data of t = 0, assembled by the generic loop, eliminated, solved through
 *    createLinearSolver: its setup and its solve phase (from zero) are the yardstick. Then, in the same process, the
 *    matrix M + γΔt K of BDF2 (γ = 2/3) restricted to the free unknowns, its setup and one solve from zero of the
 *    right-hand side M·u0 (a step's system, without the warm start a step gets).
 *  - bdf2, dirk3: solveHeat over `steps` steps of Δt = T/steps; the wall and CPU time of every step are read in
 *    the onTimeLevel callback. The setup column is solveHeat's (matrices, splits, solver setups). Step 1 (steps 1
 *    and 2 for BDF2, whose first step is Crank–Nicolson on a matrix of its own and whose own matrix is set up in
 *    step 2) includes setup; the per-step figures are over the later steps (median, and the range). CG iterations
 *    are per solve (one per BDF2 step, three per DIRK step), over the whole run.
 *  F(t) and solve: seconds per load vector and per linear solve, from solveHeat's own timers (HeatRun.seconds).
 *  ratio = seconds per step / solve phase of the steady solve of the same size, measured in the same run of this
 *  script, in wall and in CPU seconds (target of the issue: at most 1.3 for one step of BDF2; the DIRK takes three
 *  solves per step, so its CPU ratio per solve is printed as well). The load average (1/5/15 min) is printed with
 *  every row: the machine is shared and wall times swing with it (CPU seconds too, if less: its cores and memory
 *  are shared as well). Note on the yardstick: after the multigrid drops negligible entries, K of these right-angled
 *  triangles keeps 5 entries per row (the couplings across the diagonals vanish), M + γΔt K keeps all 7 (the mass
 *  matrix couples them), so each CG iteration of a step costs about 1.4× one of the steady solve (65k unknowns:
 *  324k against 453k entries on the fine level, AmgStats.perLevel).
 *  The load vectors F(t) are assembled ahead with solveHeat's worker thread while the main thread solves (its own
 *  rule decides at which sizes; --load-worker on|off forces it, 'on' waiting for the worker to start): the F(t)
 *  column is then the main thread's time on them after its solve (the chunks of cells still left, and the wait for
 *  the worker's sum), and the row says which share of the cells the main thread computed.
 *  The CPU column counts every thread of the process (the load worker's too); the last column gives the main
 *  thread's CPU seconds per step alone (the path a step waits on when a second core is free) against the steady
 *  solve's, read from /proc on Linux (10 ms ticks; NaN elsewhere).
 *  Run: npx tsx test/bench/heat.bench.ts [--sizes m,m,...] [--steps N] [--T t] [--load-worker auto|on|off] [steady bdf2 dirk3]
 *  (default: sizes 256, 512, 1024 = 65k, 261k, 1.05M free unknowns; 12 steps over T = 0.12). */
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
import { printFigure } from './figures.ts';

const self = fileURLToPath(import.meta.url);

interface Row {
  case: string; m: number; unknowns: number;
  /** steady: assembly, setup, solve, iterations; and the M + γΔtK system: setup, solve from zero, iterations. */
  assembly: number; setup: number; solve: number; iterations: number; residual: number;
  heatSetup: number; heatSolve: number; heatIterations: number;
  /** time steppers: seconds per load vector F(t) and per linear solve (solveHeat's own timers). */
  load: number;
  /** time steppers: all step times (s), solves and iterations over the run, total wall time. */
  stepTimes: number[]; solves: number; total: number;
  /** Load vectors solveHeat's worker thread assembled ahead (the rest on the main thread). */
  onWorker: number;
  /** The share of those loads' cells the main thread computed itself. */
  shareHere: number;
  /** CPU seconds (user + system) of the same phases: less sensitive than wall time to other work on the machine. */
  solveCpu: number; heatSolveCpu: number; stepCpu: number[];
  /** CPU seconds of the main thread alone per step (Linux: /proc/self/task/<pid>/stat), without the load worker's. */
  stepMainCpu: number[]; solveMainCpu: number;
  peakMiB: number;
}

const wall = (t: number): number => (performance.now() - t) / 1000;
/** CPU seconds (user + system) of this process so far. */
const cpu = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };
/** CPU seconds (user + system) of the main thread so far: fields 14 and 15 of /proc/self/task/<pid>/stat, in clock
 *  ticks of 10 ms (proc(5); the tick is 100 per second on Linux x86-64, common practice, no source); NaN elsewhere. */
const mainCpu = (): number => {
  try {
    const stat = readFileSync(`/proc/self/task/${process.pid}/stat`, 'utf8');
    const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return (Number(f[11]) + Number(f[12])) / 100;
  } catch { return NaN; }
};
const median = (v: number[]): number => { const s = [...v].sort((a, b) => a - b); return s.length ? s[Math.floor(s.length / 2)] : NaN; };

const S = (x: number, y: number): number => Math.sin(Math.PI * x) * Math.sin(Math.PI * y);
const exact = (x: number, y: number, t: number): number => (1 + x * y) * Math.cos(t) + S(x, y) * Math.exp(-2 * t);

async function runCase(name: string, m: number, T: number, steps: number): Promise<Row> {
  const { rectangleMesh } = await import('../../src/mesh/rectangle.ts');
  const { lagrangeSpace } = await import('../../src/fem/dofmap/dofmap.ts');
  const { singleField } = await import('../../src/fem/space/space.ts');
  const row: Row = {
    case: name, m, unknowns: 0, assembly: NaN, setup: NaN, solve: NaN, iterations: 0, residual: NaN,
    heatSetup: NaN, heatSolve: NaN, heatIterations: 0, load: NaN, stepTimes: [], solves: 0, total: NaN, peakMiB: 0, onWorker: 0, shareHere: 0,
    solveCpu: NaN, heatSolveCpu: NaN, stepCpu: [], stepMainCpu: [], solveMainCpu: NaN,
  };
  const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
  const space = singleField('u', lagrangeSpace(mesh, 1));
  const one = (_x: number, _y: number, _z: number, out: Float64Array): void => { out[0] = 1; };
  // f as text (a function of its arguments and Math only), so that solveHeat's load worker can rebuild it; the
  // function used here is built from the same text.
  const fSource = '(x, y, _z, t, out) => { out[0] = -(1 + x * y) * Math.sin(t) + ' +
    '(2 * Math.PI ** 2 - 2) * (Math.sin(Math.PI * x) * Math.sin(Math.PI * y)) * Math.exp(-2 * t); }';
  const f = new Function(`"use strict"; return (${fSource});`)() as (x: number, y: number, z: number, t: number, out: Float64Array) => void;
  const degrees = { stiffness: 0, mass: 2, load: 4 };
  if (name === 'steady') {
    const { assembleForm } = await import('../../src/fem/form/assemble.ts');
    const { viscousTerm } = await import('../../src/fem/form/terms/viscous.ts');
    const { massTerm } = await import('../../src/fem/form/terms/mass.ts');
    const { sourceTerm } = await import('../../src/fem/form/terms/loads.ts');
    const { eliminate, fixBoundary, noConstraints } = await import('../../src/fem/constraints/dirichlet.ts');
    const { createLinearSolver } = await import('../../src/linalg/solve.ts');
    let t = performance.now();
    const { A, b } = assembleForm(space, {
      matrix: [viscousTerm(0, 1, one, degrees.stiffness)],
      vector: [sourceTerm(0, 1, (x, y, z, out) => f(x, y, z, 0, out), degrees.load)],
    });
    const cons = noConstraints(space.nDofs);
    fixBoundary(space, cons, 0, mesh.tagNames, (x, y, _z, out) => { out[0] = exact(x, y, 0); });
    const sys = eliminate(A, b, cons);
    row.assembly = wall(t);
    row.unknowns = sys.A.nRows;
    t = performance.now();
    const solver = createLinearSolver(sys.A, { symmetric: true, relTol: 1e-12 });
    row.setup = wall(t);
    // The solve three times with the same setup (from zero each time): the median is the yardstick.
    const times: number[] = [], cpus: number[] = [], mains: number[] = [];
    for (let r = 0; r < 3; r++) {
      t = performance.now();
      const c = cpu(), cm = mainCpu();
      const { stats } = solver.solve(sys.b);
      times.push(wall(t)); cpus.push(cpu() - c); mains.push(mainCpu() - cm);
      row.iterations = stats.iterations; row.residual = stats.relativeResidual;
    }
    row.solve = median(times); row.solveCpu = median(cpus); row.solveMainCpu = median(mains);
    solver.dispose();
    // The matrix of a BDF2 step, M + (2/3)Δt K, on the same free unknowns, and one of its solves from zero.
    const { A: M } = assembleForm(space, { matrix: [massTerm(0, 1, degrees.mass)], vector: [] });
    const dt = T / steps;
    const { A: K } = assembleForm(space, { matrix: [viscousTerm(0, 1, one, degrees.stiffness)], vector: [] });
    const values = new Float64Array(K.values.length);
    for (let i = 0; i < values.length; i++) values[i] = M.values[i] + (2 / 3) * dt * K.values[i];
    const rhs = new Float64Array(space.nDofs);
    const X = space.fields[0].space.scalar.dofCoords;
    const u0 = new Float64Array(space.nDofs);
    for (let i = 0; i < u0.length; i++) u0[i] = exact(X[2 * i], X[2 * i + 1], 0);
    for (let r = 0; r < M.nRows; r++) for (let s = M.rowPtr[r]; s < M.rowPtr[r + 1]; s++) rhs[r] += M.values[s] * u0[M.colIdx[s]];
    const heat = eliminate({ ...K, values }, rhs, cons);
    t = performance.now();
    const hs = createLinearSolver(heat.A, { symmetric: true, relTol: 1e-12 });
    row.heatSetup = wall(t);
    const heatTimes: number[] = [], heatCpus: number[] = [];
    for (let r = 0; r < 3; r++) {
      t = performance.now();
      const c = cpu();
      const h = hs.solve(heat.b);
      heatTimes.push(wall(t)); heatCpus.push(cpu() - c);
      row.heatIterations = h.stats.iterations;
    }
    row.heatSolve = median(heatTimes); row.heatSolveCpu = median(heatCpus);
    hs.dispose();
  } else if (name === 'bdf2' || name === 'dirk3') {
    const { solveHeat } = await import('../../src/fem/time/heat.ts');
    const p = {
      space, k: one, f, fSource,
      g: (x: number, y: number, _z: number, t: number, out: Float64Array): void => { out[0] = exact(x, y, t); },
      gDot: (x: number, y: number, _z: number, t: number, out: Float64Array): void => {
        out[0] = -(1 + x * y) * Math.sin(t) - 2 * S(x, y) * Math.exp(-2 * t);
      },
      u0: (x: number, y: number, _z: number, out: Float64Array): void => { out[0] = exact(x, y, 0); },
      dirichletTags: mesh.tagNames, degrees,
    };
    let last = performance.now(), lastCpu = cpu(), lastMain = mainCpu();
    const t0 = last;
    const run = solveHeat(p, name, T, steps, {
      loadWorker: loadWorker === 'auto' ? 'auto' : loadWorker === 'on',
      onTimeLevel: (step) => {
        const now = performance.now(), nowCpu = cpu();
        const nowMain = mainCpu();
        if (step > 0) { row.stepTimes.push((now - last) / 1000); row.stepCpu.push(nowCpu - lastCpu); row.stepMainCpu.push(nowMain - lastMain); }
        last = now; lastCpu = nowCpu; lastMain = nowMain;
      },
    });
    row.total = wall(t0);
    row.solves = run.solves; row.iterations = run.iterations;
    // solveHeat's own timers (absent from versions before them: the columns then show —).
    const sec = run.seconds ?? { setup: NaN, load: NaN, solve: NaN, total: NaN };
    row.setup = sec.setup; row.load = sec.load / (name === 'dirk3' ? 3 * run.steps : run.steps + 1);
    row.solve = sec.solve / run.solves;
    row.onWorker = run.loadsOnWorker ?? 0;
    row.shareHere = run.loadShareHere ?? 0;
    row.unknowns = (m - 1) * (m - 1); // the 4m boundary nodes of the square are fixed
  } else throw new Error(`unknown case '${name}'; valid: steady, bdf2, dirk3`);
  row.peakMiB = process.resourceUsage().maxRSS / 1024;
  return row;
}

// The load worker of solveHeat: auto (its own rule), on, off (every load on the main thread).
let loadWorker = 'auto';
if (process.argv[2] === '--child') {
  loadWorker = process.argv[7] ?? 'auto';
  const row = await runCase(process.argv[3]!, Number(process.argv[4]), Number(process.argv[5]), Number(process.argv[6]));
  console.log(JSON.stringify(row));
  process.exit(0);
}

const args = process.argv.slice(2);
const opt = (flag: string): string | undefined => { const i = args.indexOf(flag); return i >= 0 ? args[i + 1] : undefined; };
const sizes = (opt('--sizes') ?? '256,512,1024').split(',').map(Number);
const steps = Number(opt('--steps') ?? 12);
const T = Number(opt('--T') ?? 0.12);
const worker = opt('--load-worker') ?? 'auto';
const named = args.filter((a, i) => !a.startsWith('--') && !['--sizes', '--steps', '--T', '--load-worker'].includes(args[i - 1] ?? ''));
const cases = named.length ? named : ['steady', 'bdf2', 'dirk3'];
if (!cases.includes('steady')) cases.unshift('steady');

const loadAvg = (): string => loadavg().map((v) => v.toFixed(2)).join(' ');
const f = (v: number, w = 7, d = 3): string => (Number.isFinite(v) ? v.toFixed(d) : '—').padStart(w);

console.log(`2D P1 heat, Δt = T/steps = ${T}/${steps}, CG + AMG to relative residual 1e-12; seconds (wall, and CPU where marked); machine load average 1/5/15 min per row`);
console.log('case     m     unknowns   assembly  setup   1st step  per step: wall median (min–max)  CPU    steps/s  F(t)    solve   it/solve  ratio wall  CPU   per solve  peak MiB  load avg');
for (const m of sizes) {
  let steadySolve = NaN, steadyCpu = NaN, steadyMain = NaN;
  for (const name of cases) {
    const before = loadAvg();
    const out = execFileSync(process.execPath, ['--import', 'tsx', self, '--child', name, String(m), String(T), String(steps), worker], { encoding: 'utf8', maxBuffer: 1 << 24 });
    const row = JSON.parse(out.trim().split('\n').pop()!) as Row;
    const head = `${name.padEnd(8)} ${String(m).padEnd(5)} ${String(row.unknowns).padEnd(10)}`;
    if (name === 'steady') {
      steadySolve = row.solve; steadyCpu = row.solveCpu; steadyMain = row.solveMainCpu;
      console.log(
        `${head} ${f(row.assembly, 8)} ${f(row.setup)}  ${''.padEnd(8)}  solve ${f(row.solve)} (median of 3)   ${f(row.solveCpu, 6)}  ${''.padEnd(7)}  ${''.padEnd(6)}  ${''.padEnd(6)}  ${String(row.iterations).padStart(8)}  ` +
          `${''.padEnd(10)}  ${''.padEnd(4)}  ${''.padEnd(9)}  ${row.peakMiB.toFixed(0).padStart(8)}  ${before}   rel.res ${row.residual.toExponential(2)}`,
      );
      console.log(
        `${'M+γΔtK'.padEnd(8)} ${String(m).padEnd(5)} ${String(row.unknowns).padEnd(10)} ${''.padEnd(8)} ${f(row.heatSetup)}  ${''.padEnd(8)}  solve ${f(row.heatSolve)} (median of 3)   ${f(row.heatSolveCpu, 6)}  ${''.padEnd(7)}  ${''.padEnd(6)}  ${''.padEnd(6)}  ${String(row.heatIterations).padStart(8)}  ` +
          `${f(row.heatSolve / steadySolve, 10, 2)}  ${f(row.heatSolveCpu / steadyCpu, 4, 2)}  ${''.padEnd(9)}  ${''.padEnd(8)}  ${loadAvg()}   γ = 2/3, one solve from zero`,
      );
      continue;
    }
    // Steps after the setups: BDF2 sets its second matrix up in step 2.
    const skip = name === 'bdf2' ? 2 : 1;
    const later = row.stepTimes.slice(skip);
    const per = median(later), perCpu = median(row.stepCpu.slice(skip));
    const solvesPerStep = name === 'dirk3' ? 3 : 1;
    const range = `${Math.min(...later).toFixed(3)}–${Math.max(...later).toFixed(3)}`;
    if (m === sizes[sizes.length - 1]) {
      const ratio = per / steadySolve;
      printFigure({ name: `2D P1 heat, ${row.unknowns} unknowns: ${name === 'bdf2' ? 'BDF2' : 'DIRK'} step / steady solve phase`, value: ratio, unit: '×',
        ...(name === 'bdf2' ? { target: '≤ 1.3', met: ratio <= 1.3 } : {}),
        note: `step ${per.toFixed(2)} s (median of ${later.length}), solve phase ${steadySolve.toFixed(2)} s, ${(row.iterations / row.solves).toFixed(1)} CG iterations per solve; load ${before.split(' ')[0]}` });
    }
    console.log(
      `${head} ${''.padEnd(8)} ${f(row.setup)}  ${f(row.stepTimes.slice(0, skip).reduce((a, b) => a + b, 0), 8)}  ${f(per)} (${range.padEnd(11)})        ${f(perCpu, 6)}  ` +
        `${f(1 / per, 7, 2)}  ${f(row.load, 6)}  ${f(row.solve, 6)}  ${f(row.iterations / row.solves, 8, 1)}  ${f(per / steadySolve, 10, 2)}  ${f(perCpu / steadyCpu, 4, 2)}  ` +
        `${f(perCpu / solvesPerStep / steadyCpu, 9, 2)}  ${row.peakMiB.toFixed(0).padStart(8)}  ${before}   ` +
        `loads with the worker ${row.onWorker}/${name === 'dirk3' ? 3 * steps : steps + 1} (${(100 * row.shareHere).toFixed(0)}% of their cells on the main thread); main thread CPU per step ` +
        `${f(median(row.stepMainCpu.slice(skip)), 5, 2)} s = ${f(median(row.stepMainCpu.slice(skip)) / steadyMain, 4, 2)}× the steady solve's (${f(steadyMain, 4, 2)} s)`,
    );
  }
}
