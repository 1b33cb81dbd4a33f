import { join } from 'node:path';
import { runExternalLevel, levelFolder } from '../../external/index.ts';
import type { ExternalDiscretization } from '../../external/types.ts';
import { externalLevelResult } from '../external-level.ts';
import { fileStem } from '../names.ts';
import { seconds, type LevelDiscretization } from './types.ts';

/** An external code run per level through its command template; its errors are read (or its solution integrated). */
export function externalDiscretization(disc: ExternalDiscretization): LevelDiscretization {
  return {
    label: disc.label ?? 'external code',
    async run({ decl, problem, index, n, mesh, norms, env }) {
      const { exact, coefficients } = problem;
      let t = performance.now();
      const run = await runExternalLevel(disc, {
        study: decl.name, index, n, h: mesh.h, outDir: levelFolder(join(env.out, fileStem(decl.name)), index),
        norms: [...norms], quantities: decl.quantities, data: env.data,
      });
      const tSolve = seconds(t);
      t = performance.now();
      const { level, quantities } = externalLevelResult(run, {
        index, n, exact: exact ?? undefined, norms, errorOptions: { k: coefficients.k, c: coefficients.c }, symmetric: problem.symmetric,
      });
      return {
        dofs: level.dofs, h: level.h, cells: level.cells, errors: level.errors, interpolationErrors: level.interpolationErrors, quasiOptimality: level.quasiOptimality,
        solver: level.solver, quantities,
        seconds: { assemble: 0, solve: tSolve, errors: seconds(t) },
      };
    },
  };
}
