import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { boxMesh } from '../../../src/mesh/box.ts';
import { perturbMesh } from '../../../src/mesh/perturb.ts';
import type { Mesh } from '../../../src/mesh/types.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { assembleSystem } from '../../../src/fem/assemble/system.ts';
import type { FormCoefficients } from '../../../src/fem/assemble/types.ts';
import { cellParts } from '../../../src/fem/assemble/cell-parts.ts';
import { compileFormula } from '../../../src/exact/formula.ts';
import { manufacture } from '../../../src/equation/index.ts';
import { interpolate, lagrangeField } from '../../../src/fem/field/lagrange-field.ts';
import { errorNormsOf } from '../../../src/norms/errors.ts';
import { ERROR_PART_CELLS } from '../../../src/norms/error-cells.ts';
import { cellTeam, setTeamThreads, setWorkersFirst, teamThreads } from '../../../src/fem/team/team.ts';
import { RungsInputError } from '../../../src/errors.ts';
import { bitDifferences } from './helpers.ts';

// Coefficients as compiled formulas (what a worker can rebuild: src/fem/team/shared.ts, functionText); a vector b as
// the Function constructor makes it too.
const coef2: FormCoefficients = {
  k: compileFormula('1 + x*y + 0.5*sin(y)', 'k', 2),
  b: new Function('x', 'y', 'z', 'out', '"use strict"; out[0] = 1 + y; out[1] = -x;') as FormCoefficients['b'],
  c: compileFormula('2 + x', 'c', 2),
  f: compileFormula('exp(x) * sin(y + 2)', 'f', 2),
  hints: { k: null, b: 1, c: 1, f: null },
};
const g2 = compileFormula('cos(x + 2*y)', 'g', 2);

// Floating-point sums in the same order on the same values are the same bits (IEEE 754-2019 §10.4: a given
// sequence of operations is reproducible; common practice, no source): the fast paths and the shared assembly must
// give the reference loop's bits exactly, not nearly.
describe('the triangle fast path gives the bits of the reference cell loop', () => {
  const square = rectangleMesh({ x: [0, 1], y: [0, 2], nx: 5, ny: 4, cells: 'triangles' });
  const meshes: [string, Mesh][] = [['square', square], ['perturbed', perturbMesh(square, { fraction: 0.2, seed: 5 })]];
  for (const [name, mesh] of meshes) {
    for (const k of [1, 2, 3]) {
      it(`P${k} on the ${name} mesh: k, b, c, f, Dirichlet on two sides and a Neumann side`, () => {
        const space = lagrangeSpace(mesh, k);
        const bc = { dirichlet: { tags: ['left', 'bottom'], value: g2 }, neumann: { tags: ['top'], flux: (x: number) => 1 + x } };
        const fast = assembleSystem(space, coef2, bc);
        const ref = assembleSystem(space, coef2, bc, { reference: true });
        expect(fast.A.nRows).toBeGreaterThan(0);
        expect([bitDifferences(fast.A.values, ref.A.values), bitDifferences(fast.b, ref.b)]).toEqual([0, 0]);
      });
    }
  }
  it('keeps the reference loop\'s errors: a source that is not finite names the point and the cell', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 2, cells: 'triangles' });
    const f = (x: number) => (x > 0.6 ? NaN : 1);
    const msg = (reference: boolean): string => {
      try { assembleSystem(lagrangeSpace(mesh, 1), { f, hints: { f: null } }, {}, { reference }); } catch (e) { return e instanceof RungsInputError ? e.message : 'other'; }
      return 'none';
    };
    expect(msg(false)).toMatch(/^source f is NaN at quadrature point \(0\.\d+, 0\.\d+\) of cell \d+/);
    expect(msg(false)).toBe(msg(true));
  });
});

