import type { Csr } from '../../linalg/types.ts';
import { facetsWithTags } from '../../mesh/tags.ts';
import { RungsInputError } from '../../errors.ts';
import { facetClosureDofs } from '../dofmap/dofmap.ts';
import { locateFacets } from '../geometry/facets.ts';
import { ROUND_OFF_ENTRY } from '../../linalg/amg/negligible-entries.ts';
import type { MixedSpace } from '../space/types.ts';

/** Unknowns fixed by Dirichlet data and their values (full length; zero where free). */
export interface Constraints {
  fixed: Uint8Array;
  values: Float64Array;
}

export function noConstraints(nDofs: number): Constraints {
  return { fixed: new Uint8Array(nDofs), values: new Float64Array(nDofs) };
}

/** Fixes the unknowns of one field on the boundary facets with the given tags to the nodal values of g (Dirichlet
 *  data interpolated at the boundary nodes; common practice, e.g. Brenner & Scott 2008 §5.5). `components` picks
 *  which components are fixed (default all): a roller fixes one. g writes the field's components into out. */
export function fixBoundary(
  space: MixedSpace, cons: Constraints, field: number, tags: readonly string[],
  g: (x: number, y: number, z: number, out: Float64Array) => void, components?: readonly number[],
): void {
  if (tags.length === 0) return;
  const f = space.fields[field];
  const { scalar, components: nc } = f.space;
  const mesh = space.mesh, dim = mesh.dim;
  const which = components ?? Array.from({ length: nc }, (_, i) => i);
  for (const i of which) if (!(Number.isInteger(i) && i >= 0 && i < nc)) throw new RungsInputError(`component ${i} of field '${f.name}' does not exist; it has ${nc}`);
  const fc = locateFacets(mesh);
  const nodes = facetClosureDofs(scalar, fc.cell, fc.local, facetsWithTags(mesh, tags));
  const X = scalar.dofCoords;
  const out = new Float64Array(nc);
  for (const g0 of nodes) {
    g(X[g0 * dim], dim > 1 ? X[g0 * dim + 1] : 0, dim > 2 ? X[g0 * dim + 2] : 0, out);
    for (const i of which) {
      const v = out[i];
      if (!Number.isFinite(v)) throw new RungsInputError(`Dirichlet value of '${f.name}'${nc > 1 ? `[${i + 1}]` : ''} is ${v} at the boundary node (${Array.from(X.subarray(g0 * dim, g0 * dim + dim), (t) => t.toPrecision(6)).join(', ')})`);
      const u = f.offset + g0 * nc + i;
      cons.fixed[u] = 1;
      cons.values[u] = v;
    }
  }
}

/** The linear system on the free unknowns: rows and columns of fixed unknowns removed, their values moved to the
 *  right-hand side (b_free − A_free,fixed · g), so a symmetric matrix stays symmetric and a definite one definite. */
export interface ReducedSystem {
  A: Csr;
  b: Float64Array;
  /** reduced[u] = row of unknown u, or −1 when fixed. */
  reduced: Int32Array;
  /** free[r] = unknown of row r. */
  free: Int32Array;
  constraints: Constraints;
}

export interface EliminateOptions {
  /** Write the reduced matrix into A's own arrays (compacted forward, returned as views of their first entries) and
   *  leave A unusable: no second matrix of the same size is allocated. For callers done with the full matrix. On
   *  these machines fresh memory costs up to 3 ms per MB on first touch (DEVELOPERS.md), which is most of the cost of
   *  a copy (measured: 23M entries, 1.1–1.8 s as a copy). Same values, same bits. */
  inPlace?: boolean;
  /** With inPlace: leave out, in the same pass, the entries of the reduced matrix that are exact zeros or the
   *  round-off of cancelling element contributions, |a_ij| ≤ ROUND_OFF_ENTRY·√(a_ii a_jj) (the rule and its reasons:
   *  src/linalg/amg/negligible-entries.ts). Nothing is dropped when a diagonal entry of a free unknown is not
   *  positive. */
  dropNegligible?: boolean;
}

