// The scalar assembly's task for the workers of the cell team (src/fem/team/): rebuilds the cell loop from the input
// (assembleTaskInput in system-team.ts) and assembles one part of the cells into the shared matrix and vector.
import { runPart } from './cell-parts.ts';
import { deferredBuffer } from './deferred.ts';
import { workerCellLoop, type AssembleTaskInput } from './system-team.ts';

export function prepare(raw: unknown): (part: number) => void {
  const p = raw as AssembleTaskInput;
  const loop = workerCellLoop(p, { nRows: p.nRows, nCols: p.nRows, rowPtr: p.rowPtr, colIdx: p.colIdx, values: p.values }, p.b_);
  const d = deferredBuffer();
  return (part) => runPart(loop, p.parts, p.done, part, d, p.values, p.b_);
}
