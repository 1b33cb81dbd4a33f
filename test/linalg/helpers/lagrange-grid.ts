/** Stiffness matrices of −∇·(k∇u) with continuous Lagrange elements on a uniform grid of the unit square,
 *  Dirichlet nodes eliminated, built here only to feed the solvers realistic SPD matrices (P1, P2, P3 triangles,
 *  Q2 squares). Basis functions come from the nodal (Vandermonde) conditions on the reference cell, solved with
 *  ml-matrix; monomial integrals are exact: ∫ over the reference triangle of x^p y^q = p! q! / (p+q+2)!, over the unit
 *  square 1/((p+1)(q+1)) (common practice, no source). The coefficient k is constant per cell. */
import { Matrix, inverse } from 'ml-matrix';
import { csrFromTriplets } from '../../../src/linalg/csr.ts';
import type { Csr } from '../../../src/linalg/types.ts';

export interface GridProblem {
  A: Csr;
  /** Lattice coordinates (x, y) in units of h/degree of each unknown. */
  nodeX: Int32Array;
  nodeY: Int32Array;
  latticeSize: number;
}

function factorial(n: number): number { let f = 1; for (let i = 2; i <= n; i++) f *= i; return f; }

/** Reference element: nodes (lattice offsets) and the integrals I[c][d][a][b] = ∫ ∂_c φ_a ∂_d φ_b. */
function referenceElement(cell: 'triangle' | 'square', k: number): { nodes: [number, number][]; I: number[][][][] } {
  const nodes: [number, number][] = [];
  const monos: [number, number][] = [];
  for (let j = 0; j <= k; j++) for (let i = 0; i <= k; i++) {
    if (cell === 'square' || i + j <= k) { nodes.push([i, j]); monos.push([i, j]); }
  }
  const nb = nodes.length;
  const V = new Matrix(nb, nb);
  for (let a = 0; a < nb; a++) for (let b = 0; b < nb; b++) {
    V.set(a, b, Math.pow(nodes[a][0] / k, monos[b][0]) * Math.pow(nodes[a][1] / k, monos[b][1]));
  }
  const C = inverse(V); // φ_a = Σ_b C[b][a] m_b
  const integral = (p: number, q: number): number =>
    cell === 'triangle' ? (factorial(p) * factorial(q)) / factorial(p + q + 2) : 1 / ((p + 1) * (q + 1));
  // ∂_x m_b = p x^{p−1} y^q, ∂_y m_b = q x^p y^{q−1}
  const I: number[][][][] = [0, 1].map(() => [0, 1].map(() => Array.from({ length: nb }, () => new Array(nb).fill(0))));
  for (let c = 0; c < 2; c++) for (let d = 0; d < 2; d++) {
    for (let b1 = 0; b1 < nb; b1++) for (let b2 = 0; b2 < nb; b2++) {
      const [p1, q1] = monos[b1], [p2, q2] = monos[b2];
      const f1 = c === 0 ? p1 : q1, f2 = d === 0 ? p2 : q2;
      if (f1 === 0 || f2 === 0) continue;
      const val = f1 * f2 * integral(p1 + p2 - (c === 0 ? 1 : 0) - (d === 0 ? 1 : 0), q1 + q2 - (c === 1 ? 1 : 0) - (d === 1 ? 1 : 0));
      for (let a1 = 0; a1 < nb; a1++) {
        const ca = C.get(b1, a1) * val;
        if (ca === 0) continue;
        for (let a2 = 0; a2 < nb; a2++) I[c][d][a1][a2] += ca * C.get(b2, a2);
      }
    }
  }
  return { nodes, I };
}

/** Stiffness on N×N cells of the unit square; coefficient(cx, cy) gives k on the cell with lower-left index (cx, cy). */
export function lagrangeGridStiffness(
  cell: 'triangle' | 'square', degree: number, N: number, coefficient: (cx: number, cy: number) => number = () => 1,
): GridProblem {
  const k = degree;
  const { nodes, I } = referenceElement(cell, k);
  const L = k * N + 1; // lattice points per side
  const index = new Int32Array(L * L).fill(-1);
  let n = 0;
  const nodeX: number[] = [], nodeY: number[] = [];
  for (let y = 1; y < L - 1; y++) for (let x = 1; x < L - 1; x++) { index[y * L + x] = n++; nodeX.push(x); nodeY.push(y); }
  const rows: number[] = [], cols: number[] = [], vals: number[] = [];
  const h = 1 / N;
  const addCell = (v0: [number, number], e1: [number, number], e2: [number, number], kc: number): void => {
    // Affine map ξ ↦ v0 + J ξ with J = h [e1 e2] (grid units); G = J⁻¹ J⁻ᵀ, |det J|.
    const j00 = h * e1[0], j01 = h * e2[0], j10 = h * e1[1], j11 = h * e2[1];
    const det = j00 * j11 - j01 * j10;
    const i00 = j11 / det, i01 = -j01 / det, i10 = -j10 / det, i11 = j00 / det; // J⁻¹
    const G = [[i00 * i00 + i01 * i01, i00 * i10 + i01 * i11], [i10 * i00 + i11 * i01, i10 * i10 + i11 * i11]];
    const glob = nodes.map(([a, b]) => {
      const gx = k * v0[0] + a * e1[0] + b * e2[0];
      const gy = k * v0[1] + a * e1[1] + b * e2[1];
      return index[gy * L + gx];
    });
    for (let a = 0; a < nodes.length; a++) {
      if (glob[a] < 0) continue;
      for (let b = 0; b < nodes.length; b++) {
        if (glob[b] < 0) continue;
        let s = 0;
        for (let c = 0; c < 2; c++) for (let d = 0; d < 2; d++) s += G[c][d] * I[c][d][a][b];
        rows.push(glob[a]); cols.push(glob[b]); vals.push(kc * Math.abs(det) * s);
      }
    }
  };
  for (let cy = 0; cy < N; cy++) for (let cx = 0; cx < N; cx++) {
    const kc = coefficient(cx, cy);
    if (cell === 'square') addCell([cx, cy], [1, 0], [0, 1], kc);
    else {
      // Both triangles of the cell share the diagonal from (cx, cy) to (cx+1, cy+1).
      addCell([cx, cy], [1, 0], [1, 1], kc);
      addCell([cx, cy], [1, 1], [0, 1], kc);
    }
  }
  return { A: csrFromTriplets(n, n, rows, cols, vals), nodeX: Int32Array.from(nodeX), nodeY: Int32Array.from(nodeY), latticeSize: L };
}

/** 1000:1 checkerboard of 4×4-cell blocks. */
export function checkerboard(contrast: number, block = 4): (cx: number, cy: number) => number {
  return (cx, cy) => ((Math.floor(cx / block) + Math.floor(cy / block)) % 2 === 0 ? contrast : 1);
}
