/** A genuine small Stokes system for the saddle-point tests, built here with plain loops: Taylor–Hood P2–P1 on the
 *  unit square cut into N×N squares, each split into two triangles with alternating diagonals ("union jack", N even),
 *  so that every corner triangle has an interior vertex, which P2–P1 needs to be inf-sup stable (Boffi 1997,
 *  SIAM J. Numer. Anal. 34, 664–670, from memory). Velocity ν∇u:∇v with both components fixed to zero on the whole
 *  boundary (unknowns ordered: all x-components, then all y-components); B_ij = −∫ q_i ∇·φ_j; the pressure mass
 *  matrix M_ij = ∫ q_i q_j and w_i = ∫ q_i over all (N+1)² vertices. Every integrand is a polynomial of degree ≤ 2
 *  on each affine triangle, integrated exactly by the edge-midpoint rule (common practice, no source). P2 basis in
 *  barycentric coordinates: λ_i(2λ_i − 1) at vertices, 4λ_iλ_j at edge midpoints (common practice, no source). */
import { csrFromTriplets } from '../../../src/linalg/csr.ts';
import type { Csr } from '../../../src/linalg/types.ts';

export interface StokesGrid {
  A: Csr;
  B: Csr;
  M: Csr;
  w: Float64Array;
  nu: number;
  np: number;
}

/** Local node k of a P2 triangle: vertices 0, 1, 2, then the midpoints of edges (0,1), (1,2), (2,0). */
const EDGE: [number, number][] = [[0, 1], [1, 2], [2, 0]];

