/** Galerkin coarse operator A_c = Pᵀ A P (restriction R = Pᵀ), formed as Pᵀ (A P) with two sparse products;
 *  Vaněk, Mandel & Brezina (1996), Computing 56, 179–196, §2 (variational coarse spaces). */
import { spgemm } from '../spgemm.ts';
import type { Csr } from '../types.ts';

/** R must be Pᵀ (the caller keeps it as the restriction of the cycle). */
export function galerkinProduct(A: Csr, P: Csr, R: Csr): Csr {
  return spgemm(R, spgemm(A, P));
}
