/**
 * Invented results of studies with time for the report writers: transient heat in a kiln rod (1-D, [0, 1], P2 in
 * space), one per way a ladder can refine — Δt on a fixed mesh, h at a fixed Δt, a coupled path Δt = c·h^s, and a
 * two-axis (h, Δt) design. Errors are made up as C_h h^p + C_t Δt^q; the one-axis fits are computed here from them
 * (demoFit, against Δt for the ladder in Δt); the joint fits of the two-axis design are typed in. Nothing in here is
 * a reference value: the tests compute what they assert from the level data by hand.
 */
import type { SeriesAnalysis, TwoAxisAnalysis, Verdict } from '../../src/analysis/types.ts';
import type { LevelResult, StudyResult } from '../../src/study/result.ts';
import { demoFit } from './fixture.ts';

export interface TimeSeriesSpec {
  name: string;
  expected: number | null;
  error: (h: number, dt: number, i: number) => number;
  verdict: Verdict;
  reasons: string[];
}

export interface TimeStudySpec {
  study: string;
  description: string;
  time: NonNullable<StudyResult['time']>;
  rungs: { n: number; steps: number }[];
  series: TimeSeriesSpec[];
  /** The variable the one-axis analyses were fitted against; null for a two-axis design (the joint fit decides). */
  fitAgainst: 'h' | 'dt' | null;
  twoAxis?: TwoAxisAnalysis[];
  expectation?: StudyResult['expectation'];
  asExpected?: boolean;
}

/** Small wobble so that pairwise rates are not all identical (demo data only). */
const WOBBLE = [0.04, -0.02, 0.012, -0.006, 0.003, -0.0015, 0.0008, -0.0004];

export function buildTimeStudy(spec: TimeStudySpec): StudyResult {
  const T = spec.time.final;
  const levels: LevelResult[] = spec.rungs.map(({ n, steps }, i) => {
    const h = 1 / n;
    const dt = T / steps;
    const errors: Record<string, number> = {};
    for (const s of spec.series) errors[s.name] = s.error(h, dt, i);
    const work = (2 * n + 1) * steps;
    const seconds = { mesh: 1e-6 * n, assemble: 3e-6 * n, solve: 2e-6 * work, errors: 1e-6 * work, total: 0 };
    seconds.total = seconds.mesh + seconds.assemble + seconds.solve + seconds.errors;
    return {
      index: i, n, h, steps, dt, dofs: 2 * n + 1, cells: n, errors,
      solver: { method: 'cg', preconditioner: 'jacobi', iterations: 3 + i, relativeResidual: 1e-13, converged: true, stoppedBy: 'residual' },
      seconds,
    };
  });
  const analyses: SeriesAnalysis[] = spec.series.map((s) => {
    const e = levels.map((l) => l.errors[s.name]);
    const x = spec.fitAgainst === 'dt' ? levels.map((l) => l.dt!) : levels.map((l) => l.h);
    const rates = spec.fitAgainst === null
      ? levels.map(() => null)
      : e.map((ei, i) => (i === 0 ? null : Math.log(e[i - 1] / ei) / Math.log(x[i - 1] / x[i])));
    return {
      name: s.name,
      expected: s.expected,
      tolerance: 0.1,
      rates,
      fit: spec.fitAgainst === null ? null : demoFit(x, e, 3),
      floorFrom: null,
      floorKind: null,
      verdict: s.verdict,
      reasons: s.reasons,
      warnings: [],
    };
  });
  const total = levels.reduce((a, l) => a + l.seconds.total, 0);
  const result: StudyResult = {
    study: spec.study,
    file: `studies/${spec.study}.study.ts`,
    description: spec.description,
    dim: 1,
    expectation: spec.expectation ?? { verdict: 'pass' },
    levels,
    analyses,
    asExpected: spec.asExpected ?? true,
    warnings: [],
    inputs: { exact: 'exp(-t) * sin(pi*x)', time: spec.time, rungs: spec.rungs },
    versions: { rungs: '0.1.0', node: 'v20.20.2' },
    startedAt: '2025-03-14T10:02:11.000Z',
    seconds: total + 0.02,
    time: spec.time,
  };
  if (spec.twoAxis) result.twoAxis = spec.twoAxis;
  return result;
}

/** Backward Euler over T = 2 on a fixed mesh n = 64, Δt = 2/8 … 2/128: the temporal order 1. */
export function rodDt(): StudyResult {
  return buildTimeStudy({
    study: 'rod-be-dt',
    description: 'Kiln rod cooling, backward Euler, time step refined on a fixed mesh',
    time: { final: 2, stepper: 'backward-euler', axis: 'dt', order: 1 },
    rungs: [8, 16, 32, 64, 128].map((steps) => ({ n: 64, steps })),
    series: [
      { name: 'L2', expected: 1, error: (_h, dt, i) => 0.083 * dt * (1 + WOBBLE[i]), verdict: 'on-order', reasons: ['fitted order in Δt within 0.1 of the expected 1'] },
      { name: 'H1semi', expected: 1, error: (_h, dt, i) => 0.26 * dt * (1 - WOBBLE[i]), verdict: 'on-order', reasons: ['fitted order in Δt within 0.1 of the expected 1'] },
    ],
    fitAgainst: 'dt',
  });
}

