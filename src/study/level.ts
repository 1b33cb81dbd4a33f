import { join } from 'node:path';
import { perturbMesh } from '../mesh/perturb.ts';
import { checkMesh } from '../mesh/quality.ts';
import { solveLagrange } from '../fem/discretizations/lagrange.ts';
import { lagrangeSpace } from '../fem/dofmap/dofmap.ts';
import { errorNormsOf } from '../norms/errors.ts';
import { interpolate, lagrangeField } from '../fem/field/lagrange-field.ts';
import type { DiscreteField, NormValues } from '../norms/types.ts';
import type { Mesh } from '../mesh/types.ts';
import type { FunctionSpace } from '../fem/dofmap/types.ts';
import type { SolveStats } from '../linalg/types.ts';
import { runExternalLevel, levelFolder } from '../external/index.ts';
import { externalLevelResult } from './external-level.ts';
import { fileStem } from './names.ts';
import type { LevelResult } from './result.ts';
import type { NormName, StudyDeclaration } from './declaration.ts';
import type { StudyProblem } from './problem.ts';
import type { LevelContext } from './context.ts';
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { algebraicTie, DEFAULT_ERROR_FRACTION, type AlgebraicTie } from './algebraic.ts';
import { checkLevelMemory } from './memory-budget.ts';

/** I_h u on the discrete solution's own space when it is a Lagrange field of that degree, else on a new one. */
function interpolantField(mesh: Mesh, degree: number, u: (x: number, y: number, z: number) => number, space: FunctionSpace | null): DiscreteField {
  const sp = space ?? lagrangeSpace(mesh, degree);
  return lagrangeField(sp, interpolate(sp, u));
}


/** Cells sampled for the interpolation-error estimate that sets the solver target (every cell below this). */
const TARGET_SAMPLE_CELLS = 50_000;

const seconds = (t0: number) => (performance.now() - t0) / 1e3;
const peakRss = () => process.resourceUsage().maxRSS * 1024;

/** Where a level runs: the output folder (external solvers write into <out>/<study>/level-k). */
export interface LevelEnvironment {
  out: string;
  /** The folder holding the study's generated manufactured data ({data}, RUNGS_DATA), when written. */
  data?: string;
}

/** Runs one level: mesh, solve, errors; returns its row. Any failure is re-thrown naming the study and level. */
export async function runLevel(
  decl: StudyDeclaration, file: string, problem: StudyProblem, index: number, norms: NormName[],
  solver: LevelContext['solver'], env: LevelEnvironment = { out: 'reports' },
): Promise<LevelResult> {
  try {
    const level = await runLevelUnguarded(decl, file, problem, index, norms, solver, env);
    const s = level.solver;
    if (s && !s.converged) {
      throw new RungsNumericalError(
        `the ${s.method} solver (preconditioner ${s.preconditioner}) stopped by ${s.stoppedBy} after ${s.iterations} iterations at ` +
        `relative residual ${s.relativeResidual.toExponential(2)}${s.message ? ` — ${s.message}` : ''}`);
    }
    return level;
  } catch (err) {
    const where = `${file} (study '${decl.name}') level ${index + 1} (n = ${decl.ladder.n[index]})`;
    if (err instanceof RungsInputError) throw new RungsInputError(err.message.startsWith(file) ? err.message : `${where}: ${err.message}`, file);
    if (err instanceof RungsNumericalError) throw new RungsNumericalError(`${where}: ${err.message}`, file);
    throw err;
  }
}

