import type { CellSet } from './cell-set.ts';

/** Cells per part of a shared assembly: 2M triangles (1M P1 unknowns) make 32 parts; a part's halo (cells of later
 *  parts touching its rows) is then a few per cent of it on a structured mesh. */
export const ASSEMBLY_PART_CELLS = 65536;

/**
 * The cells of a space cut into parts for an assembly shared by threads, once per space (cached by its cellDofs).
 * Part p holds cells p·P … (p + 1)·P − 1 (P = partCells). Each unknown g is owned by the part of the first cell that
 * holds it (owner[g]); a part writes only the rows of the unknowns it owns, so no two threads write one row. The
 * later cells that also hold an unknown part p owns are p's halo (ascending; all in later parts, since the owner is
 * the part of the FIRST cell): part p assembles its own cells, then its halo, and so every row receives the entries
 * of its cells in ascending cell order, as in one pass over all cells: the same sums in the same order, the same
 * bits, on any number of threads. The halo's cells are computed twice (once more per part that needs them).
 */
export interface CellParts {
  parts: number;
  partCells: number;
  nCells: number;
  owner: Int32Array;
  haloPtr: Int32Array;
  halo: Int32Array;
}

const known = new WeakMap<Int32Array, CellParts>();

export function cellParts(nCells: number, nLocal: number, cellDofs: Int32Array, nDofs: number, partCells = ASSEMBLY_PART_CELLS): CellParts {
  const cached = known.get(cellDofs);
  if (cached && cached.partCells === partCells && cached.nCells === nCells) return cached;
  const parts = Math.max(1, Math.ceil(nCells / partCells));
  const owner = new Int32Array(new SharedArrayBuffer(4 * nDofs)).fill(-1);
  for (let c = 0; c < nCells; c++) {
    const p = Math.floor(c / partCells);
    for (let i = 0; i < nLocal; i++) { const g = cellDofs[c * nLocal + i]; if (owner[g] < 0) owner[g] = p; }
  }
  // Two passes over the cells: count each part's halo, then fill it in cell order (so each halo is ascending).
  const haloPtr = new Int32Array(new SharedArrayBuffer(4 * (parts + 1)));
  const seen = new Int32Array(nLocal);
  const visit = (c: number, add: (p: number) => void): void => {
    const q = Math.floor(c / partCells);
    let m = 0;
    for (let i = 0; i < nLocal; i++) {
      const p = owner[cellDofs[c * nLocal + i]];
      if (p >= q) continue;
      let dup = false;
      for (let k = 0; k < m; k++) if (seen[k] === p) { dup = true; break; }
      if (!dup) { seen[m++] = p; add(p); }
    }
  };
  for (let c = 0; c < nCells; c++) visit(c, (p) => { haloPtr[p + 1]++; });
  for (let p = 0; p < parts; p++) haloPtr[p + 1] += haloPtr[p];
  const halo = new Int32Array(new SharedArrayBuffer(4 * Math.max(1, haloPtr[parts])));
  const fill = haloPtr.slice(0, parts);
  for (let c = 0; c < nCells; c++) visit(c, (p) => { halo[fill[p]++] = c; });
  const out: CellParts = { parts, partCells, nCells, owner, haloPtr, halo };
  known.set(cellDofs, out);
  return out;
}

/** The cells and rows of part p. */
export function partSet(cp: CellParts, p: number): CellSet {
  return {
    c0: p * cp.partCells, c1: Math.min(cp.nCells, (p + 1) * cp.partCells),
    halo: cp.halo, h0: cp.haloPtr[p], h1: cp.haloPtr[p + 1], owner: cp.owner, part: p,
  };
}