export function taylorHoodGrid(N: number, viscosity = 1): StokesGrid {
  if (N % 2 !== 0 || N < 2) throw new Error('taylorHoodGrid: N must be even and ≥ 2');
  const L = 2 * N + 1; // P2 lattice points per side
  const h = 1 / N;
  const nI = (2 * N - 1) * (2 * N - 1);
  const nu = 2 * nI, np = (N + 1) * (N + 1);
  /** Free velocity index of lattice point (I, J), −1 on the boundary. */
  const vel = (I: number, J: number): number => (I <= 0 || J <= 0 || I >= L - 1 || J >= L - 1 ? -1 : (I - 1) + (J - 1) * (2 * N - 1));
  // Triplets in typed arrays sized for the element matrices summed over the quadrature points (6×6 per velocity
  // component, 3×6 per component for B, 3×3 for M).
  const nTri = 2 * N * N;
  const aCap = nTri * 72, bCap = nTri * 36, mCap = nTri * 9;
  const ai = new Int32Array(aCap), aj = new Int32Array(aCap), av = new Float64Array(aCap);
  const bi = new Int32Array(bCap), bj = new Int32Array(bCap), bv = new Float64Array(bCap);
  const mi = new Int32Array(mCap), mj = new Int32Array(mCap), mv = new Float64Array(mCap);
  let na = 0, nb = 0, nm = 0;
  const w = new Float64Array(np);
  // Edge-midpoint rule: barycentric points, weight |T|/3 each.
  const QP = [[0.5, 0.5, 0], [0, 0.5, 0.5], [0.5, 0, 0.5]];
  const Ke = new Float64Array(36), Be = new Float64Array(36), Me = new Float64Array(9), We = new Float64Array(3);
  const gx = new Float64Array(6), gy = new Float64Array(6);
  const triangle = (v: [number, number][]): void => {
    // v: three vertices as vertex-grid indices (i, j)
    const x = v.map(([i]) => i * h), y = v.map(([, j]) => j * h);
    const det = (x[1] - x[0]) * (y[2] - y[0]) - (x[2] - x[0]) * (y[1] - y[0]);
    const area = Math.abs(det) / 2;
    const gl: [number, number][] = [0, 1, 2].map((a) => {
      const b = (a + 1) % 3, c = (a + 2) % 3;
      return [(y[b] - y[c]) / det, (x[c] - x[b]) / det];
    });
    // Global indices: lattice points of the six P2 nodes, pressure vertices.
    const lat: [number, number][] = [...v.map(([i, j]) => [2 * i, 2 * j] as [number, number]),
      ...EDGE.map(([a, b]) => [v[a][0] + v[b][0], v[a][1] + v[b][1]] as [number, number])];
    const dof = lat.map(([I, J]) => vel(I, J));
    const pres = v.map(([i, j]) => i + j * (N + 1));
    Ke.fill(0); Be.fill(0); Me.fill(0); We.fill(0);
    const wq = area / 3;
    for (const lam of QP) {
      for (let a = 0; a < 3; a++) { gx[a] = (4 * lam[a] - 1) * gl[a][0]; gy[a] = (4 * lam[a] - 1) * gl[a][1]; }
      for (let e = 0; e < 3; e++) {
        const [a, b] = EDGE[e];
        gx[3 + e] = 4 * (lam[a] * gl[b][0] + lam[b] * gl[a][0]);
        gy[3 + e] = 4 * (lam[a] * gl[b][1] + lam[b] * gl[a][1]);
      }
      for (let r = 0; r < 6; r++) {
        for (let s2 = 0; s2 < 6; s2++) Ke[r * 6 + s2] += viscosity * wq * (gx[r] * gx[s2] + gy[r] * gy[s2]);
        // Be[i][c·6 + r] = −∫ λ_i ∂_c φ_r
        for (let i = 0; i < 3; i++) { Be[i * 12 + r] -= wq * lam[i] * gx[r]; Be[i * 12 + 6 + r] -= wq * lam[i] * gy[r]; }
      }
      for (let i = 0; i < 3; i++) {
        We[i] += wq * lam[i];
        for (let j = 0; j < 3; j++) Me[i * 3 + j] += wq * lam[i] * lam[j];
      }
    }
    for (let r = 0; r < 6; r++) {
      if (dof[r] < 0) continue;
      for (let s2 = 0; s2 < 6; s2++) {
        if (dof[s2] < 0) continue;
        for (let c = 0; c < 2; c++) { ai[na] = c * nI + dof[r]; aj[na] = c * nI + dof[s2]; av[na++] = Ke[r * 6 + s2]; }
      }
      for (let i = 0; i < 3; i++) {
        for (let c = 0; c < 2; c++) { bi[nb] = pres[i]; bj[nb] = c * nI + dof[r]; bv[nb++] = Be[i * 12 + c * 6 + r]; }
      }
    }
    for (let i = 0; i < 3; i++) {
      w[pres[i]] += We[i];
      for (let j = 0; j < 3; j++) { mi[nm] = pres[i]; mj[nm] = pres[j]; mv[nm++] = Me[i * 3 + j]; }
    }
  };
  for (let j = 0; j < N; j++) {
    for (let i = 0; i < N; i++) {
      if ((i + j) % 2 === 0) {
        triangle([[i, j], [i + 1, j], [i + 1, j + 1]]);
        triangle([[i, j], [i + 1, j + 1], [i, j + 1]]);
      } else {
        triangle([[i, j], [i + 1, j], [i, j + 1]]);
        triangle([[i + 1, j], [i + 1, j + 1], [i, j + 1]]);
      }
    }
  }
  return {
    A: csrFromTriplets(nu, nu, ai.subarray(0, na), aj.subarray(0, na), av.subarray(0, na)),
    B: csrFromTriplets(np, nu, bi.subarray(0, nb), bj.subarray(0, nb), bv.subarray(0, nb)),
    M: csrFromTriplets(np, np, mi.subarray(0, nm), mj.subarray(0, nm), mv.subarray(0, nm)),
    w, nu, np,
  };
}

/** The full matrix [[A, Bᵀ], [B, 0]] as dense rows (for the direct reference and the CG refusal). */
export function denseSaddle(A: Csr, B: Csr): number[][] {
  const nu = A.nRows, np = B.nRows, n = nu + np;
  const K = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < nu; i++) for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) K[i][A.colIdx[k]] += A.values[k];
  for (let i = 0; i < np; i++) {
    for (let k = B.rowPtr[i]; k < B.rowPtr[i + 1]; k++) { K[nu + i][B.colIdx[k]] += B.values[k]; K[B.colIdx[k]][nu + i] += B.values[k]; }
  }
  return K;
}
