import { join } from 'node:path';
import { RungsInputError } from '../../errors.ts';
import { runExternalLevel, levelFolder, type VtkFieldRequest } from '../../external/index.ts';
import type { ExternalDiscretization } from '../../external/types.ts';
import { externalLevelResult, type SeriesMeasure, type SystemMeasure } from '../external-level.ts';
import { fileStem } from '../names.ts';
import type { StudyDeclaration } from '../declaration.ts';
import type { StudyProblem } from '../problem.ts';
import { seconds, type LevelDiscretization, type LevelInput, type LevelOutput } from './types.ts';
import { systemData } from './system-data.ts';
import { TIME_NORMS } from './system-norms.ts';

/** An external code run per level through its command template; its errors are read (or its solution integrated:
 *  one scalar field of today's equation, or every field of a system; in a study with time the solution at T, and for
 *  the norms over time every time level of a lone scalar field, one VTK file each). */
export function externalDiscretization(disc: ExternalDiscretization): LevelDiscretization {
  return {
    label: disc.label ?? 'external code',
    // Not async itself: the code meshes for itself and only the level's h is read here, so that the wait for the code
    // (hours, as a job, every level of the ladder at once) holds no reference to the runner's mesh.
    run({ mesh, ...rest }) {
      return runExternal(disc, rest, mesh.h);
    },
  };
}

/** One external level, from the level's input without its mesh. */
async function runExternal(disc: ExternalDiscretization, { decl, file, problem, index, n, time, norms, env }: Omit<LevelInput, 'mesh'>, h: number): Promise<LevelOutput> {
  const { exact, coefficients } = problem;
  const system = disc.output === 'vtk' && !exact && problem.derived ? systemOf(disc, decl, problem, file) : null;
  let t = performance.now();
  const input = {
    study: decl.name, index, n, h, outDir: levelFolder(join(env.out, fileStem(decl.name)), index),
    norms: [...norms], quantities: decl.quantities, data: env.data, fields: system?.requests, time,
  };
  const run = await runExternalLevel(disc, input, env.levelRunner?.(disc, input));
  const tSolve = seconds(t);
  t = performance.now();
  // The norms over time: the code's series of VTK files, one per time level (src/external/output.ts SERIES_FILE).
  const overTime: SeriesMeasure | undefined = system?.exactAt && time && norms.some((nm) => TIME_NORMS.includes(nm))
    ? {
      steps: time.steps, dt: time.dt, exactAt: system.exactAt,
      read: { level: { study: decl.name, index, n }, degree: disc.degree, fields: system.requests, maxOutputBytes: disc.maxOutputBytes },
    }
    : undefined;
  const { level, quantities, errorCells } = externalLevelResult(run, {
    index, n, exact: exact ?? undefined, norms, errorOptions: { k: coefficients.k, c: coefficients.c }, symmetric: problem.symmetric,
    system: system?.measure, overTime,
  });
  return {
    dofs: level.dofs, h: level.h, cells: level.cells, errors: level.errors, interpolationErrors: level.interpolationErrors, quasiOptimality: level.quasiOptimality,
    solver: level.solver, quantities, errorCells,
    seconds: { assemble: 0, solve: tSolve, errors: seconds(t) },
  };
}

/** Taylor–Hood presets: the pressure has the velocity's (displacement's) degree − 1 (Taylor & Hood 1973). */
const TAYLOR_HOOD = new Set(['stokes', 'nearly-incompressible-elasticity']);

/** The arrays to read for each field of the pde (in its declaration order: the displacement or velocity first) and
 *  what measures them. A field's degree: declared in `fields`, else the preset's (the Taylor–Hood pressure one below
 *  the study's degree, read from the corners of the quadratic cells), else the cells' own. */
function systemOf(disc: ExternalDiscretization, decl: StudyDeclaration, problem: StudyProblem, file: string): {
  requests: VtkFieldRequest[]; measure: SystemMeasure; exactAt?: SeriesMeasure['exactAt'];
} {
  const derived = problem.derived!;
  const where = `${file} (study '${decl.name}')`;
  const preset = problem.pde.preset?.name;
  const kinds = problem.pde.fields;
  const names = Object.keys(kinds);
  const lone = names.length === 1 && kinds[names[0]!] === 'scalar';
  const requests: VtkFieldRequest[] = names.map((f) => {
    const given = disc.fields?.[f];
    const array = typeof given === 'string' ? given : given?.array ?? (lone ? disc.field : undefined);
    let degree = typeof given === 'object' ? given.degree : undefined;
    if (degree === undefined && f === 'p' && TAYLOR_HOOD.has(preset ?? '') && disc.degree !== undefined) degree = disc.degree - 1;
    if (degree !== undefined && degree < 1) {
      throw new RungsInputError(`${where}: discretization.degree: Taylor–Hood needs a velocity degree of at least 2 (the pressure takes degree − 1); got ${disc.degree}`, file);
    }
    return { name: f, kind: kinds[f]!, array, degree };
  });
  const data = systemData(decl.name, derived);
  const elastic = preset === 'linear-elasticity' || preset === 'nearly-incompressible-elasticity';
  const measure: SystemMeasure = {
    // A solution in time is the code's at the final time T, measured against u(·, T).
    exact: Object.fromEntries(names.map((f) => [f, data.exact(f, decl.time?.final ?? 0)])),
    meanFree: problem.pde.meanFree ?? [],
    preset,
    lone,
    lambda: elastic ? data.point('coef_lambda') : undefined,
    mu: elastic ? data.point('coef_mu') : undefined,
  };
  // A lone scalar field of a study with time: u(·, t) at each time level of the code's series.
  const exactAt = lone && decl.time ? (t: number) => data.exact(names[0]!, t) : undefined;
  return { requests, measure, exactAt };
}
