/** The constant pressure mode and the mean constraint wᵀp = 0.
 *
 *  With the velocity fixed on the whole boundary, Bᵀ·1 = 0 (Σ_i q_i = 1 for a Lagrange pressure basis and
 *  ∫ ∇·v = ∫_∂Ω v·n = 0 for every free velocity basis function v), so K = [[A, Bᵀ], [B, 0]] has the null vector
 *  (0, 1) and p is fixed only up to a constant (Elman, Silvester & Wathen 2014, §3.3, from memory). Detection:
 *  Bᵀ·1 is compared with the column sums of |B| (one pass over B); the caller may also state it
 *  (pressureDeterminedUpToConstant), and a statement that contradicts B is refused.
 *
 *  The constraint wᵀp = 0 (w: the integrals of the pressure basis functions, wᵀ1 = |Ω| ≠ 0) is imposed without
 *  pinning an unknown, with the two oblique projections
 *      Π  = I − 1 wᵀ / (wᵀ1)   onto {p : wᵀp = 0},
 *      Πᵀ = I − w 1ᵀ / (1ᵀw)   onto {r : 1ᵀr = 0} = the pressure part of range(K).
 *  The right-hand side g is made consistent by Πᵀ g (the datum's mean removed: exactly what the bordered system
 *  [[A, Bᵀ, 0], [B, 0, w], [0, wᵀ, 0]] does with its multiplier λ = 1ᵀg / 1ᵀw). */
import { RungsInputError } from '../../errors.ts';
import type { Csr } from '../types.ts';

const WHERE = 'linalg/saddle';
/** |Bᵀ·1|_∞ at or below this fraction of the largest column sum of |B| counts as zero (round-off of the assembly). */
export const CONSTANT_MODE_TOL = 1e-10;

/** Whether the constant pressure lies in the null space of Bᵀ (B: np × nu). */
export function constantPressureIsFree(B: Csr): boolean {
  const { nRows, nCols, rowPtr, colIdx, values } = B;
  if (nRows === 0) return false;
  const sum = new Float64Array(nCols);
  const abs = new Float64Array(nCols);
  for (let i = 0; i < nRows; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) { sum[colIdx[k]] += values[k]; abs[colIdx[k]] += Math.abs(values[k]); }
  }
  let maxSum = 0, maxAbs = 0;
  for (let j = 0; j < nCols; j++) { maxSum = Math.max(maxSum, Math.abs(sum[j])); maxAbs = Math.max(maxAbs, abs[j]); }
  return maxAbs > 0 && maxSum <= CONSTANT_MODE_TOL * maxAbs;
}

/** Whether C·1 = 0 (|C·1|_∞ at most CONSTANT_MODE_TOL of the largest absolute row sum of C): a pressure block C that
 *  does not see the constant pressure (a stabilising pressure Laplacian), unlike C = M/λ. */
export function constantInKernelOf(C: Csr): boolean {
  const { nRows, rowPtr, values } = C;
  let maxSum = 0, maxAbs = 0;
  for (let i = 0; i < nRows; i++) {
    let s = 0, a = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) { s += values[k]; a += Math.abs(values[k]); }
    maxSum = Math.max(maxSum, Math.abs(s));
    maxAbs = Math.max(maxAbs, a);
  }
  return maxSum <= CONSTANT_MODE_TOL * maxAbs;
}

/** The mean constraint, checked and with 1ᵀw precomputed. */
export interface MeanConstraint {
  w: Float64Array;
  /** 1ᵀw (= |Ω| for the integrals of the basis functions). */
  wSum: number;
}

