import { ladderRungs, temporalOrder, timeAxis } from './time-ladder.ts';
import { addCrossNormReasons, analyseSeries, applyQuasiOptimality, assessQuasiOptimality } from '../analysis/index.ts';
import type { SeriesAnalysis, TwoAxisFit, Verdict } from '../analysis/types.ts';
import { axisFloorReason, detectAxisFloor, fitTwoAxis, judgeTwoAxis } from '../analysis/index.ts';
import { analyseRegions } from '../analysis/regions.ts';
import { settleBackgroundWrites } from '../files/background-write.ts';
import { localOrderMap, readLevelCellErrors, singularityTest, type LevelCellErrors } from './where.ts';
import type { NormName, StudyDeclaration } from './declaration.ts';
import { defaultNorms, expectedOrders } from './expected.ts';
import { externalFieldNorms, isGlobalNorm, isPointwiseNorm } from './discretizations/system-norms.ts';
import { normScales, normScalesAhead, type PendingScales } from './discretizations/norm-scales.ts';
import { buildProblem } from './problem.ts';
import type { LevelResult, StudyResult } from './result.ts';
import { runLevel } from './level.ts';
import { packageVersions } from './versions.ts';
import type { LoadedStudy } from './load.ts';
import type { LevelContext } from './context.ts';
import { analyseQuantity } from '../analysis/quantities.ts';
import type { QuantityReport } from '../analysis/quantities.ts';
import type { LevelEnvironment } from './level.ts';
import { join } from 'node:path';
import { studyBundle, writeStudyData } from './data-files.ts';
import { runPreflight } from './preflight.ts';
import { outputColumns } from './values-at.ts';
import { formulaText } from '../codegen/index.ts';
import { boundarySamples } from './boundary-samples.ts';
import { checkManufactured, type NeumannSamples } from '../equation/index.ts';
import { RungsInputError } from '../errors.ts';
import { fileStem } from './names.ts';

/** The norms of a scalar study that names none (systems: src/study/expected.ts defaultNorms). */
export const DEFAULT_NORMS: NormName[] = ['L2', 'H1semi'];
type StudyProblemOf = ReturnType<typeof buildProblem>;
/** The verdict's defaults, defined with the rules (src/analysis/verdict.ts). */
export { DEFAULT_FIT_WINDOW, DEFAULT_TOLERANCE } from '../analysis/verdict.ts';
import { DEFAULT_FIT_WINDOW, DEFAULT_TOLERANCE } from '../analysis/verdict.ts';
/** The Céa bound's allowance for quadrature and round-off lives with the rule (src/analysis/cea.ts). */
export { QUASI_OPTIMALITY_SLACK } from '../analysis/index.ts';
/** Verdicts a plain study passes with; above-order passes only in a norm the study declares in allow.aboveOrder. */
const ACCEPTABLE: Verdict[] = ['on-order', 'exact'];
/** Norms bounded below by the best approximation: an order above the expected one there is not a pass. */
const GLOBAL_NORMS = new Set(['L2', 'H1semi', 'H1', 'energy']);

export interface RunOptions {
  /** Run only the first `levels` levels of the ladder. */
  levels?: number;
  /** Called after each level with the result so far (to write it at once and show progress). */
  onLevel?: (partial: StudyResult, level: LevelResult) => void;
  onLevelStart?: (study: string, index: number, total: number) => void;
}

/** A study ready to run: validated, its PDE data derived, its result skeleton made. */
export interface PreparedStudy {
  loaded: LoadedStudy;
  problem: ReturnType<typeof buildProblem>;
  norms: NormName[];
  expected: Record<string, number | null>;
  /** Levels to run (the whole ladder unless limited). */
  total: number;
  env: LevelEnvironment;
  solver: LevelContext['solver'];
  result: StudyResult;
  /** Seconds spent deriving the PDE data (symbolic differentiation and checks). */
  prepareSeconds: number;
  /** The finest two levels' meshes and errors per cell, by level index, until the study completes. */
  cellErrors: Map<number, LevelCellErrors>;
  /** The norm scales being measured on the cell team's worker (levelStarting), until the study completes. */
  scalesAhead?: PendingScales | null;
}

