import { reinitCell } from '../geometry/cellvalues.ts';
import { checkFinite } from './check-finite.ts';
import { findEntry } from './sparsity.ts';
import type { CellLoop, CellLoopInput } from './cell-set.ts';
import { defer, type Deferred } from './deferred.ts';

const vecB = new Float64Array(3);

/** The reference cell loop of −∇·(k∇u) + b·∇u + c·u = f: every term's CellValues refilled per cell by reinitCell
 *  (src/fem/geometry/cellvalues.ts), any cell kind. Intervals, quadrilaterals and hexahedra assemble with it;
 *  triangles (triangles.ts) and tetrahedra (tetrahedra.ts) take fast paths with the same arithmetic, and the tests
 *  require the same bits from this loop and from them (test/fem/assemble/). */
export function generalCells(p: CellLoopInput): CellLoop {
  const { mesh, cellDofs, n, cvK, cvB, cvC, cvF, coef, A, b, reduced, dirichletValues } = p;
  const dim = mesh.dim;
  const kf = coef.k, bf = coef.b, cf = coef.c, ff = coef.f;
  const Ke = new Float64Array(n * n);
  const Fe = new Float64Array(n);
  const rows = new Int32Array(n);
  const cols = new Int32Array(n);
  return ({ c0, c1, owner, part, defer: d }) => {
    for (let c = c0; c < c1; c++) {
      Ke.fill(0); Fe.fill(0);
      {
        reinitCell(cvK, mesh, c);
        const { nq, grads, wdet, x } = cvK;
        for (let q = 0; q < nq; q++) {
          let w = wdet[q];
          if (kf) { const kq = kf(x[3 * q], x[3 * q + 1], x[3 * q + 2]); checkFinite(kq, 'conductivity k', c, x, q); w *= kq; }
          const o = q * n * dim;
          for (let i = 0; i < n; i++) {
            for (let j = i; j < n; j++) {
              let s = 0;
              for (let d = 0; d < dim; d++) s += grads[o + i * dim + d] * grads[o + j * dim + d];
              Ke[i * n + j] += w * s;
            }
          }
        }
        for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) Ke[i * n + j] = Ke[j * n + i];
      }
      if (cvB && bf) {
        reinitCell(cvB, mesh, c);
        const { nq, grads, values, wdet, x } = cvB;
        for (let q = 0; q < nq; q++) {
          bf(x[3 * q], x[3 * q + 1], x[3 * q + 2], vecB);
          for (let d = 0; d < dim; d++) checkFinite(vecB[d], `convection b[${d}]`, c, x, q);
          const w = wdet[q];
          const o = q * n * dim;
          for (let j = 0; j < n; j++) {
            let bg = 0;
            for (let d = 0; d < dim; d++) bg += vecB[d] * grads[o + j * dim + d];
            bg *= w;
            for (let i = 0; i < n; i++) Ke[i * n + j] += values[q * n + i] * bg;
          }
        }
      }
      if (cvC && cf) {
        reinitCell(cvC, mesh, c, false);
        const { nq, values, wdet, x } = cvC;
        for (let q = 0; q < nq; q++) {
          const cq = cf(x[3 * q], x[3 * q + 1], x[3 * q + 2]);
          checkFinite(cq, 'reaction c', c, x, q);
          const w = wdet[q] * cq;
          for (let i = 0; i < n; i++) {
            const wi = w * values[q * n + i];
            for (let j = 0; j < n; j++) Ke[i * n + j] += wi * values[q * n + j];
          }
        }
      }
      if (cvF && ff) {
        reinitCell(cvF, mesh, c, false);
        const { nq, values, wdet, x } = cvF;
        for (let q = 0; q < nq; q++) {
          const fq = ff(x[3 * q], x[3 * q + 1], x[3 * q + 2]);
          checkFinite(fq, 'source f', c, x, q);
          const w = wdet[q] * fq;
          for (let i = 0; i < n; i++) Fe[i] += w * values[q * n + i];
        }
      }
      scatterCell(c, n, cellDofs, reduced, dirichletValues, Ke, Fe, rows, cols, A, b, owner, part, d);
    }
  };
}

/** Adds a cell's matrix and vector into the reduced system, Dirichlet columns folded into b; with `owner`, the rows
 *  of the unknowns that part owns, and the additions to other rows recorded in `d` in the same order (deferred.ts).
 *  A null A or b is not written (the matrix and the load vector assembled by separate passes, system.ts): each
 *  receives the same additions in the same order as in one pass. `owner` needs both. */
export function scatterCell(
  c: number, n: number, cellDofs: Int32Array, reduced: Int32Array, dirichletValues: Float64Array, Ke: Float64Array, Fe: Float64Array,
  rows: Int32Array, cols: Int32Array, A: import('../../linalg/types.ts').Csr | null, b: Float64Array | null, owner: Int32Array | null, part: number,
  d: Deferred | null,
): void {
  for (let i = 0; i < n; i++) { const g = cellDofs[c * n + i]; rows[i] = reduced[g]; cols[i] = g; }
  for (let i = 0; i < n; i++) {
    const r = rows[i];
    if (r < 0) continue;
    if (owner !== null && owner[cols[i]] !== part) { deferRow(d!, i, n, r, rows, cols, Ke, Fe, A!, dirichletValues); continue; }
    if (b !== null) b[r] += Fe[i];
    for (let j = 0; j < n; j++) {
      const v = Ke[i * n + j];
      if (v === 0) continue;
      const cr = rows[j];
      if (cr >= 0) { if (A !== null) A.values[findEntry(A, r, cr)] += v; } else if (b !== null) b[r] -= v * dirichletValues[cols[j]];
    }
  }
}

/** Row i of a cell's scatter (row r of the system, owned by an earlier part), recorded instead of made: the same
 *  additions in the same order, b[r] −= x recorded as the addition of −x (deferred.ts). */
export function deferRow(
  d: Deferred, i: number, n: number, r: number, rows: Int32Array, cols: Int32Array, Ke: Float64Array, Fe: Float64Array,
  A: import('../../linalg/types.ts').Csr, dirichletValues: Float64Array,
): void {
  defer(d, -1 - r, Fe[i]);
  for (let j = 0; j < n; j++) {
    const v = Ke[i * n + j];
    if (v === 0) continue;
    const cr = rows[j];
    if (cr >= 0) defer(d, findEntry(A, r, cr), v);
    else defer(d, -1 - r, -(v * dirichletValues[cols[j]]));
  }
}
