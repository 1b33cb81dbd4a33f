/** Jacobi (diagonal) preconditioner M = diag(A); Saad (2003), Iterative Methods for Sparse Linear Systems, §10.2. */
import { RungsInputError } from '../../errors.ts';
import { diagonal } from '../csr.ts';
import type { Csr, Preconditioner } from '../types.ts';

export function jacobiPreconditioner(A: Csr): Preconditioner {
  const d = diagonal(A);
  const inv = new Float64Array(d.length);
  for (let i = 0; i < d.length; i++) {
    if (!(d[i] !== 0 && Number.isFinite(d[i]))) {
      throw new RungsInputError(`jacobi: diagonal entry ${i} is ${d[i]}; the Jacobi preconditioner needs a finite non-zero diagonal`,
        'linalg/precond/jacobi');
    }
    inv[i] = 1 / d[i];
  }
  return {
    name: 'jacobi',
    apply(r: Float64Array, z: Float64Array): void {
      for (let i = 0; i < inv.length; i++) z[i] = inv[i] * r[i];
    },
  };
}
