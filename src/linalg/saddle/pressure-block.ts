/** Saddle-point systems with a pressure block, K = [[A, Bᵀ], [B, −C]], C symmetric positive semidefinite: mixed
 *  formulations of nearly incompressible elasticity (C = (1/λ) M; Braess 2007, Finite Elements, ch. VI §3), and
 *  stabilised pairs (C a pressure Laplacian). The case C = 0 (Stokes) does not pass through this file.
 *
 *  The Schur complement is S = B A⁻¹ Bᵀ + C. For an inf-sup stable pair, with A = a(·,·) for a(u, u) ≈ 2μ|ε(u)|²
 *  (viscosity ν = 2μ), B A⁻¹ Bᵀ is spectrally equivalent to M/ν with constants that depend neither on h nor on C
 *  (Elman, Silvester & Wathen 2014, ch. 4), so S is spectrally equivalent to Ŝ = M/ν + C, uniformly in C ⪰ 0:
 *  both terms are positive semidefinite, and adding the same C to two equivalent forms keeps the constants
 *  (min(c, 1) and max(C, 1)). For C = (1/λ) M that is Ŝ = (1/ν + 1/λ) M, the pressure block of the robust
 *  preconditioner of the mixed elasticity system (Mardal & Winther 2011, Numer. Linear Algebra Appl. 18, 1–40, §5,
 *  from memory: the pressure space normed by (1/(2μ) + 1/λ)^(1/2) ‖·‖_L2). The preconditioner is
 *  diag(Â⁻¹, Ŝ̃⁻¹): a multigrid cycle for A and Chebyshev steps on Ŝ (pressure-mass.ts; Ŝ is a weighted mass
 *  matrix when C is one).
 *
 *  One exception: the constant pressure. With the displacement fixed on the whole boundary, Bᵀ·1 = 0
 *  (constant-pressure.ts), so the constant is seen by S only through C: S·1 = C·1. For C = M/λ the Schur
 *  complement is S ≈ (1/ν)‖q − q̄‖² + (1/λ)‖q‖², while Ŝ gives (1/ν + 1/λ)‖q‖²: on the constant the two differ by
 *  the factor 1 + λ/ν, which grows without bound (the constant is then a near null vector of K, an eigenvalue of the
 *  preconditioned matrix near ν/λ that MINRES must resolve: more iterations as λ grows). The remedy is to treat the
 *  constant apart (the same decomposition Q = L²₀ ⊕ ℝ as in Mardal & Winther 2011, §5): with w = M·1 (the integrals
 *  of the pressure basis functions, Σ_j q_j = 1) and Π = I − 1 wᵀ/(wᵀ1),
 *      P_p = Π Ŝ̃⁻¹ Πᵀ + 1 1ᵀ / (1ᵀ C 1).
 *  Exactly for C = M/λ and Ŝ̃⁻¹ = Ŝ⁻¹, P_p⁻¹ is the form α‖q₀‖² + (1/λ)|Ω| c² of q = q₀ + c·1 (wᵀq₀ = 0,
 *  α = 1/ν + 1/λ), which is S's up to the inf-sup constants on L²₀. P_p is symmetric positive definite whatever Ŝ̃
 *  is (SPD): rᵀP_p r = (Πᵀr)ᵀŜ̃⁻¹(Πᵀr) + (1ᵀr)²/(1ᵀC1) vanishes only when 1ᵀr = 0 and Πᵀr = r = 0.
 *  When C·1 = 0 as well, the constant is free in K; then the mean constraint of constant-pressure.ts applies, with
 *  P_p = Π Ŝ̃⁻¹ Πᵀ as in the Stokes case.
 *
 *  Nothing is allocated per application: work vectors are taken once at setup. */
import { RungsInputError } from '../../errors.ts';
import { assertFiniteMatrix, csrFromTriplets, isSymmetric } from '../csr.ts';
import { CG_SYMMETRY_TOL } from '../cg.ts';
import { saddlePointOperator, type SaddleOperator } from './block-operator.ts';
import type { Csr, Preconditioner } from '../types.ts';
import { CONSTANT_MODE_TOL, type MeanConstraint } from './constant-pressure.ts';
import type { MassApproximation } from './pressure-mass.ts';

const WHERE = 'linalg/saddle';

export const PRESSURE_BLOCK_PRECONDITIONER_NAME = 'block-diagonal(amg, M/ν + C)';

/** Checks C: np × np, finite, symmetric, non-negative diagonal (necessary for positive semidefinite; the rest is the
 *  caller's word, and the Lanczos estimate of M/ν + C in pressure-mass.ts refuses a sum that is not definite). */
export function checkPressureBlock(C: Csr, np: number): void {
  if (C.nRows !== np || C.nCols !== np) {
    throw new RungsInputError(`saddle point: pressureBlock C is ${C.nRows}×${C.nCols}; it must be ${np}×${np} (one row and column per pressure unknown)`, WHERE);
  }
  assertFiniteMatrix(C, WHERE);
  if (!isSymmetric(C, CG_SYMMETRY_TOL)) {
    throw new RungsInputError('saddle point: pressureBlock C is not symmetric; the system [[A, Bᵀ], [B, −C]] must be symmetric for MINRES', WHERE);
  }
  for (let i = 0; i < np; i++) {
    for (let k = C.rowPtr[i]; k < C.rowPtr[i + 1]; k++) {
      if (C.colIdx[k] === i && C.values[k] < 0) {
        throw new RungsInputError(
          `saddle point: pressureBlock C has diagonal entry ${i} = ${C.values[k]} < 0; C must be positive semidefinite ` +
            '(the system is [[A, Bᵀ], [B, −C]]: give C, not −C)', WHERE);
      }
    }
  }
}

