/** Smoothed-aggregation prolongator P = (I − ω D_F⁻¹ A_F) P̂ (Vaněk, Mandel & Brezina 1996, Computing 56, 179–196,
 *  §3–4). P̂ is the tentative prolongator: the constant vector on each aggregate, scaled to unit length (the
 *  near-null space of a scalar diffusion operator). A_F is the filtered matrix (weak couplings dropped and added to
 *  the diagonal). ω = 4/(3ρ) with ρ ≥ ρ(D_F⁻¹A_F): Gershgorin's bound, or a Lanczos estimate when asked for. */
import type { Csr } from '../types.ts';
import type { Aggregation } from './aggregation.ts';
import { lanczosSpectralRadius } from './spectral-radius.ts';
import type { StrengthGraph } from './strength.ts';

export function smoothedProlongator(A: Csr, graph: StrengthGraph, agg: Aggregation, lanczosSteps = 0): Csr {
  const { nRows: n, rowPtr, colIdx, values } = A;
  const { strong, filteredDiag: dF } = graph;
  const { aggregateOf, count } = agg;
  // Tentative prolongator values 1/√|aggregate|.
  const size = new Float64Array(count);
  for (let i = 0; i < n; i++) if (aggregateOf[i] >= 0) size[aggregateOf[i]]++;
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) if (aggregateOf[i] >= 0) t[i] = 1 / Math.sqrt(size[aggregateOf[i]]);

  let rho = graph.gershgorinBound;
  if (lanczosSteps > 0) rho = lanczosSpectralRadius(A, strong, dF, lanczosSteps, rho);
  const omega = (Number(process.env.AMG_OMEGA ?? 4 / 3)) / rho;

  // Row i: t_i(1 − ω) on agg(i), −ω a_ij t_j / a^F_ii on agg(j) for strong j. A row has at most nnz(row i of A)
  // entries and only a few in practice, so it is kept sorted by insertion as it grows.
  const pPtr = new Int32Array(n + 1);
  const pCol = new Int32Array(rowPtr[n]);
  const pVal = new Float64Array(rowPtr[n]);
  let nnz = 0;
  for (let i = 0; i < n; i++) {
    const rowStart = nnz;
    const ai = aggregateOf[i];
    if (ai >= 0) {
      const scale = -omega / dF[i];
      pCol[nnz] = ai; pVal[nnz] = t[i] * (1 - omega); nnz++;
      for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
        if (!strong[k]) continue;
        const j = colIdx[k];
        const aj = aggregateOf[j];
        if (aj < 0) continue;
        const v = scale * values[k] * t[j];
        let p = nnz - 1;
        while (p >= rowStart && pCol[p] > aj) p--;
        if (p >= rowStart && pCol[p] === aj) pVal[p] += v;
        else {
          for (let s = nnz; s > p + 1; s--) { pCol[s] = pCol[s - 1]; pVal[s] = pVal[s - 1]; }
          pCol[p + 1] = aj; pVal[p + 1] = v; nnz++;
        }
      }
    }
    pPtr[i + 1] = nnz;
  }
  return { nRows: n, nCols: count, rowPtr: pPtr, colIdx: pCol.slice(0, nnz), values: pVal.slice(0, nnz) };
}
