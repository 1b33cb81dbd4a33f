/** Test-only reference: P1 linear elasticity (plane strain) on a structured triangle mesh of the unit square, written
 *  out with plain loops, independent of rungs's own assembly. m × m squares, each cut along its rising diagonal into
 *  the triangles (v00, v10, v11) and (v00, v11, v01); node (i, j) is g = j (m + 1) + i at (i/m, j/m). Unknowns are
 *  interleaved node-major: u_x of node g is 2g, u_y is 2g + 1.
 *  a(u, v) = ∫ λ div u div v + 2μ ε(u) : ε(v); in Voigt form K_e = |T| Bᵀ D B with
 *  D = [[λ+2μ, λ, 0], [λ, λ+2μ, 0], [0, 0, μ]] and B the strain–displacement matrix of the linear triangle
 *  (Zienkiewicz & Taylor 2000, The Finite Element Method, vol. 1, 5th ed., §6.2, from memory). */
import type { Csr } from '../../src/linalg/types.ts';

export interface ElasticityGrid {
  /** The matrix on all 2 (m+1)² unknowns, no boundary condition (singular: the rigid-body modes are its kernel). */
  A: Csr;
  /** Node coordinates, (x, y) per node. */
  coords: Float64Array;
  nNodes: number;
  m: number;
}

/** The node's neighbours in this triangulation (itself included), in increasing index. */
function neighbours(i: number, j: number, m: number, out: number[]): number[] {
  out.length = 0;
  const cand: [number, number][] = [[i - 1, j - 1], [i, j - 1], [i - 1, j], [i, j], [i + 1, j], [i, j + 1], [i + 1, j + 1]];
  for (const [a, b] of cand) if (a >= 0 && a <= m && b >= 0 && b <= m) out.push(b * (m + 1) + a);
  return out;
}

export function elasticityGrid(m: number, lambda = 1, mu = 1): ElasticityGrid {
  const np = m + 1;
  const nNodes = np * np;
  const n = 2 * nNodes;
  const coords = new Float64Array(2 * nNodes);
  for (let j = 0; j <= m; j++) for (let i = 0; i <= m; i++) { const g = j * np + i; coords[2 * g] = i / m; coords[2 * g + 1] = j / m; }
  // Pattern: row 2g + c holds columns 2h, 2h + 1 for every neighbour h of g (sorted).
  const rowPtr = new Int32Array(n + 1);
  const nb: number[] = [];
  for (let j = 0; j <= m; j++) for (let i = 0; i <= m; i++) {
    const g = j * np + i;
    const d = neighbours(i, j, m, nb).length;
    rowPtr[2 * g + 1] = 2 * d;
    rowPtr[2 * g + 2] = 2 * d;
  }
  for (let r = 0; r < n; r++) rowPtr[r + 1] += rowPtr[r];
  const colIdx = new Int32Array(rowPtr[n]);
  const values = new Float64Array(rowPtr[n]);
  for (let j = 0; j <= m; j++) for (let i = 0; i <= m; i++) {
    const g = j * np + i;
    neighbours(i, j, m, nb);
    for (let c = 0; c < 2; c++) {
      let p = rowPtr[2 * g + c];
      for (const h of nb) { colIdx[p++] = 2 * h; colIdx[p++] = 2 * h + 1; }
    }
  }
  const find = (row: number, col: number): number => {
    for (let p = rowPtr[row]; p < rowPtr[row + 1]; p++) if (colIdx[p] === col) return p;
    throw new Error(`no entry (${row}, ${col})`);
  };
  // Element loop with fixed buffers (one allocation for the whole assembly).
  const Bm = new Float64Array(18); // 3 × 6
  const DB = new Float64Array(18);
  const v = new Int32Array(3);
  const D = [lambda + 2 * mu, lambda, 0, lambda, lambda + 2 * mu, 0, 0, 0, mu];
  for (let j = 0; j < m; j++) for (let i = 0; i < m; i++) {
    const v00 = j * np + i, v10 = v00 + 1, v01 = v00 + np, v11 = v01 + 1;
    for (let t = 0; t < 2; t++) {
      if (t === 0) { v[0] = v00; v[1] = v10; v[2] = v11; } else { v[0] = v00; v[1] = v11; v[2] = v01; }
      const x0 = coords[2 * v[0]], y0 = coords[2 * v[0] + 1];
      const x1 = coords[2 * v[1]], y1 = coords[2 * v[1] + 1];
      const x2 = coords[2 * v[2]], y2 = coords[2 * v[2] + 1];
      const det = (x1 - x0) * (y2 - y0) - (x2 - x0) * (y1 - y0);
      const area = 0.5 * Math.abs(det);
      // ∂λ_a/∂x = (y_b − y_c)/det, ∂λ_a/∂y = (x_c − x_b)/det with (a, b, c) cyclic.
      const bx = [(y1 - y2) / det, (y2 - y0) / det, (y0 - y1) / det];
      const by = [(x2 - x1) / det, (x0 - x2) / det, (x1 - x0) / det];
      Bm.fill(0);
      for (let a = 0; a < 3; a++) {
        Bm[0 * 6 + 2 * a] = bx[a];
        Bm[1 * 6 + 2 * a + 1] = by[a];
        Bm[2 * 6 + 2 * a] = by[a];
        Bm[2 * 6 + 2 * a + 1] = bx[a];
      }
      for (let r = 0; r < 3; r++) for (let c = 0; c < 6; c++) {
        let s = 0;
        for (let k = 0; k < 3; k++) s += D[3 * r + k] * Bm[6 * k + c];
        DB[6 * r + c] = s;
      }
      for (let p = 0; p < 6; p++) {
        const row = 2 * v[p >> 1] + (p & 1);
        for (let q = 0; q < 6; q++) {
          let s = 0;
          for (let k = 0; k < 3; k++) s += Bm[6 * k + p] * DB[6 * k + q];
          values[find(row, 2 * v[q >> 1] + (q & 1))] += area * s;
        }
      }
    }
  }
  return { A: { nRows: n, nCols: n, rowPtr, colIdx, values }, coords, nNodes, m };
}