async function runLevelUnguarded(
  decl: StudyDeclaration, file: string, problem: StudyProblem, index: number, norms: NormName[],
  solver: LevelContext['solver'], env: LevelEnvironment = { out: 'reports' },
): Promise<LevelResult> {
  const tStart = performance.now();
  const n = decl.ladder.n[index];
  let t = performance.now();
  // A level that would not fit in the memory budget is refused before it is meshed (custom domains: once meshed).
  checkLevelMemory(decl, index);
  let mesh = decl.domain.mesh(n);
  if (decl.domain.kind === 'custom') checkLevelMemory(decl, index, mesh);
  if (decl.domain.kind === 'custom') checkMesh(mesh, `${file}: domain mesh of level ${index + 1}`);
  if (decl.ladder.perturb && decl.ladder.perturb.fraction > 0) {
    mesh = perturbMesh(mesh, { fraction: decl.ladder.perturb.fraction, seed: (decl.ladder.perturb.seed ?? 1) + index });
  }
  const tMesh = seconds(t);
  const { exact, coefficients, boundary } = problem;
  const disc = decl.discretization;
  const errOpts = { k: coefficients.k, c: coefficients.c };

  if (disc.kind === 'external') {
    t = performance.now();
    const run = await runExternalLevel(disc, {
      study: decl.name, index, n, h: mesh.h, outDir: levelFolder(join(env.out, fileStem(decl.name)), index),
      norms, quantities: decl.quantities, data: env.data,
    });
    const tSolve = seconds(t);
    t = performance.now();
    const { level, quantities } = externalLevelResult(run, {
      index, n, exact: exact ?? undefined, norms, errorOptions: errOpts, symmetric: problem.symmetric,
    });
    return {
      ...level,
      quantities,
      seconds: { mesh: tMesh, assemble: 0, solve: tSolve, errors: seconds(t), total: seconds(tStart) },
      peakRssBytes: peakRss(),
    };
  }
  if (!exact) throw new RungsInputError(`${file} (study '${decl.name}'): exact: missing; a built-in or custom discretization needs the exact solution`, file);

  let field: DiscreteField;
  let stats: SolveStats | null = null;
  let tAssemble = 0, tSolve = 0;
  t = performance.now();
  let interp: NormValues | null = null;
  let tie: AlgebraicTie | null = null;
  let tInterp = 0;
  // The built-in discretization's own space, reused for the interpolant, and I_h u once computed.
  let solvedSpace: FunctionSpace | null = null;
  let interpolant: DiscreteField | null = null;
  if (disc.kind === 'lagrange') {
    const tSpace0 = performance.now();
    const space = lagrangeSpace(mesh, disc.degree);
    const tSpace = seconds(tSpace0);
    const fraction = decl.solver?.errorFraction ?? DEFAULT_ERROR_FRACTION;
    let stopWhen: LevelContext['solver']['stopWhen'];
    if (problem.symmetric) {
      let estimate: NormValues | null = null;
      if (fraction > 0) {
        // Estimate I_h u's errors first (on a sample of cells on large meshes: a tolerance needs no more); they set
        // how small the algebraic error must be. The reported interpolation errors are integrated in full later.
        const t0 = performance.now();
        const stride = Math.max(1, Math.floor(mesh.nCells / TARGET_SAMPLE_CELLS));
        interpolant = lagrangeField(space, interpolate(space, exact.u));
        [estimate] = errorNormsOf([interpolant], exact, { ...errOpts, cellStride: stride });
        if (stride === 1) interp = estimate;
        tInterp = seconds(t0);
      }
      tie = algebraicTie(estimate, fraction, mesh, space.dofCoords, coefficients.k);
      const target = tie.target;
      if (target > 0) stopWhen = ({ energyErrorEstimate }) => energyErrorEstimate !== undefined && energyErrorEstimate <= target;
    }
    const sol = solveLagrange({ mesh, degree: disc.degree, coefficients, boundary, quadrature: disc.quadrature, space, solver: { ...solver, stopWhen } });
    field = sol.field;
    solvedSpace = sol.space;
    stats = sol.solver;
    tAssemble = tSpace + sol.seconds.assemble;
    tSolve = sol.seconds.solve;
  } else {
    const ctx: LevelContext = { study: decl.name, index, n, mesh, exact, coefficients, boundary, solver };
    const out = await disc.solve(ctx);
    if (!out || typeof out !== 'object' || !out.field || typeof out.field.evaluate !== 'function') {
      throw new RungsInputError(`${file} (study '${decl.name}'): discretization.solve returned no field at level ${index + 1}; return { field } with field.evaluate(cell, points, n, values, grads)`, file);
    }
    field = out.field;
    stats = out.solver ?? null;
    tSolve = seconds(t);
  }

  t = performance.now();
  // The nodal interpolant I_h u is measured in the same pass: the best-approximation reference of Céa's lemma.
  const degree = disc.degree;
  const withInterp = !interp && degree !== undefined && degree > 0 && mesh.cellKind !== 'tetrahedron';
  const interpField = withInterp ? (interpolant ?? interpolantField(mesh, degree, exact.u, solvedSpace)) : null;
  const [errs, interpErrs] = errorNormsOf(interpField ? [field, interpField] : [field], exact, errOpts);
  if (interpErrs) interp = interpErrs;
  const tErrors = seconds(t) + tInterp;

  const pick = (v: NormValues) => Object.fromEntries(norms.map((nm) => [nm, v[nm]]));
  const quasi = problem.symmetric && interp && interp.energy > 0 ? errs.energy / interp.energy : null;
  return {
    index, n, h: mesh.h, dofs: field.nDofs, cells: mesh.nCells,
    errors: pick(errs),
    interpolationErrors: interp ? pick(interp) : undefined,
    quasiOptimality: quasi,
    solver: stats,
    algebraic: tie && stats?.energyErrorEstimate !== undefined && Number.isFinite(stats.energyErrorEstimate)
      ? { estimate: stats.energyErrorEstimate, target: tie.target, fraction: tie.fraction, floors: tie.floors(stats.energyErrorEstimate) }
      : null,
    seconds: { mesh: tMesh, assemble: tAssemble, solve: tSolve, errors: tErrors, total: seconds(tStart) },
    peakRssBytes: peakRss(),
  };
}
