import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../../src/mesh/perturb.ts';
import type { Mesh } from '../../../src/mesh/types.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { buildSparsity } from '../../../src/fem/assemble/sparsity.ts';
import { makeCellValues } from '../../../src/fem/geometry/cellvalues.ts';
import { ruleFor } from '../../../src/fem/quadrature/index.ts';
import { triangleCells } from '../../../src/fem/assemble/triangles.ts';
import { p1TriangleCells } from '../../../src/fem/assemble/p1-triangles.ts';
import { allCells, type CellLoop, type CellLoopInput } from '../../../src/fem/assemble/cell-set.ts';
import type { FormCoefficients } from '../../../src/fem/assemble/types.ts';
import { bitDifferences } from '../team/helpers.ts';

/** A cell loop's input for P1 on `mesh`: Dirichlet unknowns on the left and bottom sides (x = 0 or y = 0) with
 *  values g, the stiffness rule of degree kDegree and the load rule of degree 4; A (or null) and b (or null) fresh. */
function input(mesh: Mesh, coef: FormCoefficients, kDegree: number, withA: boolean, withB: boolean): CellLoopInput {
  const space = lagrangeSpace(mesh, 1);
  const el = space.element;
  const reduced = new Int32Array(space.nDofs);
  const dirichletValues = new Float64Array(space.nDofs);
  let nRed = 0;
  for (let v = 0; v < space.nDofs; v++) {
    const x = mesh.coords[2 * v], y = mesh.coords[2 * v + 1];
    if (x === 0 || y === 0) { reduced[v] = -1; dirichletValues[v] = Math.cos(x + 2 * y); } else reduced[v] = nRed++;
  }
  return {
    mesh, cellDofs: space.cellDofs, n: 3,
    cvK: makeCellValues(el, ruleFor('triangle', kDegree)), cvB: null, cvC: null,
    cvF: coef.f ? makeCellValues(el, ruleFor('triangle', 4)) : null,
    coef, A: withA ? buildSparsity(space, reduced, nRed) : null, b: withB ? new Float64Array(nRed) : null, reduced, dirichletValues,
  };
}

/** The same input with fresh A and b, for a second loop. */
const fresh = (p: CellLoopInput): CellLoopInput => ({
  ...p, A: p.A ? { ...p.A, values: new Float64Array(p.A.values.length) } : null, b: p.b ? new Float64Array(p.b.length) : null,
});

const never: CellLoop = () => { throw new Error('the general loop was used'); };

// Floating-point sums in the same order on the same values are the same bits (IEEE 754-2019 §10.4: a given
// sequence of operations is reproducible; common practice, no source): the P1 loop must give triangles.ts's bits.
describe('the P1 triangle loop gives the bits of the triangle loop', () => {
  const square = rectangleMesh({ x: [0, 1], y: [0, 2], nx: 7, ny: 6, cells: 'triangles' });
  const meshes: [string, Mesh][] = [['square', square], ['perturbed', perturbMesh(square, { fraction: 0.2, seed: 3 })]];
  const cases: [string, FormCoefficients, number][] = [
    ['k = 1 and f', { f: (x, y) => Math.exp(x) * Math.sin(y + 2), hints: { f: null } }, 0],
    ['a variable k and f', { k: (x, y) => 1 + x * y + 0.5 * Math.sin(y), f: (x, y) => x - y * y, hints: { k: null, f: null } }, 4],
    ['k only', { k: (x, y) => 2 + x, hints: { k: 1 } }, 2],
  ];
  for (const [name, mesh] of meshes) {
    for (const [what, coef, kDegree] of cases) {
      for (const [withA, withB] of [[true, true], [true, false]] as const) {
        it(`${name} mesh, ${what}, ${withB ? 'matrix and load vector' : 'the matrix alone'}`, () => {
          const p = input(mesh, coef, kDegree, withA, withB);
          const loop = p1TriangleCells(p, never);
          expect(loop).not.toBe(never);
          const q = fresh(p);
          loop(allCells(mesh.nCells));
          triangleCells(q)(allCells(mesh.nCells));
          const filled = p.A!.values.filter((v) => v !== 0).length;
          expect(filled).toBeGreaterThan(mesh.nVertices); // every interior row has its diagonal and neighbours
          expect([bitDifferences(p.A!.values, q.A!.values), p.b && q.b ? bitDifferences(p.b, q.b) : 0]).toEqual([0, 0]);
        });
      }
    }
  }
  it('leaves to the general loop what it does not cover: a pass without the matrix, reaction, P2, parts with owners', () => {
    const p = input(square, { f: () => 1, hints: { f: 0 } }, 0, false, true);
    expect(p1TriangleCells(p, never)).toBe(never);
    const r = input(square, { c: () => 1, f: () => 1, hints: { c: 0, f: 0 } }, 0, true, true);
    expect(p1TriangleCells({ ...r, cvC: makeCellValues(lagrangeSpace(square, 1).element, ruleFor('triangle', 2)) }, never)).toBe(never);
    const p2 = lagrangeSpace(square, 2);
    expect(p1TriangleCells({ ...input(square, {}, 0, true, true), n: 6, cellDofs: p2.cellDofs }, never)).toBe(never);
    const owned: string[] = [];
    p1TriangleCells(input(square, {}, 0, true, true), () => { owned.push('general'); })({ c0: 0, c1: 4, owner: new Int32Array(square.nVertices), part: 0, defer: null });
    expect(owned).toEqual(['general']);
  });
  it('refuses an inverted triangle and a source that is not finite as the triangle loop does', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 2, cells: 'triangles' });
    const cells = mesh.cells.slice();
    [cells[3 * 2 + 1], cells[3 * 2 + 2]] = [cells[3 * 2 + 2], cells[3 * 2 + 1]];
    const bad = { ...mesh, cells };
    const message = (run: () => void): string => { try { run(); } catch (e) { return (e as Error).message; } return 'none'; };
    const pInv = input(bad, {}, 0, true, true);
    const inverted = message(() => p1TriangleCells({ ...pInv, cellDofs: bad.cells }, never)(allCells(bad.nCells)));
    expect(inverted).toMatch(/cell 2/);
    expect(inverted).toBe(message(() => triangleCells({ ...fresh(pInv), cellDofs: bad.cells })(allCells(bad.nCells))));
    const f = (x: number) => (x > 0.6 ? NaN : 1);
    const pNaN = input(mesh, { f, hints: { f: null } }, 0, true, true);
    const nan = message(() => p1TriangleCells(pNaN, never)(allCells(mesh.nCells)));
    expect(nan).toMatch(/^source f is NaN at quadrature point \(0\.\d+, 0\.\d+\) of cell \d+/);
    expect(nan).toBe(message(() => triangleCells(fresh(pNaN))(allCells(mesh.nCells))));
  });
});
