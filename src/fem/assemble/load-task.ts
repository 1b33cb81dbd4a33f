// The load vector's own pass on a worker of the cell team, while the main thread assembles the matrix and sets up
// the solver (system.ts, assembleSystem with loadAhead): one part, every cell in order, b only (the cells' load and,
// on cells with a Dirichlet unknown, their matrix columns folded into b), the same additions in the same order as
// one pass over the cells makes them.
import { allCells } from './cell-set.ts';
import { workerCellLoop, type LoadTaskInput } from './system-team.ts';

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as LoadTaskInput;
  const loop = workerCellLoop(p, null, p.b_);
  return () => loop(allCells(p.mesh.nCells));
}
