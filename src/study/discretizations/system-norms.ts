import type { PresetName } from '../../equation/types.ts';

/** The norms rungs measures for the built-in discretization of each equation, and their expected orders for
 *  elements of degree k on smooth solutions:
 *  - scalar equations (diffusion–convection–reaction, nonlinear diffusion): L2 k+1, H1 seminorm / H1 / energy k
 *    (Brenner & Scott 2008, Thms 4.4.20 and 5.4.8; the nonlinear case: Xu 1996, SIAM J. Numer. Anal. 33, from
 *    memory), largest nodal error k+1 (common practice, no source);
 *  - linear elasticity, displacement u in vector P_k: L2_u k+1, H1semi_u / H1_u / energy / div_u k (the same
 *    estimates per component; the energy norm is (∫ 2μ ε:ε + λ (∇·e)²)^(1/2), bounded by C‖e‖_H1, with C growing
 *    with λ/μ: locking; Babuška & Suri 1992);
 *  - Stokes, Taylor–Hood P_k–P_(k−1): L2_u k+1, H1semi_u / H1_u / div_u k, L2_p k (the pressure mean removed on
 *    both sides; Girault & Raviart 1986, ch. II §4; Elman, Silvester & Wathen 2014, Thm 3.13 for k = 2). */
export function builtInNorms(preset: PresetName, k: number): { orders: Record<string, number>; defaults: string[] } {
  switch (preset) {
    case 'linear-elasticity':
      return { orders: { L2_u: k + 1, H1semi_u: k, H1_u: k, energy: k, div_u: k, maxNodal_u: k + 1 }, defaults: ['L2_u', 'H1semi_u', 'energy'] };
    case 'stokes':
      return { orders: { L2_u: k + 1, H1semi_u: k, H1_u: k, div_u: k, L2_p: k }, defaults: ['L2_u', 'H1semi_u', 'L2_p'] };
    case 'nonlinear-diffusion':
      return { orders: { L2: k + 1, H1semi: k, H1: k, maxNodal: k + 1 }, defaults: ['L2', 'H1semi'] };
    case 'diffusion-convection-reaction':
      return { orders: { L2: k + 1, H1semi: k, H1: k, energy: k, maxNodal: k + 1 }, defaults: ['L2', 'H1semi'] };
  }
}

/** Norms of u − u_h that are global integrals (their order cannot exceed the best approximation's). */
export function isGlobalNorm(name: string): boolean {
  return /^(L2|H1semi|H1|energy)(_[A-Za-z][A-Za-z0-9_]*)?$/.test(name) || /^div_/.test(name);
}

/** Pointwise norms (nodal values may superconverge). */
export function isPointwiseNorm(name: string): boolean {
  return /^maxNodal(_[A-Za-z][A-Za-z0-9_]*)?$/.test(name);
}
