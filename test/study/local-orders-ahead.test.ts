import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { cellTeam, setTeamThreads, setWorkersFirst } from '../../src/fem/team/team.ts';
import { taskUrl } from '../../src/files/task-url.ts';
import { adoptPixelsAhead, localOrderMap, localOrdersAhead, parentCellsAhead, pixelOwnersAhead, type LevelCellErrors } from '../../src/study/where.ts';
import { pixelOwners } from '../../src/mesh/raster.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { bitDifferences, useWorkerTeam } from '../fem/team/helpers.ts';
import { cellMeasures } from '../../src/mesh/regions.ts';

// The local orders of a study's finest pair are computed on the cell team's worker while the main thread goes on
// (src/study/where.ts, localOrdersAhead; src/fem/team/team.ts, background): the map and summary must be those the
// main thread computes itself, the worker must really have computed them, and without a worker the main thread does.
/** The same mesh as a new object (its measures not cached). */
const remade = (mesh: Mesh): Mesh => ({ ...mesh, coords: mesh.coords.slice(), cells: mesh.cells.slice() });

describe('local orders computed ahead on the cell team', () => {
  const square = { x: [0, 1], y: [0, 1] } as const;
  useWorkerTeam();

  // Cell errors of a second-order method in L2 (∫_K e² falls by 2^(2·2+2) over the four children of a cell), with a
  // spread so that the quantiles differ.
  const level = (mesh: Mesh, h: number, scale: number): LevelCellErrors =>
    ({ mesh, L2: Float64Array.from({ length: mesh.nCells }, (_, c) => scale * (1 + 0.5 * Math.sin(c))), norm: 'L2', h });
  const pairs = [
    ['nested triangles', rectangleMesh({ ...square, nx: 40, ny: 40, cells: 'triangles' }), rectangleMesh({ ...square, nx: 80, ny: 80, cells: 'triangles' })],
    ['a perturbed fine mesh (not nested: no map)', rectangleMesh({ ...square, nx: 20, ny: 20, cells: 'triangles' }), perturbMesh(rectangleMesh({ ...square, nx: 40, ny: 40, cells: 'triangles' }), { fraction: 0.3, seed: 4 })],
    ['quadrilaterals', rectangleMesh({ ...square, nx: 16, ny: 16, cells: 'quadrilaterals' }), rectangleMesh({ ...square, nx: 32, ny: 32, cells: 'quadrilaterals' })],
  ] as const;

  it.each(pairs)('%s: the worker\'s map and summary are those of this thread, with and without an expected order', (_name, coarseMesh, fineMesh) => {
    const coarse = level(coarseMesh, 2 / coarseMesh.nCells ** 0.5, 1);
    const fine = level(fineMesh, 1 / coarseMesh.nCells ** 0.5, 1 / 64);
    for (const [expected, tolerance] of [[2, 0.1], [null, 0.25]] as const) {
      const plain = localOrderMap(coarse, fine, 0, expected, tolerance);
      const done = cellTeam().partsElsewhere;
      const ahead = localOrdersAhead({ coarse, expected, tolerance }, fineMesh, fine.L2, fine.h);
      expect(ahead).not.toBeNull();
      const viaWorker = localOrderMap(coarse, { ...fine, ahead: ahead! }, 0, expected, tolerance);
      expect(cellTeam().partsElsewhere - done).toBe(1); // the worker computed it
      expect(viaWorker).toEqual(plain);
    }
  });

  it.each(pairs)('%s: with the parents located ahead (parentCellsAhead), the map and summary are again this thread\'s', (_name, coarseMesh, fineMesh) => {
    const coarse = level(coarseMesh, 2 / coarseMesh.nCells ** 0.5, 1);
    const fine = level(fineMesh, 1 / coarseMesh.nCells ** 0.5, 1 / 64);
    const plain = localOrderMap(coarse, fine, 0, 2, 0.1);
    const done = cellTeam().partsElsewhere;
    parentCellsAhead(coarseMesh, fineMesh);
    const ahead = localOrdersAhead({ coarse, expected: 2, tolerance: 0.1 }, fineMesh, fine.L2, fine.h);
    const viaWorker = localOrderMap(coarse, { ...fine, ahead: ahead! }, 0, 2, 0.1);
    expect(cellTeam().partsElsewhere - done).toBe(2); // the worker located the parents, then computed the orders
    expect(viaWorker).toEqual(plain);
    // The fine cells' measures came with the parents (adopted, in shared memory) and are those measured here.
    const adopted = cellMeasures(fineMesh);
    expect(adopted.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(bitDifferences(adopted, cellMeasures(remade(fineMesh)))).toBe(0);
  });

  it('the nested pair gives a map with a summary (the comparison above is not between two nulls)', () => {
    const [, coarseMesh, fineMesh] = pairs[0];
    const map = localOrderMap(level(coarseMesh, 1 / 40, 1), level(fineMesh, 1 / 80, 1 / 64), 0, 2, 0.1);
    expect(map?.summary?.median).toBeGreaterThan(1);
  });

  it.each([
    ['triangles', () => rectangleMesh({ x: [0, 2], y: [0, 1], nx: 60, ny: 30, cells: 'triangles' })],
    ['hexahedra (the mid-plane slice)', () => boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 8, ny: 8, nz: 8, cells: 'hexahedra' })],
  ] as const)('the pixels of a map located ahead on %s are those located here', (_name, make) => {
    const mesh = make();
    const done = cellTeam().partsElsewhere;
    pixelOwnersAhead(mesh);
    adoptPixelsAhead(mesh);
    expect(cellTeam().partsElsewhere - done).toBe(1); // the worker located them
    const here = pixelOwners(make())!; // the same mesh made again: located in this thread
    expect(here.some((c) => c >= 0)).toBe(true);
    expect(Array.from(pixelOwners(mesh)!).join()).toBe(Array.from(here).join());
  });

  it('a job no worker computes is left to this thread (settle false), and with one thread nothing is started', () => {
    setWorkersFirst(false);
    try {
      // A task module that does not exist: the worker cannot build it and claims nothing.
      const job = cellTeam().background(taskUrl(import.meta.url, 'no-such-task'), {});
      expect(job.settle()).toBe(false);
      expect(job.settle()).toBe(false); // settled once
      setTeamThreads(1);
      const [, coarseMesh, fineMesh] = pairs[0];
      const fine = level(fineMesh, 1 / 80, 1 / 64);
      expect(localOrdersAhead({ coarse: level(coarseMesh, 1 / 40, 1), expected: 2, tolerance: 0.1 }, fineMesh, fine.L2, fine.h)).toBeNull();
    } finally {
      setTeamThreads(2);
      setWorkersFirst(true);
    }
  });
});
