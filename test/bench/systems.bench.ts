/** The finite element core at about a million unknowns, phase by phase, each case in a fresh process (so that its
 *  peak RSS is its own):
 *  - poisson3d: −Δu = f on the unit cube, box mesh of m³ cubes each cut into six Kuhn tetrahedra, P1, Dirichlet data
 *    of u = sin(πx) sin(πy) sin(πz) on the whole boundary, CG + smoothed-aggregation AMG to relative residual 1e-10
 *    (the scalar equation's own assembly, `assembleSystem`, Dirichlet folded into its scatter); then the errors of
 *    u_h and of the interpolant in one pass as a study computes them. 100³ cubes: 1.03M vertices, 6M tetrahedra.
 *  - elasticity2d: vector P2 on the unit square (m² squares, two right triangles each), λ = 2, μ = 1 + 0.5x, held
 *    (u = 0) on the left and bottom sides, body force f = (1, −1), CG + smoothed aggregation with the rigid-body modes
 *    and block size 2 after a first coarse level of degree 1 on the same mesh (elasticityMultigrid; environment
 *    variable RUNGS_BENCH_NO_P_MULTIGRID=1 aggregates the P2 operator directly, for comparison), to relative
 *    residual 1e-10. The steps are those of `solveElasticity`
 *    (src/fem/discretizations/elasticity.ts), taken one at a time here so that each is timed: space, assembly
 *    (the generic term loop), elimination (in place, with the negligible entries dropped in the same pass, as
 *    solveElasticity does for the multigrid),
 *    solver setup, solve. m = 354: 1.0M unknowns. The column
 *    to1e-8 counts the iterations to relative residual 1e-8 in the same solve: at 1M unknowns 1e-10 is about the
 *    round-off floor of this matrix's residual and CG stops there by stagnation.
 *  - stokes2d: Taylor–Hood P2–P1 on the unit square, ν = 1, no slip all round, f = (0.5 − y, x − 0.5) (a swirl),
 *    mean-free pressure, through `solveStokes` (MINRES, block-diagonal preconditioner) at its default tolerance
 *    1e-10; its own timers split space / assembly (with elimination and the pressure mass matrix) / solve.
 *    m = 236: 503k unknowns.
 *  Targets (issue): poisson3d at ~1M unknowns assembled and solved under 6 s; elasticity2d ~1M solved under 6 s with
 *  iterations flat from ~10k to 1M; stokes2d ~500k under 10 s.
 *  Run: npx tsx test/bench/systems.bench.ts [poisson3d|elasticity2d|stokes2d ...] [--sizes m,m,...] [--runs R]
 *  [--no-errors]
 *  (default: every case at the sizes of SIZES, one run each; R runs per size give a range). The load average is
 *  printed with every row, and the CPU seconds of the assembly beside its wall time: the machine is shared. */
import { execFileSync } from 'node:child_process';
import { loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';

const self = fileURLToPath(import.meta.url);

const SIZES: Record<string, number[]> = {
  poisson3d: [25, 50, 100],
  elasticity2d: [35, 71, 142, 250, 354],
  stokes2d: [59, 118, 236],
};

interface Row {
  case: string; m: number; unknowns: number; nnz: number;
  mesh: number; space: number; assembly: number; elimination: number; setup: number; solve: number; errors: number;
  assemblyCpu: number; iterations: number; to1e8: number; residual: number; peakMiB: number; note: string;
}

const load = (): string => loadavg().map((v) => v.toFixed(2)).join(' ');
const ms = (t: number): number => (performance.now() - t) / 1000;
/** CPU seconds (user + system) of this process so far: less sensitive than wall time to other work on the machine. */
const cpu = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1e6; };

