/** The block-diagonal preconditioner diag(Â⁻¹, ν·Π M̃⁻¹ Πᵀ) of the Stokes saddle-point system (Elman, Silvester &
 *  Wathen 2014, Finite Elements and Fast Iterative Solvers, 2nd ed., ch. 4: for an inf-sup stable pair the pressure
 *  mass matrix is spectrally equivalent to the Schur complement B A⁻¹ Bᵀ, for viscosity ν to ν·B A⁻¹ Bᵀ ~ M, so
 *  S ≈ M/ν and MINRES counts do not grow with the mesh).
 *  Â⁻¹: one multigrid cycle from zero (amgSetup, symmetric smoothing: a fixed SPD operator).
 *  M̃⁻¹: Chebyshev steps or the diagonal (pressure-mass.ts), both fixed SPD operators.
 *  Π, Πᵀ: the projections of constant-pressure.ts, present only when the pressure is fixed up to a constant.
 *
 *  Why MINRES stays valid on the singular, consistent system. Let Z = range(K) = {(f, g) : 1ᵀg = 0} and
 *  Y = {(u, p) : wᵀp = 0}. C = diag(Â⁻¹, ν Π M̃⁻¹ Πᵀ) is symmetric, and on Z, where Πᵀ is the identity,
 *  rᵀ C r = r_uᵀ Â⁻¹ r_u + ν r_pᵀ M̃⁻¹ r_p > 0: C is positive definite on Z and maps Z one-to-one onto Y
 *  (Π M̃⁻¹ r_p = 0 with 1ᵀr_p = 0 forces r_p = 0). K maps Y one-to-one onto Z (its null space (0, 1) meets Y only
 *  in 0, as wᵀ1 ≠ 0). Preconditioned MINRES from x0 ∈ Y with b ∈ Z only ever forms vectors r ∈ Z and C r ∈ Y, so it
 *  is MINRES on the nonsingular map K: Y → Z with the SPD inner product of C on Z, and its iterates stay in Y.
 *  Round-off that leaves Z is cut off by Πᵀ on the way in and Π on the way out, at every application.
 *  Nothing is allocated per application: the velocity part goes through two vectors taken once from the multigrid
 *  preconditioner's own memory (Preconditioner.vector: then the cycle reads and writes them without staging copies),
 *  the pressure part through one scratch vector; no subarray views are created per call. */
import type { Preconditioner } from '../types.ts';
import type { MeanConstraint } from './constant-pressure.ts';
import type { MassApproximation } from './pressure-mass.ts';

export const BLOCK_PRECONDITIONER_NAME = 'block-diagonal(amg, mass)';

export interface BlockPreconditioner extends Preconditioner {
  /** Gives the velocity vectors back to the multigrid preconditioner (call before disposing it). */
  releaseVectors(): void;
}

export function blockDiagonalPreconditioner(
  nu: number, np: number, velocity: Preconditioner, mass: MassApproximation, viscosity: number,
  constraint: MeanConstraint | null,
): BlockPreconditioner {
  const take = (n: number): Float64Array => (velocity.vector ? velocity.vector(n) : new Float64Array(n));
  const ru = take(nu), zu = take(nu);
  const rp = new Float64Array(np), zp = new Float64Array(np);
  return {
    name: BLOCK_PRECONDITIONER_NAME,
    apply(r: Float64Array, z: Float64Array): void {
      for (let i = 0; i < nu; i++) ru[i] = r[i];
      velocity.apply(ru, zu);
      for (let i = 0; i < nu; i++) z[i] = zu[i];
      if (!constraint) {
        for (let i = 0; i < np; i++) rp[i] = r[nu + i];
        mass.apply(rp, zp);
        for (let i = 0; i < np; i++) z[nu + i] = viscosity * zp[i];
        return;
      }
      // Πᵀ r_p, M̃⁻¹, then Π (r is the solver's vector and stays untouched).
      const { w, wSum } = constraint;
      let s = 0;
      for (let i = 0; i < np; i++) s += r[nu + i];
      const f = s / wSum;
      for (let i = 0; i < np; i++) rp[i] = r[nu + i] - f * w[i];
      mass.apply(rp, zp);
      let t = 0;
      for (let i = 0; i < np; i++) t += w[i] * zp[i];
      const c = t / wSum;
      for (let i = 0; i < np; i++) z[nu + i] = viscosity * (zp[i] - c);
    },
    releaseVectors(): void {
      velocity.release?.(ru);
      velocity.release?.(zu);
    },
  };
}
