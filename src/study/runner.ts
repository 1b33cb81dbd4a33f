import { analyseSeries } from '../analysis/index.ts';
import type { SeriesAnalysis, Verdict } from '../analysis/types.ts';
import { exactNorms } from '../norms/errors.ts';
import type { NormName, StudyDeclaration } from './declaration.ts';
import { expectedOrders } from './expected.ts';
import { buildProblem } from './problem.ts';
import type { LevelResult, StudyResult } from './result.ts';
import { runLevel } from './level.ts';
import { packageVersions } from './versions.ts';
import type { LoadedStudy } from './load.ts';

export const DEFAULT_NORMS: NormName[] = ['L2', 'H1semi'];
export const DEFAULT_TOLERANCE = 0.1;
export const DEFAULT_FIT_WINDOW = 3;
/** A level whose energy error exceeds the interpolation error by more than this factor breaks the Céa bound
 *  ||u − u_h||_E ≤ ||u − I_h u||_E beyond what quadrature of smooth data explains (common practice, no source). */
export const QUASI_OPTIMALITY_SLACK = 1e-3;
const ACCEPTABLE: Verdict[] = ['on-order', 'exact', 'above-order'];

export interface RunOptions {
  /** Run only the first `levels` levels of the ladder. */
  levels?: number;
  /** Called after each level with the result so far (to write it at once and show progress). */
  onLevel?: (partial: StudyResult, level: LevelResult) => void;
  onLevelStart?: (study: string, index: number, total: number) => void;
}

/** Runs a loaded study: every level, then the analysis of every norm, then the expectation check. */
export async function runStudy(loaded: LoadedStudy, opts: RunOptions = {}): Promise<StudyResult> {
  const { declaration: decl, file } = loaded;
  const t0 = performance.now();
  const startedAt = new Date().toISOString();
  const problem = buildProblem(decl, file);
  const norms = decl.norms ?? DEFAULT_NORMS;
  const expected = expectedOrders(decl, norms);
  const total = Math.min(decl.ladder.n.length, opts.levels ?? Infinity);
  const solver = {
    method: decl.solver?.method, preconditioner: decl.solver?.preconditioner,
    relTol: decl.solver?.relTol, maxIter: decl.solver?.maxIter,
  };
  const result: StudyResult = {
    study: decl.name,
    file,
    description: decl.description,
    dim: decl.domain.dim,
    expectation: decl.expect ? { verdict: decl.expect.verdict, flaw: decl.expect.flaw } : { verdict: 'pass' },
    levels: [],
    analyses: [],
    asExpected: false,
    warnings: [],
    inputs: describeInputs(decl, problem, norms, expected),
    versions: packageVersions(),
    startedAt,
    seconds: 0,
  };
  for (let i = 0; i < total; i++) {
    opts.onLevelStart?.(decl.name, i, total);
    const level = await runLevel(decl, file, problem, i, norms, solver);
    result.levels.push(level);
    result.seconds = (performance.now() - t0) / 1e3;
    opts.onLevel?.(result, level);
  }
  finishAnalysis(result, decl, problem.exact, norms, expected);
  result.seconds = (performance.now() - t0) / 1e3;
  return result;
}

function finishAnalysis(
  result: StudyResult, decl: StudyDeclaration, exact: Parameters<typeof exactNorms>[1], norms: NormName[],
  expected: Record<string, number | null>,
): void {
  const levels = result.levels;
  const coarse = decl.domain.mesh(decl.ladder.n[0]);
  const degree = decl.discretization.degree ?? 2;
  const scaleAll = exactNorms(coarse, exact, { degree: 2 * degree + 8 });
  const tolerance = decl.tolerance ?? DEFAULT_TOLERANCE;
  const fitWindow = decl.fitWindow ?? DEFAULT_FIT_WINDOW;

  // Céa's lemma in the energy norm: flag levels where the discrete solution is further from u than I_h u.
  const cea = levels.filter((l) => l.quasiOptimality != null && l.quasiOptimality > 1 + QUASI_OPTIMALITY_SLACK);
  const ceaReason = cea.length
    ? `Céa bound broken at level${cea.length > 1 ? 's' : ''} ${cea.map((l) => l.index + 1).join(', ')}: energy error up to ` +
      `${Math.max(...cea.map((l) => l.quasiOptimality!)).toFixed(2)}× the interpolation error, which a consistent Galerkin ` +
      'method cannot exceed — the discrete problem is not the PDE (check boundary data, load and quadrature)'
    : null;
  if (ceaReason) result.warnings.push(ceaReason);

  const analyses: SeriesAnalysis[] = [];
  for (const nm of norms) {
    const scale = scaleAll[nm as keyof typeof scaleAll];
    const a = analyseSeries({
      name: nm,
      // On perturbed ladders the largest cell diameter jitters from level to level; the dof count does not.
      h: decl.ladder.perturb ? null : levels.map((l) => l.h),
      dofs: levels.map((l) => l.dofs),
      dim: result.dim,
      errors: levels.map((l) => l.errors[nm]),
      expected: expected[nm],
      tolerance,
      fitWindow,
      floorHint: levels.map((l) => (l.solver ? l.solver.relativeResidual * (scale > 0 ? scale : 1) : null)),
      scale: scale > 0 && Number.isFinite(scale) ? levels.map(() => scale) : undefined,
    });
    if (ceaReason && a.verdict !== 'on-order' && a.verdict !== 'exact') a.reasons.push(ceaReason);
    analyses.push(a);
  }
  result.analyses = analyses;
  const exp = result.expectation.verdict;
  result.asExpected = exp === 'pass'
    ? analyses.every((a) => ACCEPTABLE.includes(a.verdict))
    : exp === 'exact' ? analyses.every((a) => a.verdict === 'exact') : analyses.some((a) => a.verdict === exp);
}

function describeInputs(decl: StudyDeclaration, problem: ReturnType<typeof buildProblem>, norms: NormName[], expected: Record<string, number | null>): Record<string, unknown> {
  const d = decl.discretization;
  return {
    domain: decl.domain.label,
    exact: problem.exact.formulas,
    boundary: problem.parts,
    discretization: d.kind === 'lagrange'
      ? { kind: 'lagrange', degree: d.degree, label: d.label ?? `P${d.degree}/Q${d.degree} Lagrange`, quadrature: d.quadrature ?? 'default' }
      : { kind: d.kind, label: d.label, degree: d.degree ?? null },
    ladder: decl.ladder,
    norms,
    expected,
    tolerance: decl.tolerance ?? DEFAULT_TOLERANCE,
    fitWindow: decl.fitWindow ?? DEFAULT_FIT_WINDOW,
    solver: decl.solver ?? {},
  };
}

/** Exit status of a run: 0 when every study's verdicts are the ones it expects, 1 otherwise. */
export function runStatus(results: StudyResult[]): 0 | 1 {
  return results.every((r) => r.asExpected) ? 0 : 1;
}