/** Validates the PDE data and sets up the result; throws RungsInputError for bad input before any level runs. */
export function prepareStudy(loaded: LoadedStudy, opts: { levels?: number; out?: string; errorFiles?: boolean } = {}): PreparedStudy {
  const { declaration: decl, file } = loaded;
  const t0 = performance.now();
  const problem = buildProblem(decl, file);
  // Norms rungs measures need its own exact solution; an external code may report any norm it declares.
  const measurable = problem.exact !== null || (decl.discretization.kind === 'lagrange' && problem.derived !== null)
    || (externalFieldNorms(decl) !== null && problem.derived !== null);
  const norms = (measurable ? decl.norms ?? defaultNorms(decl) : decl.norms ?? []) as NormName[];
  const expected = expectedOrders(decl, norms);
  const total = Math.min(ladderRungs(decl).length, opts.levels ?? Infinity);
  const solver = solverSettings(decl);
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
    startedAt: new Date().toISOString(),
    seconds: 0,
    ...(decl.time ? { time: timeOf(decl) } : {}),
  };
  // Checks of the manufactured solution itself (Salari & Knupp 2000): terms it leaves unexercised and the like.
  result.warnings.push(...problem.warnings);
  if (problem.derived) result.warnings.push(...manufacturedWarnings(decl, problem));
  const out = opts.out ?? 'reports';
  // An external solver receives the manufactured data as code in its own language ({data}, RUNGS_DATA).
  const data = decl.discretization.kind === 'external' && problem.derived
    ? writeStudyData(join(out, fileStem(decl.name), 'data'), decl, problem)
    : undefined;
  const prepareSeconds = (performance.now() - t0) / 1e3;
  result.seconds = prepareSeconds;
  return { loaded, problem, norms, expected, total, solver, result, prepareSeconds, cellErrors: new Map(), env: { out, data, total, errorFiles: opts.errorFiles ?? false } };
}

function manufacturedWarnings(decl: StudyDeclaration, problem: ReturnType<typeof buildProblem>): string[] {
  const d = decl.discretization;
  const byEquation = problem.byName.neumann;
  const tags = [...new Set(Object.values(byEquation).flat())];
  let neumann: Record<string, NeumannSamples> | undefined;
  if (tags.length) {
    const samples = boundarySamples(decl.domain.mesh(decl.ladder.n[0]!), tags);
    // Each tag with the equations whose natural data hold there (scalar study: the one equation).
    const eqs = (t: string) => Object.entries(byEquation).filter(([, list]) => list.includes(t)).map(([e]) => e);
    neumann = Object.fromEntries(tags.map((t) => [t, { ...samples[t]!, equations: decl.pde ? eqs(t) : undefined }]));
  }
  return checkManufactured(problem.derived!, { box: decl.domain.bbox, degree: d.degree, pde: problem.pde, neumann });
}

/** The external solver's preflight check, when the study declares one: its own source and boundary data at a few
 *  points against the derived ones, before any level runs (throws RungsInputError at the first disagreement). */
export async function preflightStudy(p: PreparedStudy): Promise<void> {
  const decl = p.loaded.declaration;
  const d = decl.discretization;
  if (d.kind !== 'external' || !d.preflight) return;
  const bundle = studyBundle(decl, p.problem);
  if (!bundle) throw new RungsInputError(`${p.loaded.file} (study '${decl.name}'): discretization.preflight: needs the exact solution as formulas`, p.loaded.file);
  const { n, steps } = ladderRungs(decl)[0]!;
  const time = decl.time && steps !== null ? { steps, dt: decl.time.final / steps, T: decl.time.final } : {};
  const outcome = await runPreflight(d, bundle, join(p.env.out, fileStem(decl.name)), { study: decl.name, n, h: decl.domain.mesh(n).h, data: p.env.data, ...time });
  if (outcome) p.result.inputs.preflight = { file: outcome.file, compared: outcome.compared, seconds: outcome.seconds };
}

