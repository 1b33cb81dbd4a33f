import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { boxMesh } from '../../../src/mesh/box.ts';
import type { Mesh } from '../../../src/mesh/types.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { assembleSystem } from '../../../src/fem/assemble/system.ts';
import type { BoundarySpec, FormCoefficients } from '../../../src/fem/assemble/types.ts';
import { compileFormula } from '../../../src/exact/formula.ts';
import { cellTeam, setTeamThreads, setWorkersFirst } from '../../../src/fem/team/team.ts';
import { TEAM_MIN_CELLS } from '../../../src/fem/team/shared.ts';
import { RungsInputError } from '../../../src/errors.ts';
import { bitDifferences, useWorkerTeam } from './helpers.ts';

// The matrix and the load vector assembled by separate passes, b on a worker of the cell team while the main thread
// assembles A (src/fem/assemble/system.ts, loadAhead): each receives the same additions in the same order as in one
// pass, so both must be the one pass's bits exactly (IEEE 754-2019 §10.4: a given sequence of operations is
// reproducible; common practice, no source), whichever thread computes b.
describe('the load vector assembled ahead on a worker', () => {
  useWorkerTeam();

  // A mesh just large enough for the team (TEAM_MIN_CELLS, with parts of PART cells), coefficients a worker can
  // rebuild (compiled formulas).
  const PART = TEAM_MIN_CELLS / 2;
  const square = rectangleMesh({ x: [0, 1], y: [0, 2], nx: 128, ny: Math.ceil(TEAM_MIN_CELLS / 256), cells: 'triangles' });
  const coef2: FormCoefficients = {
    k: compileFormula('1 + x*y + 0.5*sin(y)', 'k', 2),
    c: compileFormula('2 + x', 'c', 2),
    f: compileFormula('exp(x) * sin(y + 2)', 'f', 2),
    hints: { k: null, c: 1, f: null },
  };
  const g2 = compileFormula('cos(x + 2*y)', 'g', 2);
  const cases: [string, Mesh, number, FormCoefficients, BoundarySpec][] = [
    ['P1 triangles, k, c and f, Dirichlet on two sides', square, 1, coef2, { dirichlet: { tags: ['left', 'bottom'], value: g2 } }],
    ['P2 triangles, f only, Dirichlet everywhere', square, 2, { f: coef2.f, hints: { f: null } }, { dirichlet: { tags: square.tagNames, value: g2 } }],
    ['P1 tetrahedra, k and f', boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 18, ny: 18, nz: 18, cells: 'tetrahedra' }), 1,
      { k: compileFormula('1 + x*z', 'k', 3), f: compileFormula('sin(x + y*z)', 'f', 3), hints: { k: 2, f: null } },
      { dirichlet: { tags: ['left', 'top'], value: compileFormula('x + y', 'g', 3) } }],
  ];

  it.each(cases)('%s: A and b are the one pass\'s bits, b computed by the worker', (_name, mesh, k, coef, bc) => {
    expect(mesh.nCells).toBeGreaterThanOrEqual(TEAM_MIN_CELLS);
    const space = lagrangeSpace(mesh, k);
    setTeamThreads(1);
    const onePass = assembleSystem(space, coef, bc);
    setTeamThreads(2);
    const done = cellTeam().partsElsewhere;
    const split = assembleSystem(space, coef, bc, { loadAhead: true, partCells: PART });
    expect(split.settleLoad).toBeTypeOf('function');
    split.settleLoad!();
    expect(cellTeam().partsElsewhere - done).toBe(1); // the worker assembled b
    expect([bitDifferences(split.A.values, onePass.A.values), bitDifferences(split.b, onePass.b)]).toEqual([0, 0]);
  });

  it('without a worker b is assembled here at settleLoad, the same bits; with Neumann sides or one thread, in one pass', () => {
    const [, mesh, k, coef, bc] = cases[0];
    const space = lagrangeSpace(mesh, k);
    setTeamThreads(1);
    const onePass = assembleSystem(space, coef, bc);
    expect(assembleSystem(space, coef, bc, { loadAhead: true, partCells: PART }).settleLoad).toBeUndefined();
    setTeamThreads(2);
    const neumann = assembleSystem(space, coef, { ...bc, neumann: { tags: ['right'], flux: () => 1 } }, { loadAhead: true, partCells: PART });
    expect(neumann.settleLoad).toBeUndefined();
    // The worker busy with a job that blocks until released: it cannot claim the load pass, so settleLoad makes b here.
    setWorkersFirst(false);
    const gate = new Int32Array(new SharedArrayBuffer(8));
    const blocker = cellTeam().background(new URL('./blocking-task.ts', import.meta.url).href, { gate });
    try {
      // The worker holds the blocking job (bounded: a guard against a hang only, whatever the machine's speed).
      const until = performance.now() + 120_000;
      while (Atomics.load(gate, 1) === 0 && performance.now() < until) Atomics.wait(gate, 1, 0, 50);
      expect(Atomics.load(gate, 1)).toBe(1);
      const split = assembleSystem(space, coef, bc, { loadAhead: true, partCells: PART });
      split.settleLoad!();
      expect([bitDifferences(split.A.values, onePass.A.values), bitDifferences(split.b, onePass.b)]).toEqual([0, 0]);
    } finally {
      Atomics.store(gate, 0, 1); Atomics.notify(gate, 0);
      blocker.settle();
      setWorkersFirst(true);
    }
  });

  it('a source that is not finite: the one pass\'s message (its first bad cell), from the worker\'s pass or this thread\'s', () => {
    const mesh = square;
    const f = compileFormula('log(x - 0.3)', 'f', 2); // NaN left of x = 0.3
    const k = compileFormula('1 + 0*sqrt(y - 1.5)', 'k', 2); // NaN below y = 1.5: also in this thread's matrix pass
    const msg = (threads: number, coef: FormCoefficients): string => {
      setTeamThreads(threads);
      try {
        const sys = assembleSystem(lagrangeSpace(mesh, 1), coef, { dirichlet: { tags: ['top'], value: () => 0 } }, { loadAhead: true, partCells: PART });
        sys.settleLoad?.();
      } catch (e) { return e instanceof RungsInputError ? e.message : String(e); }
      return 'none';
    };
    const onlyF = { f, hints: { f: null } }, both = { k, f, hints: { k: null, f: null } };
    expect(msg(1, onlyF)).toMatch(/^source f is NaN at quadrature point .* of cell 0;/);
    expect(msg(2, onlyF)).toBe(msg(1, onlyF));
    expect(msg(1, both)).toMatch(/ of cell 0;/);
    expect(msg(2, both)).toBe(msg(1, both));
    setTeamThreads(2);
  });
});
