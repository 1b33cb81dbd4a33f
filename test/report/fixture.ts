/**
 * Invented demo results for the report writers (heat spreading in a ceramic tile). The numbers are made up to look
 * like real runs: errors follow C h^p with small perturbations; rates and fits are computed here from those errors so
 * that each result is self-consistent. Nothing in here is a reference value.
 */
import type { SeriesAnalysis, Verdict } from '../../src/analysis/types.ts';
import type { SolveStats } from '../../src/linalg/types.ts';
import type { LevelResult, StudyResult } from '../../src/study/result.ts';

export interface SeriesSpec {
  name: string;
  expected: number | null;
  /** Error = constant * h^order * (1 + wobble[i]) unless `errors` is given. */
  constant: number;
  order: number;
  wobble?: number[];
  errors?: number[];
  /** Interpolation error = factor * error, when set. */
  interpolationFactor?: number;
  verdict: Verdict;
  reasons: string[];
  warnings?: string[];
  floorFrom?: number | null;
  floorKind?: 'round-off' | 'solver' | null;
  tolerance?: number;
}

export interface StudySpec {
  study: string;
  file: string;
  description: string;
  dim: number;
  n: number[];
  dofs: (n: number) => number;
  cells: (n: number) => number;
  series: SeriesSpec[];
  expectation: StudyResult['expectation'];
  asExpected: boolean;
  warnings?: string[];
  solver?: (n: number, i: number) => SolveStats;
  quasiOptimality?: boolean;
  inputs?: Record<string, unknown>;
}

// Two-sided 95% Student-t quantiles for 1..4 degrees of freedom (from memory; demo data only).
const T95 = [Number.NaN, 12.706, 4.303, 3.182, 2.776];

/** Least-squares slope of ln e against ln h over the finest `window` levels (demo numbers, not the analysis module). */
export function demoFit(h: number[], e: number[], window: number): SeriesAnalysis['fit'] {
  const first = Math.max(0, h.length - window);
  const xs = h.slice(first).map(Math.log);
  const ys = e.slice(first).map(Math.log);
  const m = xs.length;
  const mx = xs.reduce((a, b) => a + b, 0) / m;
  const my = ys.reduce((a, b) => a + b, 0) / m;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < m; i++) {
    sxx += (xs[i] - mx) ** 2;
    sxy += (xs[i] - mx) * (ys[i] - my);
  }
  const order = sxy / sxx;
  const logConstant = my - order * mx;
  let sse = 0;
  for (let i = 0; i < m; i++) sse += (ys[i] - logConstant - order * xs[i]) ** 2;
  const stderr = m > 2 ? Math.sqrt(sse / (m - 2) / sxx) : Number.NaN;
  const t = m > 2 ? T95[m - 2] : Number.POSITIVE_INFINITY;
  const ciLow = m > 2 ? order - t * stderr : Number.NEGATIVE_INFINITY;
  const ciHigh = m > 2 ? order + t * stderr : Number.POSITIVE_INFINITY;
  const levels = Array.from({ length: m }, (_, k) => first + k);
  return { order, stderr, ciLow, ciHigh, levels, logConstant };
}

function cgStats(n: number, i: number): SolveStats {
  return {
    method: 'cg',
    preconditioner: 'amg',
    iterations: 7 + i,
    relativeResidual: 4.2e-13 * (1 + 0.3 * i),
    converged: true,
    stoppedBy: 'residual',
    setupSeconds: 2e-5 * n * n,
  };
}

