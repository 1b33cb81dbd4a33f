/** Smoothed-aggregation prolongator P = (I − ω D_F⁻¹ A_F) P̂ (Vaněk, Mandel & Brezina 1996, Computing 56, 179–196,
 *  §3–4). P̂ is the tentative prolongator: the constant vector on each aggregate, scaled to unit length (the
 *  near-null space of a scalar diffusion operator). A_F is the filtered matrix (weak couplings dropped and added to
 *  the diagonal). ω = 4/(3ρ) with ρ ≥ ρ(D_F⁻¹A_F): Gershgorin's bound, or a Lanczos estimate when asked for. */
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import { sortLongRows } from '../spgemm.ts';
import type { Csr } from '../types.ts';
import type { Aggregation } from './aggregation.ts';
import { lanczosSpectralRadius } from './spectral-radius.ts';
import type { StrengthGraph } from './strength.ts';

export function smoothedProlongator(
  A: Csr, graph: StrengthGraph, agg: Aggregation, lanczosSteps = 0, alloc: Allocator = heapAllocator,
): Csr {
  const { nRows: n, rowPtr, colIdx, values } = A;
  const { strong, filteredDiag: dF } = graph;
  const { aggregateOf, count } = agg;
  // Tentative prolongator values 1/√|aggregate|.
  const size = alloc.f64(count);
  for (let i = 0; i < n; i++) if (aggregateOf[i] >= 0) size[aggregateOf[i]]++;
  for (let a = 0; a < count; a++) size[a] = 1 / Math.sqrt(size[a]);
  const t = alloc.f64(n);
  for (let i = 0; i < n; i++) if (aggregateOf[i] >= 0) t[i] = size[aggregateOf[i]];

  let rho = graph.gershgorinBound;
  if (lanczosSteps > 0) rho = lanczosSpectralRadius(A, strong, dF, lanczosSteps, rho, alloc);
  const omega = 4 / (3 * rho);

  // Row i: t_i(1 − ω) on agg(i), −ω a_ij t_j / a^F_ii on agg(j) for strong j. slot[a] is the position of aggregate
  // a in the row being built, valid while owner[a] is that row.
  const owner = alloc.i32(count, false).fill(-1);
  const slot = alloc.i32(count, false);
  const pPtr = alloc.i32(n + 1);
  // At most one entry per strong coupling plus one per row; the unused tail is given back at the end.
  const cap = n + graph.strongCount;
  const pCol = alloc.i32(cap, false);
  const pVal = alloc.f64(cap, false);
  const wasm = alloc.wasm;
  if (wasm && wasm.owns(rowPtr, colIdx, values, strong, aggregateOf, t, dF, owner, slot, pPtr, pCol, pVal)) {
    // The same loop as below, as the kernel prolongatorRows (sparse.wat).
    const nnz = wasm.kernels.prolongatorRows(n, rowPtr.byteOffset, colIdx.byteOffset, values.byteOffset, strong.byteOffset,
      aggregateOf.byteOffset, t.byteOffset, dF.byteOffset, omega, 1 - omega, owner.byteOffset, slot.byteOffset,
      pPtr.byteOffset, pCol.byteOffset, pVal.byteOffset);
    sortLongRows(pPtr, pCol, pVal, n);
    alloc.free(size); alloc.free(t); alloc.free(owner); alloc.free(slot);
    return { nRows: n, nCols: count, rowPtr: pPtr, colIdx: alloc.shrink(pCol, nnz), values: alloc.shrink(pVal, nnz) };
  }
  let nnz = 0;
  for (let i = 0; i < n; i++) {
    const ai = aggregateOf[i];
    const lo = rowPtr[i], hi = rowPtr[i + 1];
    if (ai >= 0) {
      const rowStart = nnz;
      const scale = -omega / dF[i];
      owner[ai] = i; slot[ai] = nnz;
      pCol[nnz] = ai; pVal[nnz] = t[i] * (1 - omega); nnz++;
      for (let k = lo; k < hi; k++) {
        if (!strong[k]) continue;
        const j = colIdx[k];
        const aj = aggregateOf[j];
        if (aj < 0) continue;
        const v = scale * values[k] * t[j];
        if (owner[aj] === i) pVal[slot[aj]] += v;
        else { owner[aj] = i; slot[aj] = nnz; pCol[nnz] = aj; pVal[nnz] = v; nnz++; }
      }
      // Insertion sort: a row holds a handful of aggregates.
      for (let p = rowStart + 1; p < nnz; p++) {
        const c = pCol[p], v = pVal[p];
        let q = p - 1;
        while (q >= rowStart && pCol[q] > c) { pCol[q + 1] = pCol[q]; pVal[q + 1] = pVal[q]; q--; }
        pCol[q + 1] = c; pVal[q + 1] = v;
      }
    }
    pPtr[i + 1] = nnz;
  }
  alloc.free(size); alloc.free(t); alloc.free(owner); alloc.free(slot);
  return { nRows: n, nCols: count, rowPtr: pPtr, colIdx: alloc.shrink(pCol, nnz), values: alloc.shrink(pVal, nnz) };
}