/** Ŝ = M/ν + C as one CSR matrix (the union of the two patterns; set up once). */
export function schurApproximation(M: Csr, C: Csr, viscosity: number): Csr {
  const n = M.nRows;
  const nnz = M.rowPtr[n] + C.rowPtr[n];
  const ri = new Int32Array(nnz), ci = new Int32Array(nnz), v = new Float64Array(nnz);
  let k = 0;
  const s = 1 / viscosity;
  for (let i = 0; i < n; i++) {
    for (let p = M.rowPtr[i]; p < M.rowPtr[i + 1]; p++) { ri[k] = i; ci[k] = M.colIdx[p]; v[k++] = s * M.values[p]; }
    for (let p = C.rowPtr[i]; p < C.rowPtr[i + 1]; p++) { ri[k] = i; ci[k] = C.colIdx[p]; v[k++] = C.values[p]; }
  }
  return csrFromTriplets(n, n, ri, ci, v);
}

/** The constant pressure treated apart (see the file comment): w = M·1, 1ᵀw, and 1ᵀC1. */
export interface ConstantPressureMode {
  w: Float64Array;
  wSum: number;
  /** 1ᵀ C 1 > 0. */
  cConst: number;
}

export function constantPressureMode(M: Csr, C: Csr): ConstantPressureMode {
  const n = M.nRows;
  const w = new Float64Array(n);
  let wSum = 0, cConst = 0, cAbs = 0;
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let k = M.rowPtr[i]; k < M.rowPtr[i + 1]; k++) s += M.values[k];
    w[i] = s;
    wSum += s;
    for (let k = C.rowPtr[i]; k < C.rowPtr[i + 1]; k++) { cConst += C.values[k]; cAbs += Math.abs(C.values[k]); }
  }
  if (!(wSum > 0)) throw new RungsInputError(`saddle point: 1ᵀM1 = ${wSum}; the pressure mass matrix must have a positive total (the domain's area)`, WHERE);
  if (!(cConst > CONSTANT_MODE_TOL * cAbs)) {
    throw new RungsInputError(`saddle point: 1ᵀC1 = ${cConst} is not positive; C must be positive semidefinite`, WHERE);
  }
  return { w, wSum, cConst };
}

/** K = [[A, Bᵀ], [B, −C]] applied block by block (Bᵀ transposed once at setup); allocates nothing per product. */
export function saddlePointOperatorWithPressureBlock(
  A: Csr, B: Csr, C: Csr, opts: Parameters<typeof saddlePointOperator>[3] = {},
): SaddleOperator {
  return saddlePointOperator(A, B, C, opts);
}

export interface PressureBlockPreconditioner extends Preconditioner {
  releaseVectors(): void;
}

/** diag(Â⁻¹, P_p) with P_p = Ŝ̃⁻¹, Π Ŝ̃⁻¹ Πᵀ (mean constraint: the constant free in K) or Π Ŝ̃⁻¹ Πᵀ + 1 1ᵀ/(1ᵀC1)
 *  (the constant seen only by C). `schur` approximates (M/ν + C)⁻¹. At most one of `constraint` and `constant`. */
export function pressureBlockPreconditioner(
  nu: number, np: number, velocity: Preconditioner, schur: MassApproximation,
  constraint: MeanConstraint | null, constant: ConstantPressureMode | null,
): PressureBlockPreconditioner {
  if (constraint && constant) throw new Error('internal: the constant pressure is either free (mean constraint) or seen by C, not both');
  const take = (n: number): Float64Array => (velocity.vector ? velocity.vector(n) : new Float64Array(n));
  const ru = take(nu), zu = take(nu);
  const rp = new Float64Array(np), zp = new Float64Array(np);
  const proj = constraint ?? constant;
  return {
    name: PRESSURE_BLOCK_PRECONDITIONER_NAME,
    apply(r: Float64Array, z: Float64Array): void {
      for (let i = 0; i < nu; i++) ru[i] = r[i];
      velocity.apply(ru, zu);
      for (let i = 0; i < nu; i++) z[i] = zu[i];
      if (!proj) {
        for (let i = 0; i < np; i++) rp[i] = r[nu + i];
        schur.apply(rp, zp);
        for (let i = 0; i < np; i++) z[nu + i] = zp[i];
        return;
      }
      // Πᵀ r_p, Ŝ̃⁻¹, Π; then the constant's own part 1 (1ᵀr_p)/(1ᵀC1) when C fixes it.
      const { w, wSum } = proj;
      let s = 0;
      for (let i = 0; i < np; i++) s += r[nu + i];
      const f = s / wSum;
      for (let i = 0; i < np; i++) rp[i] = r[nu + i] - f * w[i];
      schur.apply(rp, zp);
      let t = 0;
      for (let i = 0; i < np; i++) t += w[i] * zp[i];
      const c = t / wSum - (constant ? s / constant.cConst : 0);
      for (let i = 0; i < np; i++) z[nu + i] = zp[i] - c;
    },
    releaseVectors(): void {
      velocity.release?.(ru);
      velocity.release?.(zu);
    },
  };
}