export function buildStudy(spec: StudySpec): StudyResult {
  const h = spec.n.map((n) => 1 / n);
  const errorsBySeries = spec.series.map((s) =>
    s.errors ?? h.map((hi, i) => s.constant * hi ** s.order * (1 + (s.wobble?.[i] ?? 0))),
  );
  const levels: LevelResult[] = spec.n.map((n, i) => {
    const errors: Record<string, number> = {};
    const interpolationErrors: Record<string, number> = {};
    spec.series.forEach((s, k) => {
      errors[s.name] = errorsBySeries[k][i];
      if (s.interpolationFactor !== undefined) interpolationErrors[s.name] = s.interpolationFactor * errorsBySeries[k][i];
    });
    const work = spec.dofs(n);
    const seconds = {
      mesh: 1.1e-6 * work,
      assemble: 4.3e-6 * work,
      solve: 6.8e-6 * work * (1 + 0.1 * i),
      errors: 2.9e-6 * work,
      total: 0,
    };
    seconds.total = seconds.mesh + seconds.assemble + seconds.solve + seconds.errors;
    const level: LevelResult = {
      index: i,
      n,
      h: h[i],
      dofs: work,
      cells: spec.cells(n),
      errors,
      solver: (spec.solver ?? cgStats)(n, i),
      seconds,
      peakRssBytes: Math.round((48 + 0.004 * work) * 1024 * 1024),
    };
    if (Object.keys(interpolationErrors).length > 0) level.interpolationErrors = interpolationErrors;
    if (spec.quasiOptimality) level.quasiOptimality = 1.0 + 0.02 / (i + 1);
    return level;
  });
  const analyses: SeriesAnalysis[] = spec.series.map((s, k) => {
    const e = errorsBySeries[k];
    const rates = e.map((ei, i) => (i === 0 ? null : Math.log(e[i - 1] / ei) / Math.log(h[i - 1] / h[i])));
    const fit = demoFit(h, e, 3);
    return {
      name: s.name,
      expected: s.expected,
      tolerance: s.tolerance ?? 0.1,
      rates,
      fit,
      floorFrom: s.floorFrom ?? null,
      floorKind: s.floorKind ?? null,
      verdict: s.verdict,
      reasons: s.reasons.map((r) => r.replace('{fit}', fit ? fit.order.toFixed(2) : 'n/a')),
      warnings: s.warnings ?? [],
    };
  });
  const total = levels.reduce((a, l) => a + l.seconds.total, 0);
  return {
    study: spec.study,
    file: spec.file,
    description: spec.description,
    dim: spec.dim,
    expectation: spec.expectation,
    levels,
    analyses,
    asExpected: spec.asExpected,
    warnings: spec.warnings ?? [],
    inputs: spec.inputs ?? { ladder: { n: spec.n }, norms: spec.series.map((s) => s.name) },
    versions: { rungs: '0.1.0', node: 'v20.20.2', 'csv-stringify': '6.9.0', 'd3-scale': '4.0.3' },
    startedAt: '2025-03-14T09:26:53.000Z',
    seconds: total + 0.05,
  };
}

const N5 = [4, 8, 16, 32, 64];
// Tile [0,2]x[0,1], 2n x n squares cut into two triangles each.
const p2Dofs = (n: number) => (4 * n + 1) * (2 * n + 1);
const p1Dofs = (n: number) => (2 * n + 1) * (n + 1);
const tileCells = (n: number) => 4 * n * n;

/** P2 on the tile: L2 ~ 0.42 h^3, H1 seminorm ~ 1.7 h^2, both on order. */
export function tileP2(): StudyResult {
  return buildStudy({
    study: 'tile-p2',
    file: 'studies/tile-p2.study.ts',
    description: 'Heat spreading in a ceramic tile, quadratic Lagrange elements',
    dim: 2,
    n: N5,
    dofs: p2Dofs,
    cells: tileCells,
    quasiOptimality: true,
    series: [
      {
        name: 'L2',
        expected: 3,
        constant: 0.42,
        order: 3,
        wobble: [0.06, 0.025, 0.01, 0.004, 0.001],
        verdict: 'on-order',
        reasons: ['fitted order {fit} within 0.1 of the expected 3 over levels 3–5'],
      },
      {
        name: 'H1semi',
        expected: 2,
        constant: 1.7,
        order: 2,
        wobble: [0.08, 0.03, 0.012, 0.004, 0.0015],
        interpolationFactor: 0.93,
        verdict: 'on-order',
        reasons: ['fitted order {fit} within 0.1 of the expected 2 over levels 3–5'],
      },
    ],
    expectation: { verdict: 'pass' },
    asExpected: true,
    inputs: {
      exact: 'exp(-x) * sin(3*y) + x*y',
      coefficients: { k: '1 + 0.25*x*y' },
      boundary: { dirichlet: ['left', 'right', 'bottom'], neumann: ['top'] },
      discretization: { kind: 'lagrange', degree: 2 },
      ladder: { n: N5 },
      norms: ['L2', 'H1semi'],
    },
  });
}