/** The solver settings a level receives (method, preconditioner, tolerances) from the study's declaration. */
export function solverSettings(decl: StudyDeclaration): LevelContext['solver'] {
  return {
    method: decl.solver?.method, preconditioner: decl.solver?.preconditioner,
    relTol: decl.solver?.relTol, maxIter: decl.solver?.maxIter,
  };
}

/** Called as a level starts in this thread: the finest level's start leaves the norm scales to the cell team's worker,
 *  idle while this thread meshes that level (norm-scales.ts, normScalesAhead). */
export function levelStarting(p: PreparedStudy, index: number): void {
  if (index === p.total - 1 && p.total > 1 && p.norms.length) p.scalesAhead ??= normScalesAhead(p.loaded.declaration, p.problem);
}

/** Records a finished level (levels may arrive in any order; they are kept sorted). */
export function addLevel(p: PreparedStudy, level: LevelResult): void {
  if (level.cellErrors) {
    p.cellErrors.set(level.index, level.cellErrors);
    if (level.index === p.total - 2) p.env.localOrderPair = { coarse: level.cellErrors, ...localOrderBand(p, level.cellErrors.norm) };
    delete level.cellErrors;
  }
  p.result.levels.push(level);
  p.result.levels.sort((a, b) => a.index - b.index);
  // The study's own compute time (levels may run interleaved with other studies' on a pool).
  p.result.seconds = p.prepareSeconds + p.result.levels.reduce((s, l) => s + l.seconds.total, 0);
}

/** The expected order of a norm's local orders and the tolerance of its band (one definition for the map and the
 *  computation the finest level starts ahead of it). */
function localOrderBand(p: PreparedStudy, norm: string): { expected: number | null; tolerance: number } {
  return { expected: p.expected[norm] ?? null, tolerance: p.loaded.declaration.tolerance ?? DEFAULT_TOLERANCE };
}

/** Analyses every norm once all levels are in and checks the study's expectation. */
export function completeStudy(p: PreparedStudy): StudyResult {
  const t0 = performance.now();
  if (p.norms.length) finishAnalysis(p.result, p.loaded.declaration, p.problem, p.norms, p.expected, p.scalesAhead);
  p.scalesAhead = null;
  p.result.quantities = quantityReports(p.result, p.loaded.declaration);
  // The finest level's error maps belong to the study (the report draws them), not to its row.
  const maps = p.result.levels.flatMap((l) => l.maps ?? []);
  for (const l of p.result.levels) delete l.maps;
  let coarse = p.cellErrors.get(p.total - 2), fine = p.cellErrors.get(p.total - 1);
  // A level reused by --resume comes without its cell errors (its record keeps only its row): read them back from the
  // errors.vtu the earlier run wrote, when the finest level has maps (it measured cells) and files are being written.
  if ((!coarse || !fine) && p.total >= 2 && maps.length > 0 && p.env.errorFiles) {
    const dir = join(p.env.out, fileStem(p.loaded.declaration.name));
    const back = (index: number): LevelCellErrors | undefined => {
      const level = p.result.levels.find((l) => l.index === index);
      if (!level) return undefined;
      const got = readLevelCellErrors(dir, index, level.h);
      if ('cells' in got) return got.cells;
      p.result.warnings.push(`no local orders: level ${index + 1}'s cell errors were not kept with its record, and ${got.missing}`);
      return undefined;
    };
    coarse ??= back(p.total - 2);
    if (coarse) fine ??= back(p.total - 1);
  }
  const band = coarse ? localOrderBand(p, coarse.norm) : null;
  const local = coarse && fine && band ? localOrderMap(coarse, fine, p.total - 2, band.expected, band.tolerance) : null;
  if (local) maps.push(local);
  p.cellErrors.clear();
  delete p.env.localOrderPair;
  if (maps.length) p.result.errorMaps = maps;
  p.result.asExpected = expectationMet(p.result);
  p.result.seconds += (performance.now() - t0) / 1e3;
  return p.result;
}