export interface Reduced {
  A: Csr;
  /** Old index of each kept unknown, increasing. */
  free: Int32Array;
}

/** A with the rows and columns of the fixed unknowns removed (elimination of homogeneous Dirichlet data). */
export function removeUnknowns(A: Csr, fixed: Uint8Array): Reduced {
  const n = A.nRows;
  const newIndex = new Int32Array(n).fill(-1);
  let k = 0;
  for (let i = 0; i < n; i++) if (!fixed[i]) newIndex[i] = k++;
  const free = new Int32Array(k);
  for (let i = 0; i < n; i++) if (newIndex[i] >= 0) free[newIndex[i]] = i;
  const rowPtr = new Int32Array(k + 1);
  let nnz = 0;
  for (let r = 0; r < k; r++) {
    const i = free[r];
    for (let p = A.rowPtr[i]; p < A.rowPtr[i + 1]; p++) if (newIndex[A.colIdx[p]] >= 0) nnz++;
    rowPtr[r + 1] = nnz;
  }
  const colIdx = new Int32Array(nnz);
  const values = new Float64Array(nnz);
  let q = 0;
  for (let r = 0; r < k; r++) {
    const i = free[r];
    for (let p = A.rowPtr[i]; p < A.rowPtr[i + 1]; p++) {
      const c = newIndex[A.colIdx[p]];
      if (c >= 0) { colIdx[q] = c; values[q] = A.values[p]; q++; }
    }
  }
  return { A: { nRows: k, nCols: k, rowPtr, colIdx, values }, free };
}

/** Both components fixed at the nodes of the left side x = 0. */
export function clampedLeft(grid: ElasticityGrid): Uint8Array {
  const fixed = new Uint8Array(grid.A.nRows);
  for (let j = 0; j <= grid.m; j++) { const g = j * (grid.m + 1); fixed[2 * g] = 1; fixed[2 * g + 1] = 1; }
  return fixed;
}

/** A roller on the left side (u_x = 0 there) and u_y = 0 at the corner (0, 0): only some components of a node are
 *  fixed, which still removes every rigid-body motion. */
export function rollerLeft(grid: ElasticityGrid): Uint8Array {
  const fixed = new Uint8Array(grid.A.nRows);
  for (let j = 0; j <= grid.m; j++) fixed[2 * j * (grid.m + 1)] = 1;
  fixed[1] = 1;
  return fixed;
}
