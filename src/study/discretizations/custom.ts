import { RungsInputError } from '../../errors.ts';
import type { CustomDiscretization } from '../declaration.ts';
import type { LevelContext } from '../context.ts';
import { seconds, type LevelDiscretization } from './types.ts';
import { measureField } from './measure-scalar.ts';

/** A user's own TypeScript discretization: solve(level) returns a discrete field, which rungs measures. */
export function customDiscretization(disc: CustomDiscretization): LevelDiscretization {
  return {
    label: disc.label,
    async run({ decl, file, problem, index, n, mesh, solver, norms }) {
      const { exact, coefficients, boundary } = problem;
      const t = performance.now();
      const ctx: LevelContext = { study: decl.name, index, n, mesh, exact: exact!, coefficients, boundary, solver };
      const out = await disc.solve(ctx);
      if (!out || typeof out !== 'object' || !out.field || typeof out.field.evaluate !== 'function') {
        throw new RungsInputError(`${file} (study '${decl.name}'): discretization.solve returned no field at level ${index + 1}; return { field } with field.evaluate(cell, points, n, values, grads)`, file);
      }
      const tSolve = seconds(t);
      const m = measureField(out.field, disc.degree, mesh, problem, norms);
      return { dofs: out.field.nDofs, ...m.output, solver: out.solver ?? null, seconds: { assemble: 0, solve: tSolve, errors: m.seconds } };
    },
  };
}