/** Runs a loaded study in this thread: every level, then the analysis of every norm, then the expectation check. */
export async function runStudy(loaded: LoadedStudy, opts: RunOptions = {}): Promise<StudyResult> {
  const p = prepareStudy(loaded, opts);
  await preflightStudy(p);
  const decl = loaded.declaration;
  for (let i = 0; i < p.total; i++) {
    opts.onLevelStart?.(decl.name, i, p.total);
    levelStarting(p, i);
    const level = await runLevel(decl, loaded.file, p.problem, i, p.norms, p.solver, p.env);
    addLevel(p, level);
    opts.onLevel?.(p.result, level);
  }
  const result = completeStudy(p);
  if (p.env.errorFiles) await settleBackgroundWrites(join(p.env.out, fileStem(decl.name)));
  return result;
}

function finishAnalysis(
  result: StudyResult, decl: StudyDeclaration, problem: StudyProblemOf, norms: NormName[],
  expected: Record<string, number | null>, scalesAhead: PendingScales | null | undefined,
): void {
  const levels = result.levels;
  // The size of u in each norm sets the round-off floor; an external code's own norms have none rungs can measure.
  const scaleAll = normScales(decl, problem, scalesAhead);
  const tolerance = decl.tolerance ?? DEFAULT_TOLERANCE;
  const fitWindow = decl.fitWindow ?? DEFAULT_FIT_WINDOW;

  // Floors of rungs's own discretization keep their treatment; the code under test's own residual (a custom or
  // external solve's reported stats) is a floor its setup must remove, so it goes in separately and is named.
  const builtIn = decl.discretization.kind === 'lagrange';
  // rungs integrates the norms of an external code's VTK system itself: they are its own norms, global or pointwise.
  const fieldNormsOfVtk = externalFieldNorms(decl) !== null;
  const allow = decl.allow ?? {};
  const axis = timeAxis(decl);
  if (axis === 'grid') {
    gridAnalysis(result, decl, norms, expected, tolerance);
    return;
  }
  const analyses: SeriesAnalysis[] = [];
  // Series whose errors run into the other axis's floor: that is their reason, not a pattern across norms.
  const atAxisFloor = new Set<SeriesAnalysis>();
  for (const nm of norms) {
    const scale = scaleAll[nm] ?? Number.NaN;
    // The error the solver alone could leave: the relative residual times the size of u (optimistic: the true
    // algebraic error can be κ times larger).
    const residualFloor = (l: LevelResult) => (l.solver ? l.solver.relativeResidual * (scale > 0 ? scale : 1) : null);
    const a = analyseSeries({
      name: nm,
      // A temporal ladder is fitted against Δt. On perturbed ladders the largest cell diameter jitters from level to
      // level; the dof count does not.
      h: axis === 'dt' ? levels.map((l) => l.dt!) : decl.ladder.perturb ? null : levels.map((l) => l.h),
      dofs: levels.map((l) => l.dofs),
      dim: result.dim,
      errors: levels.map((l) => l.errors[nm]),
      expected: expected[nm],
      tolerance,
      fitWindow,
      // The tied algebraic-error bound where CG gave one; for the built-in solver without one, its residual.
      floorHint: levels.map((l) => l.algebraic?.floors[nm] ?? (builtIn ? residualFloor(l) : null)),
      setupFloor: builtIn ? undefined : levels.map((l) => (l.algebraic?.floors[nm] !== undefined ? null : residualFloor(l))),
      scale: scale > 0 && Number.isFinite(scale) ? levels.map(() => scale) : undefined,
      // rungs's own norms of systems (L2_u, H1semi_u, L2_p, div_u) are global too; an external code's own names are
      // its business.
      normKind: GLOBAL_NORMS.has(nm) || ((builtIn || fieldNormsOfVtk) && isGlobalNorm(nm)) ? 'global'
        : nm === 'maxNodal' || ((builtIn || fieldNormsOfVtk) && isPointwiseNorm(nm)) ? 'pointwise' : 'other',
      allowAboveOrder: allow.aboveOrder?.[nm],
      allowFewLevels: allow.fewLevels?.[nm],
      ...(axis === 'dt' ? { axis: 'dt' as const } : {}),
    });
    if ((axis === 'dt' || axis === 'h') && addTimePitfalls(a, decl, levels, axis)) atAxisFloor.add(a);
    analyses.push(a);
  }

  // Céa's lemma in the energy norm, judged over the ladder. Left out: levels where every norm sits at round-off (the
  // ratio of two round-off errors means nothing) and levels at a solver floor in any norm (that floor has its reason).
  const atFloor = (i: number) => analyses.length > 0 && (
    analyses.every((a) => a.verdict === 'exact' || (a.floorKind === 'round-off' && a.floorFrom !== null && i >= a.floorFrom)) ||
    analyses.some((a) => (a.floorKind === 'solver' || a.floorKind === 'setup') && a.floorFrom !== null && i >= a.floorFrom));
  const cea = assessQuasiOptimality(levels.map((l) => ({ index: l.index, ratio: l.quasiOptimality, atFloor: atFloor(l.index) })));
  if (cea.broken) {
    result.warnings.push(cea.broken);
    applyQuasiOptimality(analyses, cea.broken);
  } else if (cea.note) {
    result.warnings.push(cea.note);
  }
  // The pattern across norms, mapped to likely causes.
  addCrossNormReasons(analyses);
  for (const a of atAxisFloor) a.reasons = a.reasons.filter((r) => !r.startsWith('across norms:'));
  // Where the order is lost: the errors of each boundary strip and of the interior fitted on their own
  // (src/analysis/regions.ts); on a ladder in Δt the mesh does not change, so there is nothing to compare.
  if (axis !== 'dt' && levels.length >= 2 && levels.every((l) => l.regions)) {
    result.where = [];
    // A slow strip may owe its order to a point where u is singular (a re-entrant corner): the exact solution says so.
    // Scalar steady studies only (the gradient of u at the final time of a heat study is not at hand here).
    const exact = problem.exact;
    const singularAt = exact && !decl.time ? singularityTest(exact.grad, decl.domain.dim, levels[levels.length - 1]!.h) : undefined;
    for (const a of analyses) {
      const norm = a.name === 'L2' || a.name === 'L2_u' ? 'L2' : a.name === 'H1semi' || a.name === 'H1semi_u' ? 'H1semi' : null;
      if (!norm) continue;
      const r = analyseRegions(levels.map((l) => ({ h: l.h, regions: l.regions! })), norm, a.expected, { fitWindow, tolerance, floorFrom: a.floorFrom, singularAt });
      result.where.push({ norm: a.name, analysis: r });
      if (a.verdict !== 'on-order' && a.verdict !== 'exact') a.reasons.push(`where: ${r.reason}`);
    }
  }
  result.analyses = analyses;
}