/** Checks the caller's statement and the constraint against B; returns the constraint when the pressure needs one. */
export function meanConstraintFor(
  B: Csr, w: Float64Array | undefined, stated: boolean | undefined, C?: Csr,
): MeanConstraint | null {
  const np = B.nRows;
  const freeInB = constantPressureIsFree(B);
  // With a pressure block C (the system [[A, Bᵀ], [B, −C]]) the constant is free only when C·1 = 0 as well.
  const fixedByC = C !== undefined && freeInB && !constantInKernelOf(C);
  const free = freeInB && !fixedByC;
  if (fixedByC && stated === true) {
    throw new RungsInputError(
      'saddle point: pressureDeterminedUpToConstant is true, but the pressure block C fixes the constant (Bᵀ·1 = 0 and ' +
        'C·1 ≠ 0, e.g. C = M/λ of a nearly incompressible material); set it to false and give no meanConstraint', WHERE);
  }
  if (fixedByC && w) {
    throw new RungsInputError(
      'saddle point: meanConstraint was given, but the pressure block C already determines the pressure (C·1 ≠ 0); ' +
        'a mean constraint would over-determine it: leave meanConstraint out', WHERE);
  }
  if (stated !== undefined && stated !== free) {
    throw new RungsInputError(
      stated
        ? 'saddle point: pressureDeterminedUpToConstant is true, but Bᵀ·1 ≠ 0: the constant pressure is not free ' +
          '(some velocity boundary is not fixed, e.g. an outflow boundary); set it to false and give no meanConstraint'
        : `saddle point: pressureDeterminedUpToConstant is false, but Bᵀ·1 = 0${C ? ' and C·1 = 0' : ''}: the pressure is fixed only up to a ` +
          'constant (the velocity is fixed on the whole boundary); set it to true and give meanConstraint',
      WHERE);
  }
  if (!free) {
    if (w) {
      throw new RungsInputError(
        'saddle point: meanConstraint was given, but the pressure is already determined (Bᵀ·1 ≠ 0: some velocity ' +
          'boundary is not fixed); a mean constraint would over-determine it: leave meanConstraint out', WHERE);
    }
    return null;
  }
  if (!w) {
    throw new RungsInputError(
      `saddle point: the pressure is determined only up to a constant (Bᵀ·1 = 0${C ? ' and C·1 = 0' : ''}: the velocity is fixed on the whole ` +
        'boundary), and no meanConstraint was given; give meanConstraint = the integrals of the pressure basis ' +
        'functions (the solution then has wᵀp = 0, mean pressure zero)', WHERE);
  }
  if (w.length !== np) {
    throw new RungsInputError(`saddle point: meanConstraint has length ${w.length}, expected ${np} (one entry per pressure unknown)`, WHERE);
  }
  let wSum = 0, wAbs = 0;
  for (let i = 0; i < np; i++) {
    if (!Number.isFinite(w[i])) throw new RungsInputError(`saddle point: meanConstraint entry ${i} is ${w[i]}`, WHERE);
    wSum += w[i];
    wAbs += Math.abs(w[i]);
  }
  if (!(Math.abs(wSum) > 1e-12 * wAbs)) {
    throw new RungsInputError(
      `saddle point: meanConstraint w has 1ᵀw = ${wSum}: it does not fix the constant (wᵀ1 must be non-zero); ` +
        'give the integrals of the pressure basis functions', WHERE);
  }
  return { w, wSum };
}

/** r ← Πᵀ r = r − w (1ᵀr)/(1ᵀw); returns 1ᵀr before the projection. */
export function removeMeanOfDatum(c: MeanConstraint, r: Float64Array): number {
  const n = r.length;
  let s = 0;
  for (let i = 0; i < n; i++) s += r[i];
  const f = s / c.wSum;
  const w = c.w;
  for (let i = 0; i < n; i++) r[i] -= f * w[i];
  return s;
}

/** p ← Π p = p − 1 (wᵀp)/(wᵀ1): the same residual (1 spans the pressure null space), and wᵀp = 0. */
export function removeConstant(c: MeanConstraint, p: Float64Array): void {
  const n = p.length;
  const w = c.w;
  let s = 0;
  for (let i = 0; i < n; i++) s += w[i] * p[i];
  const f = s / c.wSum;
  for (let i = 0; i < n; i++) p[i] -= f;
}
