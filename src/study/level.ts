import { ladderRungs, rungLabel } from './time-ladder.ts';
import { perturbMesh } from '../mesh/perturb.ts';
import { checkMesh } from '../mesh/quality.ts';
import type { Mesh } from '../mesh/types.ts';
import type { LevelResult } from './result.ts';
import type { StudyDeclaration } from './declaration.ts';
import type { StudyProblem } from './problem.ts';
import type { LevelContext } from './context.ts';
import { RungsInputError, RungsNumericalError } from '../errors.ts';
import { checkLevelMemory } from './memory-budget.ts';
import { levelDiscretization } from './discretizations/choose.ts';
import { seconds, type LevelEnvironment } from './discretizations/types.ts';
import { localOrdersAhead, pairRefines, parentCellsAhead, pixelOwnersAhead, recordWhere, reserveLevelVtu, warmLocalOrders } from './where.ts';
import { releaseArenaMemory } from '../linalg/amg/seam-task.ts';
import { startedTeam } from '../fem/team/team.ts';
import { collectGarbage } from '../linalg/kernels/collect.ts';
import { fileStem } from './names.ts';
import { settleBackgroundWrites } from '../files/background-write.ts';
import { join } from 'node:path';

export type { LevelEnvironment } from './discretizations/types.ts';

const peakRss = () => process.resourceUsage().maxRSS * 1024;

/** Runs one level: mesh, solve, errors; returns its row. Any failure is re-thrown naming the study and level. */
export async function runLevel(
  decl: StudyDeclaration, file: string, problem: StudyProblem, index: number, norms: readonly string[],
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
    const where = `${file} (study '${decl.name}') level ${index + 1} (${rungLabel(ladderRungs(decl)[index]!)})`;
    if (err instanceof RungsInputError) throw new RungsInputError(err.message.startsWith(file) ? err.message : `${where}: ${err.message}`, file);
    if (err instanceof RungsNumericalError) throw new RungsNumericalError(`${where}: ${err.message}`, file);
    throw err;
  }
}

/** Meshes the level and hands it to the study's discretization object (src/study/discretizations/): every kind —
 *  built-in for each equation, custom, external — behind the same interface. */
async function runLevelUnguarded(
  decl: StudyDeclaration, file: string, problem: StudyProblem, index: number, norms: readonly string[],
  solver: LevelContext['solver'], env: LevelEnvironment,
): Promise<LevelResult> {
  const tStart = performance.now();
  // The previous level's error map, written while this thread went on (src/study/where.ts), is finished before this
  // level allocates: its arrays are let go before this level's peak of memory.
  if (env.errorFiles) await settleBackgroundWrites(join(env.out, fileStem(decl.name)));
  const { n, steps } = ladderRungs(decl)[index]!;
  const t = performance.now();
  const disc = levelDiscretization(decl, problem, file);
  if (decl.discretization.kind !== 'external' && !problem.exact && !problem.derived) {
    throw new RungsInputError(`${file} (study '${decl.name}'): exact: missing; a built-in or custom discretization needs the exact solution`, file);
  }
  // A level that would not fit in the memory budget is refused before it is meshed (custom domains: once meshed).
  checkLevelMemory(decl, index);
  let mesh: Mesh | null = decl.domain.mesh(n);
  if (decl.domain.kind === 'custom') checkLevelMemory(decl, index, mesh);
  if (decl.domain.kind === 'custom') checkMesh(mesh, `${file}: domain mesh of level ${index + 1}`);
  if (decl.ladder.perturb && decl.ladder.perturb.fraction > 0) {
    mesh = perturbMesh(mesh, { fraction: decl.ladder.perturb.fraction, seed: (decl.ladder.perturb.seed ?? 1) + index });
  }
  const tMesh = seconds(t);
  const { h, nCells } = mesh;
  const time = decl.time && steps !== null ? { T: decl.time.final, steps, dt: decl.time.final / steps } : undefined;
  // A study's last level is its largest: the multigrid's memory is not kept for a next solve (about 300 MB after
  // 1M unknowns), but given back before the level's errors and error maps (otherwise the run's peak: P1 ladder).
  const last = env.total !== undefined && index === env.total - 1;
  // The finest level's maps (and the local-order map of the level before it) have their pixels located on the cell
  // team's worker meanwhile, and the finest cells their parents for the pair's local orders; its error file's space is
  // reserved (where.ts).
  if (last && decl.discretization.kind !== 'external' && mesh) {
    if (env.errorFiles) reserveLevelVtu(mesh, join(env.out, fileStem(decl.name)), index);
    pixelOwnersAhead(mesh);
    if (env.localOrderPair) {
      pixelOwnersAhead(env.localOrderPair.coarse.mesh);
      if (pairRefines(env.localOrderPair.coarse.h, h)) parentCellsAhead(env.localOrderPair.coarse.mesh, mesh);
    }
  }
  const running = disc.run({ decl, file, problem, index, n, mesh, time, norms, solver: last ? { ...solver, keepMemory: false } : solver, env });
  const external = decl.discretization.kind === 'external';
  // An external code meshes for itself (its discretization has read h): the mesh is let go while the level waits for
  // the code, which as a job may take hours with every level of the ladder waiting at once.
  if (external) mesh = null;
  const out = await running;
  // Whatever the discretization kept anyway (a solver of its own that was not told) goes too.
  if (last && releaseArenaMemory(startedTeam() ?? undefined)) collectGarbage();
  // One turn of the event loop, which does not turn while a level computes: I/O finished meanwhile (the reservation of
  // this level's error file) is taken in, so that the file's write starts now, beside what follows, rather than when
  // the run next waits (src/files/background-write.ts; the finest P1 level's waited 105–115 ms at the run's end).
  if (last) await new Promise((resolve) => setImmediate(resolve));
  const tWhere = performance.now();
  const cellsMesh = out.errorCells?.mesh ?? mesh;
  // The finest pair's local orders are computed on the team's worker meanwhile (the study takes them once complete).
  const pair = last ? env.localOrderPair : undefined;
  if (env.total !== undefined && index === env.total - 2 && out.errorCells && cellsMesh) warmLocalOrders(cellsMesh, out.errorCells.perCell.L2);
  const ahead = pair && cellsMesh && out.errorCells && pairRefines(pair.coarse.h, out.h ?? h)
    ? localOrdersAhead(pair, cellsMesh, out.errorCells.perCell.L2, out.h ?? h) ?? undefined : undefined;
  const where = out.errorCells && cellsMesh && env.total !== undefined
    ? recordWhere(cellsMesh, out.errorCells, { study: decl.name, index, total: env.total, h: out.h ?? h, out: env.errorFiles ? env.out : undefined, ahead })
    : {};
  if (out.errorCells) out.seconds.errors += seconds(tWhere);
  return {
    index, n, h: out.h ?? h, ...(time ? { steps: time.steps, dt: time.dt } : {}), dofs: out.dofs, cells: out.cells ?? nCells,
    errors: out.errors,
    interpolationErrors: out.interpolationErrors,
    quasiOptimality: out.quasiOptimality ?? null,
    solver: out.solver ?? null,
    ...(external ? { quantities: out.quantities } : { algebraic: out.algebraic ?? null }),
    seconds: { mesh: tMesh, ...out.seconds, total: seconds(tStart) },
    ...where,
    peakRssBytes: peakRss(),
  };
}