/** Dirichlet elimination as its own step after assembly. */
export function eliminate(A: Csr, b: Float64Array, cons: Constraints, opts: EliminateOptions = {}): ReducedSystem {
  const n = A.nRows;
  const reduced = new Int32Array(n);
  let m = 0;
  for (let u = 0; u < n; u++) reduced[u] = cons.fixed[u] ? -1 : m++;
  const free = new Int32Array(m);
  for (let u = 0; u < n; u++) if (reduced[u] >= 0) free[reduced[u]] = u;
  const rowPtr = new Int32Array(m + 1);
  const { rowPtr: rp, colIdx: ci, values: av } = A;
  const g = cons.values;
  const rb = new Float64Array(m);
  if (opts.inPlace) {
    const diag = opts.dropNegligible ? positiveDiagonal(A, free) : null;
    const t2 = ROUND_OFF_ENTRY * ROUND_OFF_ENTRY;
    // One forward pass: row r of the reduced matrix starts at or before row free[r] ≥ r of A, and within a row the
    // write position never passes the read position, so nothing is overwritten before it is read.
    let k = 0;
    for (let r = 0; r < m; r++) {
      const u = free[r];
      let s0 = b[u];
      if (diag) {
        const du = diag[r];
        for (let s = rp[u]; s < rp[u + 1]; s++) {
          const col = reduced[ci[s]];
          if (col < 0) { s0 -= av[s] * g[ci[s]]; continue; }
          const v = av[s];
          if (col !== r && (v === 0 || v * v <= t2 * du * diag[col])) continue;
          ci[k] = col; av[k] = v; k++;
        }
      } else {
        for (let s = rp[u]; s < rp[u + 1]; s++) {
          const col = reduced[ci[s]];
          if (col >= 0) { ci[k] = col; av[k] = av[s]; k++; } else s0 -= av[s] * g[ci[s]];
        }
      }
      rb[r] = s0;
      rowPtr[r + 1] = k;
    }
    return { A: { nRows: m, nCols: m, rowPtr, colIdx: ci.subarray(0, k), values: av.subarray(0, k) }, b: rb, reduced, free, constraints: cons };
  }
  for (let r = 0; r < m; r++) {
    const u = free[r];
    let k = 0;
    for (let s = rp[u]; s < rp[u + 1]; s++) if (reduced[ci[s]] >= 0) k++;
    rowPtr[r + 1] = rowPtr[r] + k;
  }
  const colIdx = new Int32Array(rowPtr[m]);
  const values = new Float64Array(rowPtr[m]);
  for (let r = 0; r < m; r++) {
    const u = free[r];
    let k = rowPtr[r];
    let s0 = b[u];
    for (let s = rp[u]; s < rp[u + 1]; s++) {
      const col = reduced[ci[s]];
      if (col >= 0) { colIdx[k] = col; values[k] = av[s]; k++; } else s0 -= av[s] * g[ci[s]];
    }
    rb[r] = s0;
  }
  return { A: { nRows: m, nCols: m, rowPtr, colIdx, values }, b: rb, reduced, free, constraints: cons };
}

/** a_uu of each free unknown u = free[r] at r, or null when one is not positive (or absent). Rows are searched by
 *  bisection (assembled rows are sorted), then from the start when that misses (a row in any order). */
function positiveDiagonal(A: Csr, free: Int32Array): Float64Array | null {
  const { rowPtr, colIdx, values } = A;
  const diag = new Float64Array(free.length);
  for (let r = 0; r < free.length; r++) {
    const u = free[r];
    let lo = rowPtr[u], hi = rowPtr[u + 1] - 1, at = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1, c = colIdx[mid];
      if (c === u) { at = mid; break; }
      if (c < u) lo = mid + 1; else hi = mid - 1;
    }
    if (at < 0) for (let s = rowPtr[u]; s < rowPtr[u + 1]; s++) if (colIdx[s] === u) { at = s; break; }
    if (at >= 0) diag[r] = values[at];
    if (!(diag[r] > 0)) return null;
  }
  return diag;
}

/** The full vector of unknowns from the free ones and the fixed values. */
export function expand(sys: ReducedSystem, x: Float64Array): Float64Array {
  const u = sys.constraints.values.slice();
  const free = sys.free;
  for (let r = 0; r < free.length; r++) u[free[r]] = x[r];
  return u;
}

/** The free entries of a full vector. */
export function restrictToFree(sys: ReducedSystem, v: Float64Array): Float64Array {
  const out = new Float64Array(sys.free.length);
  for (let r = 0; r < out.length; r++) out[r] = v[sys.free[r]];
  return out;
}
