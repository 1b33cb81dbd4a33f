import { RungsInputError } from '../../errors.ts';
import { compileOutputs } from '../../exact/compile.ts';
import { dataBundle } from '../../equation/bundle.ts';
import { differentiate } from '../../exact/differentiate.ts';
import { lagrangeSpace } from '../../fem/dofmap/dofmap.ts';
import { interpolate, lagrangeField } from '../../fem/field/lagrange-field.ts';
import { singleField } from '../../fem/space/space.ts';
import { solveHeat } from '../../fem/time/heat.ts';
import { systemDegrees } from '../../fem/discretizations/quadrature-degrees.ts';
import { fieldErrors, type FieldNormValues } from '../../norms/field-errors.ts';
import type { MathNode } from 'mathjs';
import type { DerivedProblem } from '../../equation/derive.ts';
import type { LagrangeDiscretization } from '../declaration.ts';
import { seconds, type LevelDiscretization } from './types.ts';
import { systemData } from './system-data.ts';
import { pickNorms, refuseRobin, scalarOf } from './system-common.ts';
import { TIME_NORMS } from './system-norms.ts';
import { timeNormSums } from './time-norms.ts';
import { perCellArrays } from '../../norms/errors.ts';

/** The norms at one time level, as the study names them. */
const atTime = (v: FieldNormValues): Record<string, number> => ({ L2: v.L2, H1semi: v.H1semi, H1: v.H1, maxNodal: v.maxNodal });

/**
 * rungs's own Lagrange elements for the heat equation ∂u/∂t − ∇·(k∇u) = f, advanced from u(·, 0) to T with the
 * study's stepper in the level's number of equal steps (src/fem/time/heat.ts: the matrix M + γΔtK and its multigrid
 * set up once per level). The source, the Dirichlet data and the heat flux k∇u·n on Neumann parts are the derived ones at every time the stepper asks for
 * (non-autonomous manufactured solutions); the DIRK takes the boundary values from ∂u/∂t at its stage times.
 *
 * Norms at the final time T are those of u(T) − u_h(T). The norms over time (src/study/discretizations/system-norms.ts
 * TIME_NORMS) are measured at every time level t_0 … t_N: Linf_L2 = max_n ‖e(t_n)‖_L2 and
 * L2_H1 = (Σ_{n=1..N} Δt ‖e(t_n)‖²_H1)^(1/2).
 */
