/** Strength of connection for smoothed aggregation: j is strongly coupled to i when
 *  −a_ij ≥ θ·√(a_ii·a_jj). The scaling is that of Vaněk, Mandel & Brezina (1996), Computing 56, 179–196, §3; only
 *  negative couplings count, as in Ruge & Stüben (1987), "Algebraic multigrid", in McCormick (ed.), Multigrid
 *  Methods, SIAM, ch. 4 (from memory). Higher-order Lagrange stiffness matrices have positive off-diagonals (P2
 *  vertex–vertex: +k/3 against a diagonal of 4k, scaled 1/12 > θ = 0.08). Counted as strong (|a_ij| in place of
 *  −a_ij) they tie the vertices to each other and give aggregates of 12 dofs on average and 63 PCG iterations on
 *  P2 at 1M unknowns (operator complexity 1.13); left out, 8 dofs and 18 iterations (measured).
 *  The same sweep forms the diagonal of the filtered matrix A_F (weak couplings lumped into the diagonal, §4) and
 *  Gershgorin's bound on ρ(D_F⁻¹A_F), which the prolongator smoothing needs. */
import { heapAllocator, type Allocator } from '../kernels/allocator.ts';
import type { Csr } from '../types.ts';

/** How a row takes part in the aggregation. */
export const HAS_STRONG = 0;
/** Coupled (some |a_ij| ≥ θ√(a_ii a_jj)) but with no strong negative coupling: joins a neighbour's aggregate. */
export const ONLY_WEAK = 1;
/** No coupling of size θ√(a_ii a_jj) at all (e.g. a Dirichlet row kept as an identity row): left out of the
 *  coarse space, the smoother solves it. */
export const DECOUPLED = 2;

export interface StrengthGraph {
  /** strong[k] = 1 when entry k of A (off-diagonal) is a strong coupling. */
  strong: Uint8Array;
  /** Number of strong entries. */
  strongCount: number;
  /** HAS_STRONG, ONLY_WEAK or DECOUPLED per row. */
  rowKind: Uint8Array;
  /** a^F_ii = a_ii + Σ_{weak j} a_ij (so A_F has the row sums of A). */
  filteredDiag: Float64Array;
  /** max_i Σ_j |a^F_ij| / |a^F_ii| ≥ ρ(D_F⁻¹A_F) (and ≥ 1). */
  gershgorinBound: number;
  /** a_ii ≥ Σ_{j≠i} |a_ij| in every row of A (up to round-off). */
  diagonallyDominant: boolean;
}

/** Smallest filtered diagonal accepted, as a fraction of a_ii. */
const MIN_FILTERED_DIAGONAL = 0.1;
/** A row counts as diagonally dominant when Σ_{j≠i} |a_ij| ≤ a_ii · DOMINANCE (room for round-off). */
const DOMINANCE = 1 + 1e-12;

export function strengthGraph(A: Csr, diag: Float64Array, theta: number, alloc: Allocator = heapAllocator): StrengthGraph {
  const { nRows: n, rowPtr, colIdx, values } = A;
  const strong = alloc.u8(values.length);
  const rowKind = alloc.u8(n, false);
  const filteredDiag = alloc.f64(n, false);
  const theta2 = theta * theta;
  const wasm = alloc.wasm;
  if (wasm && wasm.owns(rowPtr, colIdx, values, diag, strong, rowKind, filteredDiag)) {
    const out = alloc.f64(2, false);
    if (wasm.owns(out)) {
      // The same loop as below, as the kernel strengthGraph (sparse.wat), with the same constants.
      const strongCount = wasm.kernels.strengthGraph(n, rowPtr.byteOffset, colIdx.byteOffset, values.byteOffset,
        diag.byteOffset, theta2, DOMINANCE, MIN_FILTERED_DIAGONAL, strong.byteOffset, rowKind.byteOffset,
        filteredDiag.byteOffset, out.byteOffset);
      const gershgorinBound = out[0], diagonallyDominant = out[1] === 1;
      alloc.free(out);
      return { strong, strongCount, rowKind, filteredDiag, gershgorinBound, diagonallyDominant };
    }
    alloc.free(out);
  }
  let bound = 1;
  let dominant = true;
  let strongCount = 0;
  for (let i = 0; i < n; i++) {
    const di = diag[i];
    const cut = theta2 * Math.abs(di);
    let dF = di, off = 0, offAll = 0;
    let coupled = false, anyStrong = false;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j === i) continue;
      const a = values[k];
      offAll += Math.abs(a);
      if (a * a >= cut * Math.abs(diag[j]) && a !== 0) {
        coupled = true;
        if (a < 0) { strong[k] = 1; anyStrong = true; strongCount++; off -= a; continue; }
      }
      dF += a;
    }
    rowKind[i] = anyStrong ? HAS_STRONG : coupled ? ONLY_WEAK : DECOUPLED;
    if (offAll > Math.abs(di) * DOMINANCE) dominant = false;
    // Safeguard (our choice): lumping many weak negative couplings could leave a^F_ii near zero and blow up
    // the prolongator smoothing; fall back to a_ii then.
    if (!(dF > MIN_FILTERED_DIAGONAL * di)) dF = di;
    filteredDiag[i] = dF;
    if (dF !== 0) {
      const g = (Math.abs(dF) + off) / Math.abs(dF);
      if (g > bound) bound = g;
    }
  }
  return { strong, strongCount, rowKind, filteredDiag, gershgorinBound: bound, diagonallyDominant: dominant };
}
