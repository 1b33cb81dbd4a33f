import { join } from 'node:path';
import { RungsInputError } from '../../errors.ts';
import { runExternalLevel, levelFolder, type VtkFieldRequest } from '../../external/index.ts';
import type { ExternalDiscretization } from '../../external/types.ts';
import { externalLevelResult, type SystemMeasure } from '../external-level.ts';
import { fileStem } from '../names.ts';
import type { StudyDeclaration } from '../declaration.ts';
import type { StudyProblem } from '../problem.ts';
import { seconds, type LevelDiscretization } from './types.ts';
import { systemData } from './system-data.ts';

/** An external code run per level through its command template; its errors are read (or its solution integrated:
 *  one scalar field of today's equation, or every field of a system). */
export function externalDiscretization(disc: ExternalDiscretization): LevelDiscretization {
  return {
    label: disc.label ?? 'external code',
    async run({ decl, file, problem, index, n, mesh, time, norms, env }) {
      const { exact, coefficients } = problem;
      const system = disc.output === 'vtk' && !exact && problem.derived ? systemOf(disc, decl, problem, file) : null;
      let t = performance.now();
      const run = await runExternalLevel(disc, {
        study: decl.name, index, n, h: mesh.h, outDir: levelFolder(join(env.out, fileStem(decl.name)), index),
        norms: [...norms], quantities: decl.quantities, data: env.data, fields: system?.requests, time,
      });
      const tSolve = seconds(t);
      t = performance.now();
      const { level, quantities } = externalLevelResult(run, {
        index, n, exact: exact ?? undefined, norms, errorOptions: { k: coefficients.k, c: coefficients.c }, symmetric: problem.symmetric,
        system: system?.measure,
      });
      return {
        dofs: level.dofs, h: level.h, cells: level.cells, errors: level.errors, interpolationErrors: level.interpolationErrors, quasiOptimality: level.quasiOptimality,
        solver: level.solver, quantities,
        seconds: { assemble: 0, solve: tSolve, errors: seconds(t) },
      };
    },
  };
}

/** Taylor–Hood presets: the pressure has the velocity's (displacement's) degree − 1 (Taylor & Hood 1973). */
const TAYLOR_HOOD = new Set(['stokes', 'nearly-incompressible-elasticity']);

/** The arrays to read for each field of the pde (in its declaration order: the displacement or velocity first) and
 *  what measures them. A field's degree: declared in `fields`, else the preset's (the Taylor–Hood pressure one below
 *  the study's degree, read from the corners of the quadratic cells), else the cells' own. */
function systemOf(disc: ExternalDiscretization, decl: StudyDeclaration, problem: StudyProblem, file: string): { requests: VtkFieldRequest[]; measure: SystemMeasure } {
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
  return { requests, measure };
}
