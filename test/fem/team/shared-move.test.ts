import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { boxMesh } from '../../../src/mesh/box.ts';
import type { Mesh } from '../../../src/mesh/types.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { manufacture } from '../../../src/equation/index.ts';
import { interpolate, lagrangeField } from '../../../src/fem/field/lagrange-field.ts';
import { errorNormsOf } from '../../../src/norms/errors.ts';
import { ERROR_PART_CELLS } from '../../../src/norms/error-cells.ts';
import { cellTeam, setTeamThreads, setWorkersFirst, teamThreads } from '../../../src/fem/team/team.ts';
import { TEAM_MIN_CELLS } from '../../../src/fem/team/shared.ts';

// The cell team moves a level's mesh arrays and unknowns per cell into shared memory instead of keeping a second copy
// there (src/fem/team/mesh.ts); the mesh generators allocate large meshes there from the start
// (src/mesh/shared-arrays.ts), so the team takes their arrays as they are. The arrays must keep their values, a P1 space's cellDofs must stay its mesh's cell
// array, and the errors must be the bits of a run on one thread (IEEE 754-2019 §10.4: the same operations on the same
// values give the same bits; common practice, no source).

const isShared = (a: { buffer: ArrayBufferLike }): boolean => a.buffer instanceof SharedArrayBuffer;
const sameBits = (a: ArrayLike<number>, b: ArrayLike<number>): boolean => {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return false;
  return true;
};
const n = 130; // 33,800 triangles: two parts of ERROR_PART_CELLS
/** The same mesh with its arrays on the heap (a mesh from a file or a user's arrays): slice() copies a typed array
 *  into a plain ArrayBuffer. */
const heapMesh = (m: Mesh): Mesh => ({ ...m, coords: m.coords.slice(), cells: m.cells.slice() });

describe('a level\'s arrays moved into shared memory by the cell team', () => {
  const before = teamThreads();
  beforeAll(() => { setTeamThreads(2); setWorkersFirst(true); });
  afterAll(() => { setWorkersFirst(false); setTeamThreads(before); });
  const ms = manufacture({ dim: 2, u: 'sin(pi*x) * cos(2*y)', k: '1 + x*y' });
  const norms = (mesh: Mesh, degree: number, threads: number) => {
    setTeamThreads(threads);
    const space = lagrangeSpace(mesh, degree);
    const I = interpolate(space, ms.u);
    const U = I.map((v, i) => v * (1 + 1e-3 * Math.sin(i)));
    const e = errorNormsOf([lagrangeField(space, U), lagrangeField(space, I)], ms, { k: ms.k });
    return { space, values: e.flatMap((v) => [v.L2, v.H1semi, v.H1, v.energy, v.maxNodal]) };
  };

  it('P1: coordinates and cells move, cellDofs stays the mesh\'s cell array, values and errors the same bits', () => {
    expect(2 * n * n).toBeGreaterThan(ERROR_PART_CELLS);
    const mesh = heapMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }));
    const coords = mesh.coords.slice(), cells = mesh.cells.slice();
    const one = norms(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }), 1, 1);
    const elsewhere = cellTeam().partsElsewhere;
    const wasShared = [isShared(mesh.coords), isShared(mesh.cells)];
    const two = norms(mesh, 1, 2);
    expect(cellTeam().partsElsewhere).toBeGreaterThan(elsewhere);
    expect({
      wasShared, nowShared: [isShared(mesh.coords), isShared(mesh.cells), isShared(two.space.cellDofs)],
      cellDofsIsCells: two.space.cellDofs === mesh.cells, coords: sameBits(mesh.coords, coords), cells: sameBits(mesh.cells, cells),
      errors: sameBits(one.values, two.values),
    }).toEqual({ wasShared: [false, false], nowShared: [true, true, true], cellDofsIsCells: true, coords: true, cells: true, errors: true });
  });

  it('P2: the space\'s own cellDofs moves too; errors the same bits as on one thread', () => {
    const mesh = heapMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }));
    const one = norms(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }), 2, 1);
    const two = norms(mesh, 2, 2);
    expect({ shared: [isShared(mesh.coords), isShared(mesh.cells), isShared(two.space.cellDofs)], errors: sameBits(one.values, two.values) })
      .toEqual({ shared: [true, true, true], errors: true });
  });

  it('a frozen mesh keeps its own arrays (the copies serve the workers); errors the same bits', () => {
    const mesh = Object.freeze(heapMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' })));
    const coords = mesh.coords;
    const one = norms(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }), 1, 1);
    const elsewhere = cellTeam().partsElsewhere;
    const two = norms(mesh, 1, 2);
    expect(cellTeam().partsElsewhere).toBeGreaterThan(elsewhere);
    expect({ same: mesh.coords === coords, shared: isShared(mesh.coords), errors: sameBits(one.values, two.values) })
      .toEqual({ same: true, shared: false, errors: true });
  });

  it('generated meshes the team shares come in shared memory (taken as they are, no copy), small ones on the heap', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' });
    const box = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 18, ny: 18, nz: 18, cells: 'tetrahedra' });
    const small = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 8, cells: 'triangles' });
    const { coords, cells } = mesh;
    const one = norms(heapMesh(mesh), 1, 1);
    const two = norms(mesh, 1, 2);
    expect(box.nCells).toBeGreaterThanOrEqual(TEAM_MIN_CELLS);
    expect({
      shared: [isShared(coords), isShared(cells), isShared(box.coords), isShared(box.cells), isShared(small.coords), isShared(small.cells)],
      kept: [mesh.coords === coords, mesh.cells === cells, two.space.dofCoords === coords], errors: sameBits(one.values, two.values),
    }).toEqual({ shared: [true, true, true, true, false, false], kept: [true, true, true], errors: true });
  });

  it('an interpolant is allocated in shared memory on meshes the team shares, in plain memory below', () => {
    const big = lagrangeSpace(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }), 1);
    const small = lagrangeSpace(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 8, cells: 'triangles' }), 1);
    expect(big.mesh.nCells).toBeGreaterThanOrEqual(TEAM_MIN_CELLS);
    const I = interpolate(big, ms.u);
    let firstWrong = -1;
    for (let g = 0; g < big.nDofs && firstWrong < 0; g++) if (!Object.is(I[g], ms.u(big.dofCoords[2 * g], big.dofCoords[2 * g + 1], 0))) firstWrong = g;
    expect({ big: isShared(I), small: isShared(interpolate(small, ms.u)), firstWrong }).toEqual({ big: true, small: false, firstWrong: -1 });
  });
});
