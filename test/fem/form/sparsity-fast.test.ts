import { describe, expect, it } from 'vitest';
import { boxMesh } from '../../../src/mesh/box.ts';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { mixedSpace, vectorSpace } from '../../../src/fem/space/space.ts';
import { patternOfCells } from '../../../src/fem/assemble/sparsity.ts';
import { sparsityOfCells } from '../../../src/fem/form/sparsity.ts';
import type { Csr } from '../../../src/linalg/types.ts';

/** The pattern by definition: row r holds every (renumbered) unknown that shares a cell with r, sorted; from sets. */
function patternBySets(nCells: number, nLoc: number, cellDofs: Int32Array, reduced: Int32Array | null, nRows: number): number[][] {
  const rows = Array.from({ length: nRows }, () => new Set<number>());
  for (let c = 0; c < nCells; c++) {
    for (let i = 0; i < nLoc; i++) {
      const r = reduced ? reduced[cellDofs[c * nLoc + i]] : cellDofs[c * nLoc + i];
      if (r < 0) continue;
      for (let j = 0; j < nLoc; j++) {
        const col = reduced ? reduced[cellDofs[c * nLoc + j]] : cellDofs[c * nLoc + j];
        if (col >= 0) rows[r].add(col);
      }
    }
  }
  return rows.map((s) => [...s].sort((a, b) => a - b));
}

function rowsOf(A: Csr): number[][] {
  return Array.from({ length: A.nRows }, (_, r) => Array.from(A.colIdx.subarray(A.rowPtr[r], A.rowPtr[r + 1])));
}

// The definition of the pattern (an entry for every pair of unknowns of a cell) is the reference; common practice,
// no source.
describe('the cell-coupling pattern (one pass into a bounded buffer, or counted first)', () => {
  const cases = [
    { name: 'P2 triangles', space: lagrangeSpace(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 5, ny: 4, cells: 'triangles' }), 2) },
    { name: 'P1 tetrahedra', space: lagrangeSpace(boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 3, ny: 2, nz: 3, cells: 'tetrahedra' }), 1) },
    { name: 'Q2 quadrilaterals', space: lagrangeSpace(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 3, ny: 3, cells: 'quadrilaterals' }), 2) },
  ];
  for (const { name, space } of cases) {
    const nLoc = space.element.nDofs, nCells = space.mesh.nCells;
    // Every third dof eliminated.
    const reduced = new Int32Array(space.nDofs);
    let m = 0;
    for (let g = 0; g < space.nDofs; g++) reduced[g] = g % 3 === 1 ? -1 : m++;
    for (const [mode, maxEntries] of [['one pass', undefined], ['two passes', 0]] as const) {
      it(`${name}, ${mode}: rows as by definition, values zero`, () => {
        const full = patternOfCells(space.nDofs, nCells, nLoc, space.cellDofs, null, space.nDofs, maxEntries);
        const red = patternOfCells(space.nDofs, nCells, nLoc, space.cellDofs, reduced, m, maxEntries);
        expect(rowsOf(full)).toEqual(patternBySets(nCells, nLoc, space.cellDofs, null, space.nDofs));
        expect(rowsOf(red)).toEqual(patternBySets(nCells, nLoc, space.cellDofs, reduced, m));
        for (const A of [full, red]) {
          expect(A.colIdx.length).toBe(A.rowPtr[A.nRows]);
          expect(A.values.length).toBe(A.rowPtr[A.nRows]);
          // The values may lie on the pages the adjacency used: all must read zero.
          expect(A.values.every((v) => Object.is(v, 0))).toBe(true);
        }
      });
    }
  }
  it('a mixed space (vector P2 and P1): every unknown of a cell coupled to every other one', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 3, ny: 2, cells: 'triangles' });
    const space = mixedSpace([{ name: 'u', space: vectorSpace(lagrangeSpace(mesh, 2), 2) }, { name: 'p', space: vectorSpace(lagrangeSpace(mesh, 1), 1) }]);
    const A = sparsityOfCells(space.nDofs, mesh.nCells, space.nLocal, space.cellDofs);
    expect(rowsOf(A)).toEqual(patternBySets(mesh.nCells, space.nLocal, space.cellDofs, null, space.nDofs));
    expect(A.values.every((v) => Object.is(v, 0))).toBe(true);
  });
});
