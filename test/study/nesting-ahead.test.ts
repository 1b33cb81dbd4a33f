// The finest level's parents located ahead by a worker of the cell team (src/study/nesting-ahead.ts) are those
// parentCells finds on the main thread: the same search on the same data, so the same array, entry for entry.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { parentCells } from '../../src/mesh/nesting.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { cellTeam, setTeamThreads, teamThreads } from '../../src/fem/team/team.ts';
import { nestAhead, nestedParents, nestingJob } from '../../src/study/nesting-ahead.ts';

const sameParents = (a: ReturnType<typeof parentCells>, b: ReturnType<typeof parentCells>) => ({
  parent: a.parent.length === b.parent.length && a.parent.every((p, i) => p === b.parent[i]),
  childCount: a.childCount.length === b.childCount.length && a.childCount.every((c, i) => c === b.childCount[i]),
  nested: a.nested === b.nested, reason: a.reason === b.reason,
});
const all = { parent: true, childCount: true, nested: true, reason: true };

/** Waits (without a deadline that a slow machine could miss: 2 minutes, a guard against a hang only) until a worker
 *  has claimed the job nestAhead started for `fine`. */
async function claimed(fine: Mesh): Promise<boolean> {
  const job = nestingJob(fine);
  const until = Date.now() + 120_000;
  while (job && !job.started() && Date.now() < until) await new Promise((r) => setTimeout(r, 10));
  return job?.started() ?? false;
}

describe('parents located ahead by a worker of the cell team', () => {
  const threads = teamThreads();
  beforeAll(() => { setTeamThreads(2); cellTeam().warm(); });
  afterAll(() => setTeamThreads(threads));

  const pairs: [string, Mesh, Mesh, boolean][] = [
    ['nested triangles', rectangleMesh({ x: [0, 1], y: [0, 2], nx: 12, ny: 10, cells: 'triangles' }), rectangleMesh({ x: [0, 1], y: [0, 2], nx: 24, ny: 20, cells: 'triangles' }), true],
    ['nested tetrahedra', boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 3, ny: 3, nz: 3, cells: 'tetrahedra' }), boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 6, ny: 6, nz: 6, cells: 'tetrahedra' }), true],
    ['a perturbed fine mesh (not nested)', rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 8, cells: 'quadrilaterals' }), perturbMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 16, ny: 16, cells: 'quadrilaterals' }), { fraction: 0.2, seed: 3 }), false],
  ];
  for (const [name, coarse, fine, nested] of pairs) {
    it(`${name}: the worker's parents are parentCells's`, async () => {
      const here = parentCells(coarse, fine);
      nestAhead(coarse, fine);
      const byWorker = await claimed(fine);
      const got = nestedParents(coarse, fine);
      expect({ byWorker, nested: got.nested, same: sameParents(got, here) }).toEqual({ byWorker: true, nested, same: all });
    });
  }

  it('computes here when nothing was started, when the coarse mesh is another, and once the result was taken', () => {
    const [, coarse, fine] = pairs[0]!;
    const other = rectangleMesh({ x: [0, 1], y: [0, 2], nx: 6, ny: 5, cells: 'triangles' });
    const here = parentCells(coarse, fine);
    const none = nestedParents(coarse, fine);
    nestAhead(other, fine);
    const mismatch = nestedParents(coarse, fine);
    const taken = nestedParents(other, fine);
    const again = nestedParents(other, fine);
    expect({ none: sameParents(none, here), mismatch: sameParents(mismatch, here), taken: sameParents(taken, parentCells(other, fine)), again: sameParents(again, taken), job: nestingJob(fine) })
      .toEqual({ none: all, mismatch: all, taken: all, again: all, job: undefined });
  });

  it('without workers nothing is started and the parents are computed here', () => {
    setTeamThreads(1);
    try {
      const [, coarse, fine] = pairs[1]!;
      nestAhead(coarse, fine);
      expect({ job: nestingJob(fine), same: sameParents(nestedParents(coarse, fine), parentCells(coarse, fine)) }).toEqual({ job: undefined, same: all });
    } finally { setTeamThreads(2); }
  });
});