/** BDF2 at Δt = 1/1024 on n = 4 … 32: the spatial order of P2 (L2 3). */
export function rodH(): StudyResult {
  return buildTimeStudy({
    study: 'rod-bdf2-h',
    description: 'Kiln rod cooling, BDF2, mesh refined at a small fixed time step',
    time: { final: 1, stepper: 'bdf2', axis: 'h', order: 2 },
    rungs: [4, 8, 16, 32].map((n) => ({ n, steps: 1024 })),
    series: [
      { name: 'L2', expected: 3, error: (h, _dt, i) => 0.021 * h ** 3 * (1 + WOBBLE[i]), verdict: 'on-order', reasons: ['fitted order within 0.1 of the expected 3'] },
    ],
    fitAgainst: 'h',
  });
}

/** Crank–Nicolson on the coupled path Δt = 0.5·h (steps = 2n over T = 1), P1 in space: one fit in h, order 2. */
export function rodCoupled(): StudyResult {
  return buildTimeStudy({
    study: 'rod-cn-coupled',
    description: 'Kiln rod cooling, Crank–Nicolson with Δt tied to h',
    time: { final: 1, stepper: 'crank-nicolson', axis: 'coupled', order: 2, coupled: { c: 0.5, exponent: 1 } },
    rungs: [4, 8, 16, 32, 64].map((n) => ({ n, steps: 2 * n })),
    series: [
      { name: 'L2', expected: 2, error: (h, dt, i) => (0.05 * h * h + 0.011 * dt * dt) * (1 + WOBBLE[i]), verdict: 'on-order', reasons: ['fitted order within 0.1 of the expected 2'] },
    ],
    fitAgainst: 'h',
  });
}

const GRID_N = [4, 8, 16, 32];
const GRID_STEPS = [4, 8, 16, 32];
/** Every (n, steps) pair, n slowest, as the study layer orders a two-axis design. */
const gridRungs = () => GRID_N.flatMap((n) => GRID_STEPS.map((steps) => ({ n, steps })));

/** The joint fits typed in for the two-axis fixtures (invented; the report only shows them). */
export const GRID_FITS = {
  L2: { p: 2.98, q: 1.01, Ch: 0.39, Ct: 0.205, pInterval: [2.91, 3.05] as [number, number], qInterval: [0.98, 1.04] as [number, number], sigma: 0.011, dof: 12, points: 16, converged: true },
  H1semi: { p: 2.02, q: 0.99, Ch: 1.52, Ct: 0.61, pInterval: [1.96, 2.08] as [number, number], qInterval: [0.95, 1.03] as [number, number], sigma: 0.014, dof: 12, points: 16, converged: true },
};

/** Backward Euler × P2 over every pair of n ∈ {4, 8, 16, 32} and steps ∈ {4, 8, 16, 32} (T = 1), both orders on order. */
export function rodGrid(): StudyResult {
  const reasonsL2 = ['p = 2.98 [2.91, 3.05] within 0.1 of the expected 3', 'q = 1.01 [0.98, 1.04] within 0.1 of the expected 1'];
  const reasonsH1 = ['p = 2.02 [1.96, 2.08] within 0.1 of the expected 2', 'q = 0.99 [0.95, 1.03] within 0.1 of the expected 1'];
  return buildTimeStudy({
    study: 'rod-be-grid',
    description: 'Kiln rod cooling, backward Euler and P2, every pair of mesh and time step',
    time: { final: 1, stepper: 'backward-euler', axis: 'grid', order: 1 },
    rungs: gridRungs(),
    series: [
      { name: 'L2', expected: 3, error: (h, dt) => 0.4 * h ** 3 + 0.2 * dt, verdict: 'on-order', reasons: reasonsL2 },
      { name: 'H1semi', expected: 2, error: (h, dt) => 1.5 * h ** 2 + 0.6 * dt, verdict: 'on-order', reasons: reasonsH1 },
    ],
    fitAgainst: null,
    twoAxis: [
      { name: 'L2', fit: GRID_FITS.L2, expected: { space: 3, time: 1 }, tolerance: 0.1, verdict: { space: 'on-order', time: 'on-order' }, reasons: reasonsL2 },
      { name: 'H1semi', fit: GRID_FITS.H1semi, expected: { space: 2, time: 1 }, tolerance: 0.1, verdict: { space: 'on-order', time: 'on-order' }, reasons: reasonsH1 },
    ],
  });
}

/** The same design declared as Crank–Nicolson (order 2) whose stepper is really first order: the temporal verdict
 *  fails in both norms, the spatial one passes. */
export function rodGridFlawed(): StudyResult {
  const r = rodGrid();
  r.study = 'rod-cn-grid-slow';
  r.file = 'studies/rod-cn-grid-slow.study.ts';
  r.description = 'Kiln rod cooling, a Crank–Nicolson that lost its second order, every pair of mesh and time step';
  r.time = { final: 1, stepper: 'crank-nicolson', axis: 'grid', order: 2 };
  r.asExpected = false;
  r.twoAxis = r.twoAxis!.map((t) => ({
    ...t,
    expected: { space: t.expected.space, time: 2 },
    verdict: { space: 'on-order', time: 'below-order' },
    reasons: [t.reasons[0], `q = ${t.name === 'L2' ? '1.01 [0.98, 1.04]' : '0.99 [0.95, 1.03]'} is below the expected 2 (tolerance 0.1)`],
  }));
  for (const a of r.analyses) {
    a.verdict = 'below-order';
    a.reasons = r.twoAxis.find((t) => t.name === a.name)!.reasons;
  }
  return r;
}

/** All time fixtures, as one run would report them. */
export function timeResults(): StudyResult[] {
  return [rodDt(), rodH(), rodCoupled(), rodGrid(), rodGridFlawed()];
}
