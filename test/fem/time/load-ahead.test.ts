import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { singleField } from '../../../src/fem/space/space.ts';
import { assembleForm } from '../../../src/fem/form/assemble.ts';
import { sourceTerm } from '../../../src/fem/form/terms/loads.ts';
import { solveHeat, type HeatProblem } from '../../../src/fem/time/heat.ts';
import { loadAhead, LOAD_WORKER_MIN_POINTS } from '../../../src/fem/time/load-ahead.ts';
import { extrapolation } from '../../../src/fem/time/extrapolation.ts';
import { createLinearSolver } from '../../../src/linalg/solve.ts';
import type { SourceFn } from '../../../src/fem/time/load.ts';
import type { TimeMethodName } from '../../../src/fem/time/methods.ts';

// A source that moves in time and space (any smooth f serves: the tests compare two ways of computing the same
// numbers); the function used on the main thread is built from the same text the worker gets.
const fSource = '(x, y, _z, t, out) => { out[0] = Math.sin(3 * x + t) * Math.exp(y) + t * t * (1 + x * y); }';
const f = new Function(`"use strict"; return (${fSource});`)() as SourceFn;

function problem(cells: 'triangles' | 'quadrilaterals', degree: number, n = 12): HeatProblem {
  const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells });
  return {
    space: singleField('u', lagrangeSpace(mesh, degree)),
    k: (_x, _y, _z, out) => { out[0] = 1; },
    f, fSource,
    g: (x, y, _z, t, out) => { out[0] = x * Math.cos(t) + y * t; },
    gDot: (x, y, _z, t, out) => { out[0] = -x * Math.sin(t) + y; },
    u0: (x, y, _z, out) => { out[0] = x; },
    dirichletTags: mesh.tagNames,
    degrees: { stiffness: 2 * degree, mass: 2 * degree, load: 2 * degree + 3 },
  };
}

/** Index of the first entry where a and b differ as bits (−1 when none), so that one assertion covers a vector. */
const firstDifference = (a: Float64Array, b: Float64Array): number => {
  if (a.length !== b.length) return 0;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return i;
  return -1;
};

// worker: true waits for the worker to start before it asks it for a load, so what the worker assembles does not
// depend on the machine's speed. The hang timeout only catches a worker that never answers.
describe('load vectors assembled ahead on a worker thread', () => {
  it.each([['triangles', 2], ['quadrilaterals', 1]] as const)('the worker\'s F(t) on %s (degree %i) is the same bits as the generic assembly of the source term', (cells, degree) => {
    const p = problem(cells, degree);
    // Chunks of 7 cells (not a divisor of the 288 or 144 cells): both threads take several, and the last is short.
    const loads = loadAhead({ space: p.space, loadDegree: p.degrees.load, f, fSource, worker: true, chunkCells: 7 });
    try {
      const times = [0, 0.3, 1.7];
      const bad: string[] = [];
      loads.request(0, times[0]);
      for (let k = 0; k < times.length; k++) {
        const slot = (k % 2) as 0 | 1;
        const F = loads.take(slot).slice();
        if (k + 1 < times.length) loads.request((1 - slot) as 0 | 1, times[k + 1]);
        // The reference: assembleForm with sourceTerm, the generic loop every steady discretization uses.
        const t = times[k];
        const { b } = assembleForm(p.space, { matrix: [], vector: [sourceTerm(0, 1, (x, y, z, out) => f(x, y, z, t, out), p.degrees.load)] }, { matrix: false });
        const at = firstDifference(F, b);
        if (at >= 0) bad.push(`t = ${t}: entry ${at}: ${F[at]} vs ${b[at]}`);
      }
      expect(bad).toEqual([]);
      expect(loads.onWorker).toBe(times.length);
      // Which thread computed which chunks depends on timing; the sums must not.
      expect(loads.chunksHere).toBeLessThanOrEqual(times.length * loads.chunks);
    } finally {
      loads.close();
    }
  }, 600_000);

  it.each(['bdf2', 'dirk3', 'crank-nicolson'] as TimeMethodName[])('%s: a run with the worker gives the same bits as the serial run, every load from the worker', (method) => {
    const p = problem('triangles', 2);
    const steps = 6;
    const withWorker = solveHeat(p, method, 0.5, steps, { loadWorker: true, keepHistory: true });
    const serial = solveHeat(p, method, 0.5, steps, { loadWorker: false, keepHistory: true });
    const loads = method === 'dirk3' ? 3 * steps : steps + 1;
    expect(withWorker.loadsOnWorker).toBe(loads);
    expect(serial.loadsOnWorker).toBe(0);
    const differ = withWorker.history!.map((u, n) => [n, firstDifference(u, serial.history![n])]).filter(([, at]) => at >= 0);
    expect(differ).toEqual([]);
    expect(withWorker.iterations).toBe(serial.iterations);
  }, 600_000);

  it('falls back to the main thread, same bits, when the worker cannot rebuild f, when there is no text of f, and below the size threshold', () => {
    const p = problem('triangles', 1);
    const serial = solveHeat(p, 'bdf2', 0.5, 4, { loadWorker: false });
    // Not a function expression: the worker reports failure and every load is assembled here.
    const broken = solveHeat({ ...p, fSource: '(x, y, z, t, out) => {' }, 'bdf2', 0.5, 4, { loadWorker: true });
    const noText = solveHeat({ ...p, fSource: undefined }, 'bdf2', 0.5, 4, { loadWorker: true });
    // 'auto' on a 12×12 mesh: far below the threshold (288 cells × 12 points against 2^20).
    const small = solveHeat(p, 'bdf2', 0.5, 4);
    expect(288 * 12).toBeLessThan(LOAD_WORKER_MIN_POINTS);
    const runs = { broken, noText, small };
    expect(Object.values(runs).map((r) => r.loadsOnWorker)).toEqual([0, 0, 0]);
    expect(Object.entries(runs).map(([name, r]) => [name, firstDifference(r.u, serial.u)])).toEqual([['broken', -1], ['noText', -1], ['small', -1]]);
  }, 600_000);

  it('an error in f on the worker surfaces on the main thread with its own message', () => {
    const p = problem('triangles', 1);
    const throwing = '(x, y, z, t, out) => { if (t > 0.2) throw new Error("kiln sensor out of range"); out[0] = 1; }';
    const fn = new Function(`"use strict"; return (${throwing});`)() as SourceFn;
    expect(() => solveHeat({ ...p, f: fn, fSource: throwing }, 'bdf2', 0.5, 4, { loadWorker: true })).toThrow(/kiln sensor out of range/);
  }, 600_000);
});