/** P1 with a seeded bug (conductivity sampled at one vertex): the L2 order drops to 1 although the study expects 2. */
export function tileP1Flawed(): StudyResult {
  return buildStudy({
    study: 'tile-p1-vertex-k',
    file: 'studies/tile-p1-vertex-k.study.ts',
    description: 'Linear elements with the conductivity sampled at one vertex per cell',
    dim: 2,
    n: N5,
    dofs: p1Dofs,
    cells: tileCells,
    series: [
      {
        name: 'L2',
        expected: 2,
        constant: 0.31,
        order: 1.02,
        wobble: [0.05, -0.02, 0.01, -0.005, 0.002],
        verdict: 'below-order',
        reasons: [
          'fitted order {fit} is below the expected 2 (tolerance 0.1)',
          'pairwise rates stay near 1 on every level, so more refinement will not help',
        ],
      },
      {
        name: 'H1semi',
        expected: 1,
        constant: 0.95,
        order: 1,
        wobble: [0.04, 0.015, 0.006, 0.002, 0.0007],
        verdict: 'on-order',
        reasons: ['fitted order {fit} within 0.1 of the expected 1 over levels 3–5'],
      },
    ],
    expectation: { verdict: 'pass' },
    asExpected: false,
    warnings: ['conductivity k is not constant per cell, yet the element samples it once per cell'],
  });
}

/** P1 patch test: the exact solution is linear, so every error sits at round-off. */
export function tileP1Patch(): StudyResult {
  return buildStudy({
    study: 'tile-p1-patch',
    file: 'studies/tile-p1-patch.study.ts',
    description: 'Patch test: u = 1 + 2x - y is reproduced by linear elements',
    dim: 2,
    n: N5,
    dofs: p1Dofs,
    cells: tileCells,
    solver: () => ({
      method: 'cholesky',
      preconditioner: 'none',
      iterations: 0,
      relativeResidual: 2.2e-16,
      converged: true,
      stoppedBy: 'direct',
    }),
    series: [
      {
        name: 'L2',
        expected: 2,
        constant: 0,
        order: 0,
        errors: [3.1e-16, 5.4e-16, 4.2e-16, 9.8e-16, 1.7e-15],
        verdict: 'exact',
        floorFrom: 0,
        floorKind: 'round-off',
        reasons: ['every error is at round-off (at most 1.7e-15): the discrete space reproduces the exact solution'],
      },
      {
        name: 'H1semi',
        expected: 1,
        constant: 0,
        order: 0,
        errors: [1.2e-15, 2.9e-15, 2.1e-15, 6.3e-15, 1.1e-14],
        verdict: 'exact',
        floorFrom: 0,
        floorKind: 'round-off',
        reasons: ['every error is at round-off (at most 1.1e-14): the discrete space reproduces the exact solution'],
      },
    ],
    expectation: { verdict: 'exact' },
    asExpected: true,
  });
}

/** L-shaped tile with a re-entrant corner: the singularity caps both orders; the study declares the flaw. */
export function lTileCorner(): StudyResult {
  return buildStudy({
    study: 'l-tile-corner',
    file: 'studies/l-tile-corner.study.ts',
    description: 'L-shaped tile, r^(2/3) sin(2θ/3) corner solution, linear elements',
    dim: 2,
    n: N5,
    dofs: (n) => (2 * n + 1) ** 2 - n * n,
    cells: (n) => 6 * n * n,
    series: [
      {
        name: 'L2',
        expected: 2,
        constant: 0.12,
        order: 4 / 3,
        wobble: [0.03, 0.01, 0.004, 0.001, 0.0004],
        verdict: 'below-order',
        reasons: ['fitted order {fit} is below the expected 2 (tolerance 0.1)'],
      },
      {
        name: 'H1semi',
        expected: 1,
        constant: 0.58,
        order: 2 / 3,
        wobble: [0.02, 0.008, 0.003, 0.001, 0.0003],
        verdict: 'below-order',
        reasons: ['fitted order {fit} is below the expected 1 (tolerance 0.1)'],
      },
    ],
    expectation: { verdict: 'below-order', flaw: 'the corner singularity limits u to H^(5/3)' },
    asExpected: true,
  });
}

/** Two levels only: the fit has no standard error and an unbounded interval (NaN and ±Infinity in the result). */
export function tileP2TwoLevels(): StudyResult {
  return buildStudy({
    study: 'tile-p2-quick',
    file: 'studies/tile-p2-quick.study.ts',
    description: 'Two-level smoke run of the quadratic tile',
    dim: 2,
    n: [8, 16],
    dofs: p2Dofs,
    cells: tileCells,
    series: [
      {
        name: 'L2',
        expected: 3,
        constant: 0.42,
        order: 3,
        wobble: [0.025, 0.01],
        verdict: 'inconclusive',
        reasons: ['two levels give a rate but no confidence interval; add a level'],
      },
    ],
    expectation: { verdict: 'pass' },
    asExpected: false,
  });
}

/** The four demo studies a report shows together. */
export function demoResults(): StudyResult[] {
  return [tileP2(), tileP1Flawed(), tileP1Patch(), lTileCorner()];
}