/** Verdicts that are not a pass, worst first: a clear miss, then a fit that could not decide. */
const SEVERITY: Verdict[] = ['below-order', 'above-order', 'inconclusive', 'on-order', 'exact'];

/** A two-axis design: every norm fitted jointly as e = C_h h^p + C_t Δt^q over all its (h, Δt) pairs (Kamm, Rider
 *  & Brock 2003, from memory), a verdict per order (src/analysis/two-axis.ts). The norm's analysis carries the
 *  spatial order's fit and the worse of the two verdicts, with both reasons, so that tables, the gate and JUnit
 *  treat a grid like any study; StudyResult.twoAxis keeps both fits. */
function gridAnalysis(result: StudyResult, decl: StudyDeclaration, norms: NormName[], expected: Record<string, number | null>, tolerance: number): void {
  const levels = result.levels;
  const q = temporalOrder(decl);
  result.twoAxis = [];
  result.analyses = norms.map((nm): SeriesAnalysis => {
    const errors = levels.map((l) => l.errors[nm]!);
    let fit: TwoAxisFit | null = null;
    let refusal: string | null = null;
    try {
      fit = fitTwoAxis(levels.map((l) => l.h), levels.map((l) => l.dt!), errors, { name: nm });
    } catch (err) {
      if (!(err instanceof RungsInputError)) throw err;
      refusal = err.message;
    }
    const two = judgeTwoAxis(nm, fit, { space: expected[nm] ?? null, time: q }, tolerance);
    if (refusal) two.reasons.unshift(`no joint fit: ${refusal}`);
    result.twoAxis!.push(two);
    const verdict = [two.verdict.space, two.verdict.time].sort((a, b) => SEVERITY.indexOf(a) - SEVERITY.indexOf(b))[0]!;
    return {
      name: nm, expected: expected[nm] ?? null, tolerance,
      rates: levels.map(() => null),
      fit: fit ? { order: fit.p, stderr: Number.NaN, ciLow: fit.pInterval[0], ciHigh: fit.pInterval[1], levels: levels.map((l) => l.index), logConstant: Math.log(fit.Ch) } : null,
      floorFrom: null, floorKind: null, asymptoticFrom: null,
      verdict,
      reasons: two.reasons,
      warnings: [],
    };
  });
}

