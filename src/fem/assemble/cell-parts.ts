import type { CellLoop, CellSet } from './cell-set.ts';
import { replay, type Deferred } from './deferred.ts';

/** Cells per part of a shared assembly: 2M triangles (1M P1 unknowns) make 32 parts. */
export const ASSEMBLY_PART_CELLS = 65536;

/**
 * The cells of a space cut into parts for an assembly shared by threads, once per space (cached by its cellDofs).
 * Part p holds cells p·P … (p + 1)·P − 1 (P = partCells). Each unknown g is owned by the part of the first cell that
 * holds it (owner[g]), so every other cell holding it lies in a later part. Part p adds its cells' entries to the rows
 * it owns at once and records those to rows of earlier parts (deferred.ts); when part p − 1 is complete (and with it,
 * in turn, every earlier part) it replays the record (runPart). A row owned by part q thus receives the entries of
 * q's cells, then those of each later part in part order, each in cell order: ascending cell order, as in one pass
 * over all cells, so the same sums in the same order, the same bits on any number of threads. Every cell is computed
 * once. (An earlier layout recomputed, in each part, the later cells touching its rows: on 6M Kuhn tetrahedra, a
 * part of 65,536 cells is about one layer of the box, and its cells were computed twice.)
 */
export interface CellParts {
  parts: number;
  partCells: number;
  nCells: number;
  owner: Int32Array;
}

const known = new WeakMap<Int32Array, CellParts>();

export function cellParts(nCells: number, nLocal: number, cellDofs: Int32Array, nDofs: number, partCells = ASSEMBLY_PART_CELLS): CellParts {
  const cached = known.get(cellDofs);
  if (cached && cached.partCells === partCells && cached.nCells === nCells) return cached;
  const parts = Math.max(1, Math.ceil(nCells / partCells));
  const owner = new Int32Array(new SharedArrayBuffer(4 * nDofs)).fill(-1);
  for (let p = 0; p < parts; p++) {
    const end = Math.min(nCells, (p + 1) * partCells) * nLocal;
    for (let k = p * partCells * nLocal; k < end; k++) { const g = cellDofs[k]; if (owner[g] < 0) owner[g] = p; }
  }
  const out: CellParts = { parts, partCells, nCells, owner };
  known.set(cellDofs, out);
  return out;
}

/** The cells and rows of part p, with the record of its additions to earlier parts' rows. */
export function partSet(cp: CellParts, p: number, d: Deferred): CellSet {
  return { c0: p * cp.partCells, c1: Math.min(cp.nCells, (p + 1) * cp.partCells), owner: cp.owner, part: p, defer: d };
}

/** A part's completion words, one per part in shared memory: 0 while pending, 1 once the part and every earlier part
 *  are complete, 2 when the part failed (or an earlier one did). */
export const PART_COMPLETE = 1, PART_FAILED = 2;

export function completionWords(parts: number): Int32Array {
  return new Int32Array(new SharedArrayBuffer(4 * Math.max(1, parts)));
}

/**
 * Part p of a shared assembly, on whichever thread claimed it: its cells, then (after waiting until part p − 1 is
 * complete) the replay of its additions to earlier rows; then part p is complete. Parts are claimed in ascending
 * order, so part p − 1 is always held by a running thread, and the lowest part not complete never waits: no deadlock.
 * A failure marks the part failed, which fails every later part that waits on it (the caller then assembles again in
 * one pass, which meets the first error in cell order).
 */
export function runPart(loop: CellLoop, cp: CellParts, done: Int32Array, p: number, d: Deferred, values: Float64Array, b: Float64Array): void {
  try {
    d.length = 0;
    loop(partSet(cp, p, d));
    if (p > 0) {
      let s = Atomics.load(done, p - 1);
      while (s === 0) { Atomics.wait(done, p - 1, 0, 1000); s = Atomics.load(done, p - 1); }
      if (s !== PART_COMPLETE) throw new Error(`internal: part ${p - 1} of a shared assembly failed`);
    }
    replay(d, values, b);
    Atomics.store(done, p, PART_COMPLETE);
  } catch (e) {
    d.length = 0;
    Atomics.store(done, p, PART_FAILED);
    throw e;
  } finally {
    Atomics.notify(done, p);
  }
}
