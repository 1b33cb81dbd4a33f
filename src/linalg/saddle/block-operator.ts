/** K = [[A, Bᵀ], [B, −C]] (C absent: 0) applied block by block on vectors [u; p] (u: nu entries, p: np): no assembled copy of K.
 *  Bᵀ is transposed once at setup so that both products run row by row. Allocates nothing per product. */
import { transpose } from '../csr.ts';
import type { SymmetricOperator } from '../minres.ts';
import type { Csr } from '../types.ts';

export function saddlePointOperator(A: Csr, B: Csr, C?: Csr): SymmetricOperator {
  const nu = A.nRows, np = B.nRows;
  // The pressure block −C of nearly incompressible elasticity, when there is one.
  const cp = C?.rowPtr, cc = C?.colIdx, cv = C?.values;
  const Bt = transpose(B);
  const { rowPtr: ap, colIdx: ac, values: av } = A;
  const { rowPtr: tp, colIdx: tc, values: tv } = Bt;
  const { rowPtr: bp, colIdx: bc, values: bv } = B;
  return {
    n: nu + np,
    apply(x: Float64Array, y: Float64Array): void {
      // y_u = A x_u + Bᵀ x_p
      for (let i = 0; i < nu; i++) {
        let s = 0;
        for (let k = ap[i]; k < ap[i + 1]; k++) s += av[k] * x[ac[k]];
        for (let k = tp[i]; k < tp[i + 1]; k++) s += tv[k] * x[nu + tc[k]];
        y[i] = s;
      }
      // y_p = B x_u (− C x_p)
      for (let i = 0; i < np; i++) {
        let s = 0;
        for (let k = bp[i]; k < bp[i + 1]; k++) s += bv[k] * x[bc[k]];
        if (cp) for (let k = cp[i]; k < cp[i + 1]; k++) s -= cv![k] * x[nu + cc![k]];
        y[nu + i] = s;
      }
    },
  };
}