/** The pitfalls of a one-axis study with time, named when they happen (Nishikawa 2023, arXiv:2305.10331): a temporal
 *  ladder whose errors run into the fixed mesh's spatial error, a spatial ladder held up by its fixed time step; and
 *  for the DIRK, the order reduction of Runge–Kutta methods of stage order 1 on parabolic problems. */
function addTimePitfalls(a: SeriesAnalysis, decl: StudyDeclaration, levels: LevelResult[], axis: 'dt' | 'h'): boolean {
  if (a.verdict === 'on-order' || a.verdict === 'exact' || a.expected === null) return false;
  const x = levels.map((l) => (axis === 'dt' ? l.dt! : l.h));
  const floor = detectAxisFloor(x, levels.map((l) => l.errors[a.name]!), a.expected, a.tolerance);
  if (floor) {
    a.reasons.unshift(axisFloorReason(axis, floor, { n: levels[0]?.n ?? undefined, steps: levels[0]?.steps }));
    return true;
  }
  // Errors that do not fall at all along one axis: with errors of both signs the norms need not behave like E + C x^r,
  // so the floor is offered as the likely cause, not asserted.
  const last = a.rates[a.rates.length - 1];
  if (last !== null && last !== undefined && last < STALL) {
    const r0 = levels[0]!;
    a.reasons.push(axis === 'dt'
      ? `a temporal ladder stops falling where it meets the spatial error of its fixed mesh (n = ${r0.n}); if the errors here are that floor, refine the mesh or take fewer, larger steps (Nishikawa 2023, arXiv:2305.10331)`
      : `a spatial ladder stops falling where it meets the temporal error of its fixed time step (${r0.steps} steps); if the errors here are that floor, take more steps (Nishikawa 2023, arXiv:2305.10331)`);
  }
  if (axis === 'dt' && decl.time?.stepper === 'dirk3' && a.verdict === 'below-order' && a.fit && a.fit.order > 1.5) {
    a.reasons.push(
      'the DIRK has stage order 1: on a parabolic problem whose boundary data move in time, or whose source and its time ' +
      'derivatives do not vanish on the boundary, it loses part of its order (order reduction; Ostermann & Roche 1992, ' +
      'Math. Comp. 59, from memory) — fixed boundary data and a compatible source show the classical order 3');
  }
  return false;
}

