/** Strength of connection for smoothed aggregation: j is strongly coupled to i when
 *  |a_ij| ≥ θ·√(|a_ii|·|a_jj|) (Vaněk, Mandel & Brezina 1996, Computing 56, 179–196, §3).
 *  The same sweep forms the diagonal of the filtered matrix A_F (weak couplings lumped into the diagonal, §4) and
 *  Gershgorin's bound on ρ(D_F⁻¹A_F), which the prolongator smoothing needs. */
import type { Csr } from '../types.ts';

export interface StrengthGraph {
  /** strong[k] = 1 when entry k of A (off-diagonal, non-zero) is a strong coupling. */
  strong: Uint8Array;
  /** a^F_ii = a_ii + Σ_{weak j} a_ij (so A_F has the row sums of A). */
  filteredDiag: Float64Array;
  /** max_i Σ_j |a^F_ij| / |a^F_ii| ≥ ρ(D_F⁻¹A_F) (and ≥ 1). */
  gershgorinBound: number;
  /** a_ii ≥ Σ_{j≠i} |a_ij| in every row of A (up to round-off). */
  diagonallyDominant: boolean;
}

/** Smallest filtered diagonal accepted, as a fraction of a_ii. */
const MIN_FILTERED_DIAGONAL = 0.1;

export function strengthGraph(A: Csr, diag: Float64Array, theta: number, signed = false): StrengthGraph {
  const { nRows: n, rowPtr, colIdx, values } = A;
  const strong = new Uint8Array(values.length);
  const filteredDiag = new Float64Array(n);
  const theta2 = theta * theta;
  let bound = 1;
  let dominant = true;
  for (let i = 0; i < n; i++) {
    const di = diag[i];
    const cut = theta2 * Math.abs(di);
    let dF = di, off = 0, offAll = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j === i) continue;
      const a = values[k];
      offAll += Math.abs(a);
      if (a !== 0 && (signed ? -a : 1) > 0 && a * a >= cut * Math.abs(diag[j])) { strong[k] = 1; off += Math.abs(a); }
      else dF += a;
    }
    if (offAll > Math.abs(di) * (1 + 1e-12)) dominant = false;
    // Safeguard (our choice): lumping many weak negative couplings could leave a^F_ii near zero and blow up
    // the prolongator smoothing; fall back to a_ii then.
    if (!(dF > MIN_FILTERED_DIAGONAL * di)) dF = di;
    filteredDiag[i] = dF;
    if (dF !== 0) {
      const g = (Math.abs(dF) + off) / Math.abs(dF);
      if (g > bound) bound = g;
    }
  }
  return { strong, filteredDiag, gershgorinBound: bound, diagonallyDominant: dominant };
}
