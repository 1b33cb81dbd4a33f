import { exactNorms } from '../../norms/errors.ts';
import { startedTeam } from '../../fem/team/team.ts';
import { sharedMesh } from '../../fem/team/mesh.ts';
import { functionText, sharedFloat64 } from '../../fem/team/shared.ts';
import { taskUrl } from '../../files/task-url.ts';
import { NORM_KEYS, type NormScalesTaskInput } from './norm-scales-task.ts';
import { fieldErrors } from '../../norms/field-errors.ts';
import type { DiscreteField } from '../../norms/types.ts';
import { solutionOf } from '../../equation/manufactured.ts';
import type { StudyDeclaration } from '../declaration.ts';
import type { StudyProblem } from '../problem.ts';
import { builtInPreset } from '../expected.ts';
import { systemData } from './system-data.ts';
import { scalarOf } from './system-common.ts';
import { externalFieldNorms } from './system-norms.ts';
import { inverseLambdaPressureNorms, shearEnergyOptions } from './mixed-elasticity.ts';

/** The quadrature degree of the norm scales: high, since u is integrated on the coarsest mesh. */
const scaleDegree = (decl: StudyDeclaration): number => 2 * (decl.discretization.degree ?? 2) + 8;

/** The norm scales of a scalar exact solution being measured on another thread (normScalesAhead). */
export interface PendingScales { take(): Record<string, number> }

const NORM_SCALES_TASK = taskUrl(import.meta.url, 'norm-scales-task');

/**
 * Starts measuring a scalar exact solution's norms on the first level's mesh on the cell team's worker: called as the
 * study's finest level starts (runner.ts), when the worker is idle while the main thread meshes that level and builds
 * its matrix pattern; normScales then takes the result instead of computing it at the study's end (45–80 ms there
 * for the P1 ladder, most of it building and polishing the degree-10 rule). The same function on the same mesh, so
 * the same bits. Null when there is no such solution, no team running, or its functions cannot go to a worker.
 */
export function normScalesAhead(decl: StudyDeclaration, problem: StudyProblem): PendingScales | null {
  const exact = problem.exact;
  const team = startedTeam();
  if (!exact || !team || team.workers === 0) return null;
  const valueAndGrad = functionText(exact.valueAndGrad);
  const u = valueAndGrad ? null : functionText(exact.u), grad = valueAndGrad ? null : functionText(exact.grad);
  if (!valueAndGrad && !(u && grad)) return null;
  const mesh = decl.domain.mesh(decl.ladder.n[0]);
  const input: NormScalesTaskInput = { mesh: sharedMesh(mesh), valueAndGrad, u, grad, degree: scaleDegree(decl), out: sharedFloat64(NORM_KEYS.length) };
  const job = team.background(NORM_SCALES_TASK, input);
  return {
    take() {
      if (!job.settle()) return exactNorms(mesh, exact, { degree: input.degree }) as unknown as Record<string, number>;
      return Object.fromEntries(NORM_KEYS.map((k, i) => [k, input.out[i]!]));
    },
  };
}

/** The size of the exact solution in each norm rungs measures (the error of the zero field), on the first level's
 *  mesh: the scale that round-off floors are judged against. Empty for an external code's own norms. `ahead`: the
 *  scalar solution's, measured on another thread (normScalesAhead). */
export function normScales(decl: StudyDeclaration, problem: StudyProblem, ahead?: PendingScales | null): Record<string, number> {
  const quadrature = scaleDegree(decl);
  if (problem.exact && ahead) return ahead.take();
  if (problem.exact) return exactNorms(decl.domain.mesh(decl.ladder.n[0]), problem.exact, { degree: quadrature }) as unknown as Record<string, number>;
  // rungs's own systems, and an external system's VTK fields measured with the same norms (a preset's fields u, p).
  const measuredHere = decl.discretization.kind === 'lagrange' || (externalFieldNorms(decl) !== null && decl.pde?.preset !== undefined);
  if (!measuredHere || !problem.derived) return {};
  const mesh = decl.domain.mesh(decl.ladder.n[0]);
  const preset = builtInPreset(decl);
  if (preset === 'nonlinear-diffusion') return exactNorms(mesh, solutionOf(problem.derived), { degree: quadrature }) as unknown as Record<string, number>;
  const data = systemData(decl.name, problem.derived);
  const zero = (components: number): DiscreteField => ({
    mesh, nDofs: 0, degree: 0, components,
    evaluate(_c, _p, n, v, g) { v.fill(0, 0, n * components); g.fill(0); },
  });
  if (preset === 'heat') {
    // The size of u at the final time; for the norms over time, of u at 0 and T (a scale for round-off, not a norm).
    const T = decl.time?.final ?? 0;
    const [e0] = fieldErrors([zero(1)], data.exact('u', 0), { degree: quadrature });
    const [eT] = fieldErrors([zero(1)], data.exact('u', T), { degree: quadrature });
    return { L2: eT.L2, H1semi: eT.H1semi, H1: eT.H1, maxNodal: Number.NaN, Linf_L2: Math.max(e0.L2, eT.L2), L2_H1: Math.sqrt(T) * Math.max(e0.H1, eT.H1) };
  }
  const u = data.exact('u');
  const opts = preset === 'linear-elasticity'
    ? { divergence: true, degree: quadrature, elasticity: { lambda: scalarOf(data.point('coef_lambda')), mu: scalarOf(data.point('coef_mu')) } }
    : preset === 'nearly-incompressible-elasticity'
      ? { divergence: true, degree: quadrature, elasticity: shearEnergyOptions(data.point('coef_mu')) }
      : { divergence: true, degree: quadrature };
  const [eu] = fieldErrors([zero(mesh.dim)], u, opts);
  const out: Record<string, number> = { L2_u: eu.L2, H1semi_u: eu.H1semi, H1_u: eu.H1, maxNodal_u: Number.NaN, div_u: eu.div ?? Number.NaN };
  if (eu.energy !== undefined) out.energy = eu.energy;
  if (preset === 'nearly-incompressible-elasticity') {
    // Mixed energy (∫ 2μ ε:ε + (1/λ) p²)^(1/2) of the exact pair, and ‖p‖ (src/study/discretizations/mixed-elasticity.ts).
    const exactP = data.exact('p');
    const [ep] = fieldErrors([zero(1)], exactP, { degree: quadrature });
    const [pw] = inverseLambdaPressureNorms([zero(1)], exactP, data.point('coef_lambda'), quadrature);
    out.L2_p = ep.L2;
    out.energy = Math.sqrt(eu.energy! * eu.energy! + pw * pw);
  }
  if (preset === 'stokes') {
    const [ep] = fieldErrors([zero(1)], data.exact('p'), { meanFree: problem.pde.meanFree?.includes('p') ?? false, degree: quadrature });
    out.L2_p = ep.L2;
  }
  return out;
}
