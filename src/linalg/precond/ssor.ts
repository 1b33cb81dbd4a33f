/** SSOR preconditioner M = (D + ωL) D⁻¹ (D + ωU) / (ω(2 − ω)), A = L + D + U; ω = 1 is symmetric Gauss–Seidel.
 *  Saad (2003), Iterative Methods for Sparse Linear Systems, §10.2 (SSOR preconditioning). Symmetric when A is. */
import { RungsInputError } from '../../errors.ts';
import { diagonalPositions } from '../csr.ts';
import type { Csr, Preconditioner } from '../types.ts';

export function ssorPreconditioner(A: Csr, omega = 1): Preconditioner {
  const where = 'linalg/precond/ssor';
  if (!(omega > 0 && omega < 2)) throw new RungsInputError(`ssor: omega must lie in (0, 2), got ${omega}`, where);
  const { nRows: n, rowPtr, colIdx, values } = A;
  const diagPos = diagonalPositions(A);
  const invD = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const d = diagPos[i] >= 0 ? values[diagPos[i]] : 0;
    if (!(d !== 0 && Number.isFinite(d))) {
      throw new RungsInputError(`ssor: diagonal entry ${i} is ${d}; SSOR needs a finite non-zero diagonal`, where);
    }
    invD[i] = 1 / d;
  }
  const scale = omega * (2 - omega);
  return {
    name: omega === 1 ? 'ssor' : `ssor(ω=${omega})`,
    apply(r: Float64Array, z: Float64Array): void {
      // (D + ωL) y = r, y kept in z.
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let k = rowPtr[i]; k < diagPos[i]; k++) s += values[k] * z[colIdx[k]];
        z[i] = (r[i] - omega * s) * invD[i];
      }
      // (D + ωU) z = ω(2 − ω) D y, from the last row up.
      for (let i = n - 1; i >= 0; i--) {
        let s = 0;
        for (let k = diagPos[i] + 1; k < rowPtr[i + 1]; k++) s += values[k] * z[colIdx[k]];
        z[i] = scale * z[i] - omega * s * invD[i];
      }
    },
  };
}