async function runCase(name: string, m: number, withErrors: boolean): Promise<Row> {
  const row: Row = { case: name, m, unknowns: 0, nnz: 0, mesh: NaN, space: NaN, assembly: NaN, elimination: NaN, setup: NaN, solve: NaN, errors: NaN, assemblyCpu: NaN, iterations: 0, to1e8: -1, residual: NaN, peakMiB: 0, note: '' };
  // Iterations to relative residual 1e-8 as well: at 1M unknowns 1e-10 is near the round-off floor of the residual
  // of the elasticity matrix (CG may stop there by stagnation).
  const stopWhen = ({ iteration, relativeResidual }: { iteration: number; relativeResidual: number }): boolean => {
    if (row.to1e8 < 0 && relativeResidual <= 1e-8) row.to1e8 = iteration;
    return false;
  };
  if (name === 'poisson3d') {
    const { boxMesh } = await import('../../src/mesh/box.ts');
    const { lagrangeSpace } = await import('../../src/fem/dofmap/dofmap.ts');
    const { assembleSystem, expandSolution } = await import('../../src/fem/assemble/system.ts');
    const { solveSystem } = await import('../../src/linalg/index.ts');
    const { manufacture } = await import('../../src/equation/index.ts');
    const { interpolate, lagrangeField } = await import('../../src/fem/field/lagrange-field.ts');
    const { errorNormsOf } = await import('../../src/norms/errors.ts');
    const exact = manufacture({ dim: 3, u: 'sin(pi*x) * sin(pi*y) * sin(pi*z)' });
    let t = performance.now();
    const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: m, ny: m, nz: m, cells: 'tetrahedra' });
    row.mesh = ms(t); t = performance.now();
    const space = lagrangeSpace(mesh, 1);
    row.space = ms(t); t = performance.now();
    const c0 = cpu();
    const sys = assembleSystem(space, { f: exact.f, hints: { f: null } }, { dirichlet: { tags: mesh.tagNames, value: exact.u } });
    row.assembly = ms(t); row.assemblyCpu = cpu() - c0;
    row.note = 'elimination in the assembly';
    const { x, stats } = solveSystem(sys.A, sys.b, { symmetric: true, method: 'cg', preconditioner: 'amg', relTol: 1e-10, stopWhen });
    row.setup = stats.setupSeconds ?? NaN; row.solve = stats.solveSeconds ?? NaN;
    row.iterations = stats.iterations; row.residual = stats.relativeResidual;
    row.unknowns = sys.A.nRows; row.nnz = sys.A.rowPtr[sys.A.nRows];
    if (!withErrors) return finish(row);
    t = performance.now();
    const uh = lagrangeField(space, expandSolution(sys, x));
    const ih = lagrangeField(space, interpolate(space, exact.u));
    const [e] = errorNormsOf([uh, ih], exact);
    row.errors = ms(t);
    row.note += `; L2 ${e.L2.toExponential(3)}`;
  } else if (name === 'elasticity2d') {
    const { rectangleMesh } = await import('../../src/mesh/rectangle.ts');
    const { lagrangeSpace } = await import('../../src/fem/dofmap/dofmap.ts');
    const { singleField } = await import('../../src/fem/space/space.ts');
    const { assembleForm } = await import('../../src/fem/form/assemble.ts');
    const { elasticityForm, elasticityMultigrid } = await import('../../src/fem/discretizations/elasticity.ts');
    const { eliminate, fixBoundary, noConstraints } = await import('../../src/fem/constraints/dirichlet.ts');
    const { solveSystem } = await import('../../src/linalg/index.ts');
    let t = performance.now();
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
    row.mesh = ms(t); t = performance.now();
    const scalar = lagrangeSpace(mesh, 2);
    const space = singleField('u', scalar, 2);
    row.space = ms(t); t = performance.now();
    const c0 = cpu();
    const input = {
      lambda: (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 2; },
      mu: (x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 1 + 0.5 * x; },
      source: (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 1; out[1] = -1; },
      hints: { coefficients: 1, source: 0 },
    };
    const { A, b } = assembleForm(space, elasticityForm(space, input, 2));
    row.assembly = ms(t); row.assemblyCpu = cpu() - c0; t = performance.now();
    const cons = noConstraints(space.nDofs);
    fixBoundary(space, cons, 0, ['left', 'bottom'], (_x, _y, _z, out) => { out[0] = 0; out[1] = 0; });
    const system = eliminate(A, b, cons, { inPlace: true, dropNegligible: true });
    row.elimination = ms(t); t = performance.now();
    const amg = elasticityMultigrid(scalar, 2, system.free, !process.env.RUNGS_BENCH_NO_P_MULTIGRID);
    const modes = ms(t);
    const { stats } = solveSystem(system.A, system.b, { symmetric: true, symmetricByConstruction: true, method: 'cg', preconditioner: 'amg', relTol: 1e-10, amg, stopWhen });
    row.setup = modes + (stats.setupSeconds ?? NaN); row.solve = stats.solveSeconds ?? NaN;
    row.iterations = stats.iterations; row.residual = stats.relativeResidual;
    if (stats.stoppedBy !== 'residual') row.note += `; stopped by ${stats.stoppedBy}`;
    row.unknowns = system.A.nRows; row.nnz = system.A.rowPtr[system.A.nRows];
    row.note = `setup includes the rigid-body modes and the degree-1 coarse space (${modes.toFixed(2)} s)` + row.note;
  } else if (name === 'stokes2d') {
    const { rectangleMesh } = await import('../../src/mesh/rectangle.ts');
    const { solveStokes } = await import('../../src/fem/discretizations/stokes.ts');
    const t = performance.now();
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' });
    row.mesh = ms(t);
    const sol = solveStokes({
      mesh, degree: 2, pressureMeanFree: true,
      nu: (_x, _y, _z, out) => { out[0] = 1; },
      momentumSource: (x, y, _z, out) => { out[0] = 0.5 - y; out[1] = x - 0.5; },
      massSource: (_x, _y, _z, out) => { out[0] = 0; },
      dirichlet: { tags: mesh.tagNames, value: (_x, _y, _z, out) => { out[0] = 0; out[1] = 0; } },
      hints: { coefficients: 0, source: 1 },
    });
    row.space = sol.seconds.space; row.assembly = sol.seconds.assemble;
    row.setup = sol.solver.setupSeconds ?? NaN;
    row.solve = sol.seconds.solve - (Number.isFinite(row.setup) ? row.setup : 0);
    row.iterations = sol.solver.iterations; row.residual = sol.solver.relativeResidual;
    row.unknowns = sol.space.nDofs;
    row.note = 'assembly includes elimination and the pressure mass matrix';
  } else throw new Error(`unknown case '${name}'; valid: ${Object.keys(SIZES).join(', ')}`);
  return finish(row);
}