export function builtInHeat(disc: LagrangeDiscretization): LevelDiscretization {
  return {
    label: `P${disc.degree} Lagrange, heat`,
    async run({ decl, file, problem, mesh, time, norms, solver }) {
      const where = `${file} (study '${decl.name}')`;
      const derived = problem.derived;
      const stepper = decl.time?.stepper;
      if (!derived || !time || !stepper) throw new RungsInputError(`${where}: the heat equation needs the exact solution as a formula, time: { final, stepper } and a time ladder`, file);
      refuseRobin(problem, decl.name, file);
      const k = (problem.pde.preset?.args as { k?: string | number } | undefined)?.k;
      if (typeof k === 'string' && /\bt\b/.test(k)) {
        throw new RungsInputError(`${where}: pde.coefficients.k: '${k}' depends on t, and rungs's own stepper sets its matrix up once per level; give a conductivity in x, y, z only, or use an external code`, file);
      }
      const data = systemData(decl.name, derived);
      const dTags = problem.byName.dirichlet.u ?? [];
      const nTags = problem.byName.neumann.balance ?? [];
      const field = derived.fields[0]!;
      // ∂u/∂t of the exact solution, for the DIRK's stage boundary values (src/fem/time/heat.ts, gDot).
      const dudt = compileOutputs(['x', 'y', 'z', 't'], [differentiate(field.exact.c as MathNode, 't')]);
      const args = new Float64Array(4);
      const t0 = performance.now();
      const space = lagrangeSpace(mesh, disc.degree);
      const kDegree = typeof k === 'number' || k === undefined ? 0 : null;
      const deg = systemDegrees(mesh.cellKind, disc.degree, kDegree, null);
      const measureOverTime = norms.some((nm) => TIME_NORMS.includes(nm));
      const overTime = timeNormSums(time.dt);
      const exactAt = (t: number) => data.exact('u', t);
      const source = sourceText(decl.name, derived);
      const run = solveHeat({
        space: singleField('u', space),
        k: data.has('coef_k') ? data.point('coef_k') : (_x, _y, _z, out) => { out[0] = 1; },
        f: new Function(`"use strict";\nreturn (${source});`)() as (x: number, y: number, z: number, t: number, out: Float64Array) => void,
        fSource: source,
        g: data.pointInTime('exact_u'),
        u0: data.has('initial_u') ? data.point('initial_u') : data.point('exact_u', 0),
        gDot: (x, y, z, t, out) => { args[0] = x; args[1] = y; args[2] = z; args[3] = t; dudt(args, out); },
        dirichletTags: dTags,
        // Heat-flux parts: k∇u·n of the exact solution at every time F(t) is formed (the equation's flux F = k∇u).
        neumann: nTags.length ? { tags: nTags, flux: data.normalInTime('flux_balance'), degree: deg.source } : undefined,
        degrees: { stiffness: deg.gradGrad, mass: 2 * disc.degree + (mesh.cellKind === 'quadrilateral' || mesh.cellKind === 'hexahedron' ? 1 : 0), load: deg.source },
        solver,
      }, stepper, time.T, time.steps, {
        onTimeLevel: measureOverTime
          ? (step, t, u) => {
            const [e] = fieldErrors([lagrangeField(space, u)], exactAt(t));
            overTime.add(step, e);
          }
          : undefined,
      });
      const tSolve = seconds(t0);
      const t1 = performance.now();
      const exactT = exactAt(time.T);
      const uT = scalarOf(exactT.value);
      const perCell = perCellArrays(mesh.nCells);
      const uh = lagrangeField(space, run.u);
      const [e, ie] = fieldErrors([uh, lagrangeField(space, interpolate(space, uT))], exactT, { perCell });
      const over = overTime.values();
      return {
        dofs: space.nDofs,
        errors: pickNorms({ ...atTime(e!), ...over }, norms),
        interpolationErrors: pickNorms({ ...atTime(ie!), Linf_L2: Number.NaN, L2_H1: Number.NaN }, norms),
        quasiOptimality: null,
        solver: run.worst ? { ...run.worst, iterations: run.iterations, message: `${run.solves} solves over ${time.steps} steps, ${run.iterations} iterations in all` } : null,
        // Where the error lives at the final time (src/study/where.ts).
        errorCells: { perCell, field: uh, exact: uT, norms: { L2: 'L2', H1semi: 'H1semi' } },
        // Setup and the loads F(t) as assembly; the linear solves and the right-hand sides as the solve.
        seconds: { assemble: run.seconds.setup + run.seconds.load, solve: tSolve - run.seconds.setup - run.seconds.load, errors: seconds(t1) },
      };
    },
  };
}

/** The derived source of the heat equation as the text of a function (x, y, z, t, out) that a worker thread can
 *  rebuild (HeatProblem.fSource): the bundle's generated function source_balance, compiled as compileBundle compiles
 *  it (so the same operations as data.pointInTime('source_balance')), is made by the Function constructor and so
 *  closes over nothing but the globals; its text (Function.prototype.toString of such a function is its synthesized
 *  source, ECMAScript 2019 and later) is wrapped to take x, y, z, t as arguments. The main thread builds its f from
 *  the same text. */
export function sourceText(study: string, derived: DerivedProblem): string {
  const fn = dataBundle(study, derived).functions.find((g) => g.name === 'source_balance');
  if (!fn) throw new Error('internal: no generated function source_balance');
  const compiled = compileOutputs(fn.args, fn.outputs);
  const slots = fn.args.map((a, i) => `a[${i}] = ${['x', 'y', 'z', 't'].includes(a) ? a : 0};`).join(' ');
  return `((g) => { const a = new Float64Array(${fn.args.length}); return (x, y, z, t, out) => { ${slots} g(a, out); }; })(${compiled.toString()})`;
}