/** A finest rate below this is errors that no longer fall (common practice, no source). */
const STALL = 0.3;

/** What a study with time reports about its time axis (StudyResult.time). */
function timeOf(decl: StudyDeclaration): NonNullable<StudyResult['time']> {
  return {
    final: decl.time!.final,
    stepper: decl.time!.stepper ?? null,
    axis: timeAxis(decl)!,
    order: temporalOrder(decl),
    ...(decl.ladder.coupled ? { coupled: { ...decl.ladder.coupled } } : {}),
  };
}

/** Whether the verdicts are the ones the study declares: on-order or exact by default (above-order only in a norm
 *  the study declares in allow.aboveOrder); every norm exact for an 'exact' study; at least one norm with the
 *  declared verdict for a demonstration of a flaw. */
export function expectationMet(result: StudyResult): boolean {
  const exp = result.expectation.verdict;
  const analyses = result.analyses;
  if (exp === 'pass') {
    return analyses.every((a) => ACCEPTABLE.includes(a.verdict) || (a.verdict === 'above-order' && a.allowed?.aboveOrder !== undefined));
  }
  if (exp === 'exact') return analyses.length > 0 && analyses.every((a) => a.verdict === 'exact');
  return analyses.some((a) => a.verdict === exp);
}

/** Richardson extrapolation and GCI of each declared quantity over the levels that reported it. */
function quantityReports(result: StudyResult, decl: StudyDeclaration): QuantityReport[] | undefined {
  if (!decl.quantities?.length) return undefined;
  const out: QuantityReport[] = [];
  for (const q of decl.quantities) {
    const rows = result.levels.filter((l) => l.quantities && Number.isFinite(l.quantities[q]));
    if (rows.length < result.levels.length) result.warnings.push(`quantity '${q}': reported by ${rows.length} of ${result.levels.length} levels`);
    if (rows.length < 2) continue;
    const rep = analyseQuantity(q, rows.map((l) => l.h), rows.map((l) => l.quantities![q]), { expected: decl.expected?.[q] ?? null });
    out.push(rep);
  }
  return out;
}

function describeInputs(decl: StudyDeclaration, problem: ReturnType<typeof buildProblem>, norms: NormName[], expected: Record<string, number | null>): Record<string, unknown> {
  const d = decl.discretization;
  return {
    domain: decl.domain.label,
    exact: problem.exact?.formulas ?? null,
    // Every derived datum in plain infix (** for powers), as handed to external codes.
    manufactured: manufacturedFormulas(decl, problem),
    quantities: decl.quantities ?? [],
    boundary: problem.parts,
    discretization: d.kind === 'lagrange'
      ? { kind: 'lagrange', degree: d.degree, label: d.label ?? `P${d.degree}/Q${d.degree} Lagrange`, quadrature: d.quadrature ?? 'default' }
      : d.kind === 'external'
        ? { kind: 'external', command: d.command, output: d.output, degree: d.degree ?? null, label: d.label ?? null }
        : { kind: d.kind, label: d.label, degree: d.degree ?? null },
    ladder: decl.ladder,
    norms,
    expected,
    tolerance: decl.tolerance ?? DEFAULT_TOLERANCE,
    fitWindow: decl.fitWindow ?? DEFAULT_FIT_WINDOW,
    solver: decl.solver ?? {},
  };
}

function manufacturedFormulas(decl: StudyDeclaration, problem: ReturnType<typeof buildProblem>): Record<string, string> | null {
  const bundle = studyBundle(decl, problem);
  if (!bundle) return null;
  return Object.fromEntries(bundle.functions.flatMap((f) => outputColumns(f.name, f.outputs.length).map((c, i) => [c, formulaText(f.outputs[i]!, 'starstar')])));
}

/** Exit status of a run: 0 when every study's verdicts are the ones it expects, 1 otherwise. */
export function runStatus(results: StudyResult[]): 0 | 1 {
  return results.every((r) => r.asExpected) ? 0 : 1;
}