function finish(row: Row): Row {
  row.peakMiB = process.resourceUsage().maxRSS / 1024;
  return row;
}

if (process.argv[2] === '--child') {
  const row = await runCase(process.argv[3]!, Number(process.argv[4]), process.argv[5] !== 'no-errors');
  console.log(JSON.stringify(row));
  process.exit(0);
}

const args = process.argv.slice(2);
const opt = (flag: string): string | undefined => { const i = args.indexOf(flag); return i >= 0 ? args[i + 1] : undefined; };
const sizesArg = opt('--sizes');
const runs = Number(opt('--runs') ?? 1);
const errors = !args.includes('--no-errors');
const names = args.filter((a, i) => !a.startsWith('--') && !['--sizes', '--runs'].includes(args[i - 1] ?? ''));
const cases = names.length ? names : Object.keys(SIZES);

const f = (v: number, w = 6): string => (Number.isFinite(v) ? v.toFixed(2) : '—').padStart(w);
console.log('case          m      unknowns   nnz        mesh   space  assem  elim   setup  solve  total  errors  asm cpu  iters  to1e-8  rel.res   peak MiB  load (1/5/15 min)  note');
for (const name of cases) {
  const sizes = sizesArg ? sizesArg.split(',').map(Number) : SIZES[name];
  if (!sizes) throw new Error(`unknown case '${name}'; valid: ${Object.keys(SIZES).join(', ')}`);
  for (const m of sizes) {
    for (let r = 0; r < runs; r++) {
      const before = load();
      const out = execFileSync(process.execPath, ['--import', 'tsx', self, '--child', name, String(m), errors ? 'errors' : 'no-errors'], { encoding: 'utf8', maxBuffer: 1 << 24 });
      const row = JSON.parse(out.trim().split('\n').pop()!) as Row;
      const total = [row.space, row.assembly, row.elimination, row.setup, row.solve].filter(Number.isFinite).reduce((a, b) => a + b, 0) + row.mesh;
      console.log(
        `${row.case.padEnd(13)} ${String(row.m).padEnd(6)} ${String(row.unknowns).padEnd(10)} ${String(row.nnz || '—').padEnd(10)} ` +
          `${f(row.mesh)} ${f(row.space)} ${f(row.assembly)} ${f(row.elimination)} ${f(row.setup)} ${f(row.solve)} ${f(total)} ${f(row.errors, 7)} ${f(row.assemblyCpu, 7)}  ` +
          `${String(row.iterations).padEnd(6)} ${String(row.to1e8 < 0 ? '—' : row.to1e8).padEnd(7)} ${row.residual.toExponential(2).padEnd(9)} ${row.peakMiB.toFixed(0).padStart(8)}  ${before.padEnd(17)}  ${row.note}`,
      );
    }
  }
}