describe('the initial guess of a step', () => {
  it('the parabola through three time levels reproduces a quadratic in time up to round-off (Lagrange interpolation is exact on polynomials of its degree)', () => {
    const n = 5;
    const v = (t: number) => Float64Array.from({ length: n }, (_, i) => (i + 1) - 2 * i * t + 0.5 * (i - 2) * t * t);
    const e = extrapolation(n, 2);
    for (const t of [0.1, 0.2, 0.3]) e.record(t, v(t));
    const out = new Float64Array(n);
    e.guess(0.4, out);
    const want = v(0.4);
    let worst = 0;
    for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(out[i] - want[i]));
    expect(worst).toBeLessThan(1e-13);
    // With one value only, the guess is that value.
    const first = extrapolation(n, 2);
    first.record(0, v(0));
    first.guess(1, out);
    expect(firstDifference(out, v(0))).toBe(-1);
  });

  it('the solver writes its solution into a given vector, the same bits as into a new one', () => {
    // A tridiagonal, symmetric positive definite matrix (diagonal 4, off-diagonals −1), large enough for the multigrid.
    const n = 6000;
    const b = Float64Array.from({ length: n }, (_, i) => Math.sin(0.01 * i));
    const rowPtr = new Int32Array(n + 1), colIdx: number[] = [], values: number[] = [];
    for (let i = 0; i < n; i++) {
      for (const j of [i - 1, i, i + 1]) if (j >= 0 && j < n) { colIdx.push(j); values.push(j === i ? 4 : -1); }
      rowPtr[i + 1] = colIdx.length;
    }
    const solver = createLinearSolver({ nRows: n, nCols: n, rowPtr, colIdx: Int32Array.from(colIdx), values: Float64Array.from(values) }, { symmetric: true, relTol: 1e-12 });
    try {
      const guess = new Float64Array(n).fill(0.25);
      const fresh = solver.solve(b, { x0: guess });
      const out = guess.slice();
      const reused = solver.solve(b, { x0: out, out });
      expect(reused.x).toBe(out);
      expect(firstDifference(reused.x, fresh.x)).toBe(-1);
      expect(reused.stats.iterations).toBe(fresh.stats.iterations);
    } finally {
      solver.dispose();
    }
  });
});

describe('a study\'s source on the worker', () => {
  it('the text of the derived source (study heat discretization) rebuilds, on a worker too, the same bits as the study data\'s own function', async () => {
    const { defineStudy, lagrange } = await import('../../../src/study/declaration.ts');
    const { rectangle } = await import('../../../src/study/domain.ts');
    const { heat } = await import('../../../src/equation/presets.ts');
    const { buildProblem } = await import('../../../src/study/problem.ts');
    const { systemData } = await import('../../../src/study/discretizations/system-data.ts');
    const { sourceText } = await import('../../../src/study/discretizations/heat.ts');
    const decl = defineStudy({
      name: 'tile-source-text', domain: rectangle([0, 1], [0, 1]), pde: heat({ k: 1 }),
      exact: 'exp(-t)*sin(pi*x)*sin(pi*y) + (x + y)*t/2 + cos(3*x*t)',
      boundary: { dirichlet: ['left', 'right', 'bottom', 'top'] }, discretization: lagrange({ degree: 2 }),
      time: { final: 0.5, stepper: 'bdf2' }, ladder: { n: [4] }, norms: ['L2'],
    });
    const derived = buildProblem(decl, 'inline').derived!;
    const own = systemData(decl.name, derived).pointInTime('source_balance');
    const text = sourceText(decl.name, derived);
    const rebuilt = new Function(`"use strict"; return (${text});`)() as SourceFn;
    const a = new Float64Array(1), b = new Float64Array(1);
    let differ = 0;
    for (let i = 0; i < 200; i++) {
      const x = (i * 0.618) % 1, y = (i * 0.377) % 1, t = i * 0.01;
      own(x, y, 0, t, a); rebuilt(x, y, 0, t, b);
      if (!Object.is(a[0], b[0])) differ++;
    }
    expect(differ).toBe(0);
    // Through the worker: its F(t) equals the serial one built on the study's own function.
    const p = problem('triangles', 2);
    const withWorker = loadAhead({ space: p.space, loadDegree: 7, f: rebuilt, fSource: text, worker: true, chunkCells: 11 });
    const serial = loadAhead({ space: p.space, loadDegree: 7, f: own, worker: false });
    try {
      withWorker.request(0, 0.3); serial.request(0, 0.3);
      expect(firstDifference(withWorker.take(0), serial.take(0))).toBe(-1);
      expect(withWorker.onWorker).toBe(1);
    } finally {
      withWorker.close(); serial.close();
    }
  }, 600_000);
});
