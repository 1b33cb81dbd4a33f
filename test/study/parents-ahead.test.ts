import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { parentCells } from '../../src/mesh/nesting.ts';
import { cellTeam, setTeamThreads, setWorkersFirst, teamThreads } from '../../src/fem/team/team.ts';
import { taskUrl } from '../../src/files/task-url.ts';
import { localOrderMap, parentCellsAhead, type LevelCellErrors } from '../../src/study/where.ts';

// The finest level's cells are located in the level before it on the cell team's worker while the main thread goes
// on (src/study/where.ts, parentCellsAhead; src/fem/team/team.ts, background): the parents must be those the main
// thread finds itself, the worker must really have computed them, and without a worker the main thread computes them.
describe('parent cells located ahead on the cell team', () => {
  const square = { x: [0, 1], y: [0, 1] } as const;
  const before = teamThreads();
  beforeAll(() => {
    setTeamThreads(2);
    setWorkersFirst(true); // settle() waits until the worker has claimed the job, whatever the machine's speed
    cellTeam().warm();
  });
  afterAll(() => { setWorkersFirst(false); setTeamThreads(before); });

  const pairs = [
    ['nested triangles', rectangleMesh({ ...square, nx: 40, ny: 40, cells: 'triangles' }), rectangleMesh({ ...square, nx: 80, ny: 80, cells: 'triangles' })],
    ['a perturbed fine mesh (not nested)', rectangleMesh({ ...square, nx: 20, ny: 20, cells: 'triangles' }), perturbMesh(rectangleMesh({ ...square, nx: 40, ny: 40, cells: 'triangles' }), { fraction: 0.3, seed: 4 })],
    ['quadrilaterals', rectangleMesh({ ...square, nx: 16, ny: 16, cells: 'quadrilaterals' }), rectangleMesh({ ...square, nx: 32, ny: 32, cells: 'quadrilaterals' })],
  ] as const;

  it.each(pairs)('%s: the worker\'s parents are those of this thread', (_name, coarse, fine) => {
    const here = parentCells(coarse, fine);
    const done = cellTeam().partsElsewhere;
    const pending = parentCellsAhead(coarse, fine);
    expect(pending).not.toBeNull();
    const got = pending!.take();
    expect(cellTeam().partsElsewhere - done).toBe(1); // the worker computed it
    expect([got.nested, Array.from(got.parent).join()]).toEqual([here.nested, Array.from(here.parent).join()]);
  });

  it('the local-order map is the same with the parents located ahead', () => {
    const [, coarse, fine] = pairs[0];
    // Cell errors that halve per level (second order in L2: ∫_K e² falls by 2^(2·2+2) over four children).
    const level = (mesh: typeof coarse, h: number, scale: number): LevelCellErrors =>
      ({ mesh, L2: Float64Array.from({ length: mesh.nCells }, (_, c) => scale * (1 + 0.5 * Math.sin(c))), norm: 'L2', h });
    const c = level(coarse, 1 / 40, 1);
    const plain = localOrderMap(c, level(fine, 1 / 80, 1 / 256), 0, 2);
    const ahead = localOrderMap(c, { ...level(fine, 1 / 80, 1 / 256), parents: parentCellsAhead(coarse, fine)! }, 0, 2);
    expect(plain).not.toBeNull();
    expect(ahead).toEqual(plain);
  });

  it('a job no worker computes is left to this thread (settle false), and with one thread nothing is started', () => {
    setWorkersFirst(false);
    try {
      // A task module that does not exist: the worker cannot build it and claims nothing.
      const job = cellTeam().background(taskUrl(import.meta.url, 'no-such-task'), {});
      expect(job.settle()).toBe(false);
      expect(job.settle()).toBe(false); // settled once
      setTeamThreads(1);
      const [, coarse, fine] = pairs[0];
      expect(parentCellsAhead(coarse, fine)).toBeNull();
    } finally {
      setTeamThreads(2);
      setWorkersFirst(true);
    }
  });
});