describe('the cell team: parts shared with a worker thread give the serial bits', () => {
  const before = teamThreads();
  beforeAll(() => {
    setTeamThreads(2);
    setWorkersFirst(true); // every job waits for the worker to claim a part: it takes part whatever the machine's speed
  });
  afterAll(() => { setWorkersFirst(false); setTeamThreads(before); });

  it('parts: every unknown owned by the part of its first cell, so every other cell holding it lies in a later part', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 6, ny: 5, cells: 'triangles' });
    const space = lagrangeSpace(mesh, 2);
    const n = space.element.nDofs;
    const cp = cellParts(mesh.nCells, n, space.cellDofs, space.nDofs, 7);
    // The first cell of each unknown, recomputed here from the definition.
    const first = new Int32Array(space.nDofs).fill(-1);
    for (let c = 0; c < mesh.nCells; c++) for (let i = 0; i < n; i++) { const g = space.cellDofs[c * n + i]; if (first[g] < 0) first[g] = c; }
    const bad: string[] = [];
    for (let g = 0; g < space.nDofs; g++) if (cp.owner[g] !== Math.floor(first[g] / 7)) bad.push(`unknown ${g}: owner ${cp.owner[g]}, first cell ${first[g]}`);
    expect(cp.parts).toBe(Math.ceil(mesh.nCells / 7));
    expect(bad).toEqual([]);
  });

  for (const [cells, k] of [['triangles', 1], ['triangles', 2], ['quadrilaterals', 2]] as const) {
    it(`assembly of P${k} on ${cells}: 1 thread and 2 threads, parts of 7 cells, the same bits`, () => {
      const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 9, ny: 8, cells });
      const space = lagrangeSpace(mesh, k);
      const bc = { dirichlet: { tags: ['left', 'top'], value: g2 } };
      setTeamThreads(1);
      const serial = assembleSystem(space, coef2, bc, { partCells: 7 });
      setTeamThreads(2);
      const elsewhere = cellTeam().partsElsewhere;
      const shared = assembleSystem(space, coef2, bc, { partCells: 7 });
      const reference = assembleSystem(space, coef2, bc, { partCells: 7, reference: true });
      expect(shared.A.values.buffer instanceof SharedArrayBuffer).toBe(true);
      expect(cellTeam().partsElsewhere).toBeGreaterThan(elsewhere);
      expect([bitDifferences(shared.A.values, serial.A.values), bitDifferences(shared.b, serial.b),
        bitDifferences(reference.A.values, serial.A.values), bitDifferences(reference.b, serial.b)]).toEqual([0, 0, 0, 0]);
    });
  }

  it('assembly of P2 on tetrahedra: the same bits on 1 and 2 threads', () => {
    const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 3, ny: 3, nz: 2, cells: 'tetrahedra' });
    const space = lagrangeSpace(mesh, 2);
    const c3: FormCoefficients = { k: compileFormula('1 + x*z', 'k', 3), f: compileFormula('sin(x + y*z)', 'f', 3), hints: { k: 2, f: null } };
    const bc = { dirichlet: { tags: ['left'], value: compileFormula('x + y', 'g', 3) } };
    setTeamThreads(1);
    const serial = assembleSystem(space, c3, bc, { partCells: 11 });
    setTeamThreads(2);
    const shared = assembleSystem(space, c3, bc, { partCells: 11 });
    expect([bitDifferences(shared.A.values, serial.A.values), bitDifferences(shared.b, serial.b)]).toEqual([0, 0]);
  });

  it('a source that is not finite: the same message as the serial assembly (its first bad cell)', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 8, cells: 'triangles' });
    const f = compileFormula('log(x - 0.3)', 'f', 2); // NaN left of x = 0.3: cells of many parts
    const msg = (threads: number): string => {
      setTeamThreads(threads);
      try { assembleSystem(lagrangeSpace(mesh, 1), { f, hints: { f: null } }, {}, { partCells: 5 }); } catch (e) { return e instanceof RungsInputError ? e.message : String(e); }
      return 'none';
    };
    const one = msg(1);
    expect(one).toMatch(/^source f is NaN at quadrature point .* of cell 0;/);
    expect(msg(2)).toBe(one);
  });

  it('errors of u_h and I_h u over two parts, with per-cell values: the same bits on 1 and 2 threads', () => {
    // 130² squares = 33800 triangles: two parts of ERROR_PART_CELLS (the second short).
    const n = 130;
    expect(2 * n * n).toBeGreaterThan(ERROR_PART_CELLS);
    const ms = manufacture({ dim: 2, u: 'sin(pi*x) * cos(2*y)', k: '1 + x*y', c: '1 + x' });
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' });
    const space = lagrangeSpace(mesh, 1);
    const I = interpolate(space, ms.u);
    const U = I.map((v, i) => v * (1 + 1e-3 * Math.sin(i)));
    const run = (threads: number) => {
      setTeamThreads(threads);
      const perCell = { L2: new Float64Array(mesh.nCells), H1semi: new Float64Array(mesh.nCells) };
      const e = errorNormsOf([lagrangeField(space, U), lagrangeField(space, I)], ms, { k: ms.k, c: ms.c, perCell });
      return { values: Float64Array.from(e.flatMap((v) => [v.L2, v.H1semi, v.H1, v.energy, v.maxNodal])), perCell };
    };
    const one = run(1);
    const elsewhere = cellTeam().partsElsewhere;
    const two = run(2);
    expect(cellTeam().partsElsewhere).toBeGreaterThan(elsewhere);
    expect([bitDifferences(one.values, two.values), bitDifferences(one.perCell.L2, two.perCell.L2),
      bitDifferences(one.perCell.H1semi, two.perCell.H1semi)]).toEqual([0, 0, 0]);
  });
});
