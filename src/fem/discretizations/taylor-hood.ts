import type { Mesh } from '../../mesh/types.ts';
import type { Csr } from '../../linalg/types.ts';
import { lagrangeSpace } from '../dofmap/dofmap.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { mixedSpace, vectorSpace } from '../space/space.ts';
import type { MixedSpace } from '../space/types.ts';
import { eliminate, fixBoundary, noConstraints, type Constraints, type ReducedSystem } from '../constraints/dirichlet.ts';
import type { PointData } from '../form/terms/types.ts';

/** The Taylor–Hood pair P_k–P_(k−1) on a mesh: a vector field u (dim components) then a scalar p, one numbering.
 *  Shared by Stokes flow and mixed elasticity. */
export function taylorHoodSpace(mesh: Mesh, k: number): { velocity: FunctionSpace; pressure: FunctionSpace; space: MixedSpace } {
  const velocity = lagrangeSpace(mesh, k);
  const pressure = lagrangeSpace(mesh, k - 1);
  const space = mixedSpace([{ name: 'u', space: vectorSpace(velocity, mesh.dim) }, { name: 'p', space: vectorSpace(pressure, 1) }]);
  return { velocity, pressure, space };
}

/** Dirichlet data on u eliminated from the assembled [[A, Bᵀ], [B, −C]] (in place: K is not needed afterwards), and
 *  the free unknowns split into the blocks: mu free velocity unknowns first, then every pressure unknown. The blocks
 *  A and B are views of the reduced matrix's own arrays (splitInPlace), so sys.A is used up: only sys.b, sys.free
 *  and sys.reduced remain valid. With `trailing`, the pressure–pressure block C as stored (a copy) as well. */
export function eliminateTaylorHood(
  space: MixedSpace, K: Csr, b: Float64Array, dirichlet: { tags: readonly string[]; value: PointData } | undefined,
  opts: { trailing?: boolean } = {},
): { cons: Constraints; sys: ReducedSystem; mu: number; A: Csr; B: Csr; cNonzeros: number; trailing?: Csr } {
  const cons = noConstraints(space.nDofs);
  if (dirichlet) fixBoundary(space, cons, 0, dirichlet.tags, dirichlet.value);
  // K is not needed after elimination: compacted in place (same bits, no second copy of the matrix).
  const sys = eliminate(K, b, cons, { inPlace: true });
  let mu = 0;
  for (let u = 0; u < space.fields[1].offset; u++) if (!cons.fixed[u]) mu++;
  const { A, B, cNonzeros, trailing } = splitInPlace(sys.A, mu, opts.trailing === true);
  return { cons, sys, mu, A, B, cNonzeros, ...(trailing ? { trailing } : {}) };
}

/** The blocks [[A, Bᵀ], [B, C]] of a matrix K whose first m rows and columns are the first field, written into K's
 *  own arrays: A (m × m, the entries of K's first m rows in columns < m) and after it B ((n − m) × m), compacted
 *  forward (an entry only ever moves to a position at or before the one it is read from, so nothing unread is
 *  overwritten). A's row pointers are K's first m + 1 (rewritten), B gets its own. K is unusable afterwards. The
 *  entries, their order and their values are those of a copy (the former splitTwoFields), without a second matrix:
 *  at 504k Taylor–Hood unknowns the copy took 0.55 s and 0.25 GB. cNonzeros counts C's nonzero entries; `trailing`
 *  copies C out (before its entries are overwritten) for the callers that have one. */
export function splitInPlace(K: Csr, m: number, trailing: boolean): { A: Csr; B: Csr; cNonzeros: number; trailing?: Csr } {
  const n = K.nRows, np = n - m;
  const { rowPtr, colIdx, values } = K;
  let cNonzeros = 0, cCount = 0;
  for (let r = m; r < n; r++) {
    for (let s = rowPtr[r]; s < rowPtr[r + 1]; s++) if (colIdx[s] >= m) { cCount++; if (values[s] !== 0) cNonzeros++; }
  }
  const cp = trailing ? new Int32Array(np + 1) : null;
  const cc = trailing ? new Int32Array(cCount) : null, cv = trailing ? new Float64Array(cCount) : null;
  const bp = new Int32Array(np + 1);
  let out = 0, c = 0;
  let start = rowPtr[0];
  for (let r = 0; r < m; r++) {
    const end = rowPtr[r + 1];
    for (let s = start; s < end; s++) {
      const j = colIdx[s];
      if (j < m) { colIdx[out] = j; values[out] = values[s]; out++; }
    }
    rowPtr[r + 1] = out; // row r + 1 starts at `end`, kept in `start` below
    start = end;
  }
  const nnzA = out;
  for (let r = m; r < n; r++) {
    const end = rowPtr[r + 1];
    for (let s = start; s < end; s++) {
      const j = colIdx[s];
      if (j < m) { colIdx[out] = j; values[out] = values[s]; out++; }
      else if (cc) { cc[c] = j - m; cv![c] = values[s]; c++; }
    }
    bp[r - m + 1] = out - nnzA;
    if (cp) cp[r - m + 1] = c;
    start = end;
  }
  const A: Csr = { nRows: m, nCols: m, rowPtr: rowPtr.subarray(0, m + 1), colIdx: colIdx.subarray(0, nnzA), values: values.subarray(0, nnzA) };
  const B: Csr = { nRows: np, nCols: m, rowPtr: bp, colIdx: colIdx.subarray(nnzA, out), values: values.subarray(nnzA, out) };
  return { A, B, cNonzeros, ...(cp ? { trailing: { nRows: np, nCols: np, rowPtr: cp, colIdx: cc!, values: cv! } } : {}) };
}

/** The whole velocity and pressure vectors from the solved free unknowns and the fixed values. */
export function expandTaylorHood(
  space: MixedSpace, cons: Constraints, sys: ReducedSystem, mu: number, u: Float64Array, p: Float64Array,
): { velocity: Float64Array; pressure: Float64Array } {
  const full = cons.values.slice();
  for (let r = 0; r < mu; r++) full[sys.free[r]] = u[r];
  for (let r = mu; r < sys.free.length; r++) full[sys.free[r]] = p[r - mu];
  const off = space.fields[1].offset;
  return { velocity: full.slice(0, off), pressure: full.slice(off) };
}
