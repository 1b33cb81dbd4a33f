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
 *    both sides; Girault & Raviart 1986, ch. II §4; Elman, Silvester & Wathen 2014, Thm 3.13 for k = 2);
 *  - nearly incompressible elasticity, Taylor–Hood P_k–P_(k−1) for (u, p = −λ∇·u): the same orders as Stokes, with
 *    constants independent of λ (Braess 2007, ch. VI §3, Thm 3.6, numbering from memory; Boffi, Brezzi & Fortin
 *    2013, §8.12), and energy k, the energy norm being (∫ 2μ ε(e_u):ε(e_u) + (1/λ) e_p²)^(1/2), the displacement
 *    energy norm with λ(∇·e)² written through the pressure (equal for the exact pair, where λ(∇·u)² = p²/λ). */
export function builtInNorms(preset: PresetName, k: number): { orders: Record<string, number>; defaults: string[] } {
  switch (preset) {
    case 'linear-elasticity':
      return { orders: { L2_u: k + 1, H1semi_u: k, H1_u: k, energy: k, div_u: k, maxNodal_u: k + 1 }, defaults: ['L2_u', 'H1semi_u', 'energy'] };
    case 'stokes':
      return { orders: { L2_u: k + 1, H1semi_u: k, H1_u: k, div_u: k, L2_p: k }, defaults: ['L2_u', 'H1semi_u', 'L2_p'] };
    case 'nearly-incompressible-elasticity':
      return { orders: { L2_u: k + 1, H1semi_u: k, H1_u: k, div_u: k, L2_p: k, energy: k }, defaults: ['L2_u', 'H1semi_u', 'L2_p'] };
    case 'nonlinear-diffusion':
      return { orders: { L2: k + 1, H1semi: k, H1: k, maxNodal: k + 1 }, defaults: ['L2', 'H1semi'] };
    case 'diffusion-convection-reaction':
      return { orders: { L2: k + 1, H1semi: k, H1: k, energy: k, maxNodal: k + 1 }, defaults: ['L2', 'H1semi'] };
    case 'heat':
      // Spatial orders of the semi-discrete heat equation are those of the steady problem (Thomée 2006, Galerkin
      // Finite Element Methods for Parabolic Problems, Thms 1.2 and 1.5), at the final time and in the norms over
      // time ℓ∞(0,T; L2) (Linf_L2) and ℓ2(0,T; H1) (L2_H1); the temporal order is the stepper's (TIME_ORDER).
      return { orders: { L2: k + 1, H1semi: k, H1: k, maxNodal: k + 1, Linf_L2: k + 1, L2_H1: k }, defaults: ['L2', 'H1semi'] };
  }
}

/** Norms over the time levels t_0 … t_N of a study with time: ℓ∞(0,T; L2) = max_n ‖e(t_n)‖_L2 and
 *  ℓ2(0,T; H1) = (Σ_{n=1..N} Δt ‖e(t_n)‖²_H1)^(1/2) (the right-endpoint rule, the sum the stability estimates of
 *  implicit steppers bound; Thomée 2006, ch. 1). The norms without these names are taken at the final time T. */
export const TIME_NORMS: readonly string[] = ['Linf_L2', 'L2_H1'];

/** Norms of u − u_h that are global integrals (their order cannot exceed the best approximation's). */
export function isGlobalNorm(name: string): boolean {
  return /^(L2|H1semi|H1|energy)(_[A-Za-z][A-Za-z0-9_]*)?$/.test(name) || /^div_/.test(name) || TIME_NORMS.includes(name);
}

/** Pointwise norms (nodal values may superconverge). */
export function isPointwiseNorm(name: string): boolean {
  return /^maxNodal(_[A-Za-z][A-Za-z0-9_]*)?$/.test(name);
}

/** The norms rungs integrates itself on the fields of a pde read from an external code's VTK solution, with their
 *  expected orders for degree k (the study's degree: the displacement's or velocity's) where the preset gives them. */
export interface FieldNormTable {
  /** Every norm measured: per field f, L2_f, H1semi_f, H1_f, maxNodal_f, and div_f for a vector field (a lone scalar
   *  field without the suffix: L2, H1semi, …); energy for the elasticity presets; for a lone scalar field of a study
   *  with time also the norms over time (TIME_NORMS), from a series of VTK files, one per time level. A mean-free
   *  field's norms are those of its error less the error's mean. */
  names: string[];
  /** Expected orders: those of rungs's own elements for the preset (builtInNorms); none for a pde of the study's own. */
  orders: Record<string, number>;
  /** The norms measured when the study names none. */
  defaults: string[];
}

/** The table for the fields of a pde (see FieldNormTable); `time`: the study has time (the norms over time are then
 *  measured for a lone scalar field). */
export function fieldNorms(
  fields: Readonly<Record<string, 'scalar' | 'vector'>>, preset: PresetName | undefined, k: number | undefined, time = false,
): FieldNormTable {
  const entries = Object.entries(fields);
  const lone = entries.length === 1 && entries[0]![1] === 'scalar';
  const names: string[] = [];
  const defaults: string[] = [];
  for (const [f, kind] of entries) {
    const s = lone ? '' : `_${f}`;
    names.push(`L2${s}`, `H1semi${s}`, `H1${s}`, `maxNodal${s}`);
    if (kind === 'vector') names.push(`div${s}`);
    defaults.push(`L2${s}`, `H1semi${s}`);
  }
  const elastic = preset === 'linear-elasticity' || preset === 'nearly-incompressible-elasticity';
  if (elastic) names.push('energy');
  if (time && lone) names.push(...TIME_NORMS);
  const own = preset !== undefined && preset !== 'diffusion-convection-reaction';
  const table = own ? builtInNorms(preset, k ?? 1) : null;
  const orders = table && k !== undefined ? Object.fromEntries(Object.entries(table.orders).filter(([nm]) => names.includes(nm))) : {};
  return { names, orders, defaults: table ? table.defaults.filter((nm) => names.includes(nm)) : defaults };
}

/** The field norms of a study whose external code writes its solution as VTK for a pde other than today's scalar
 *  equation (which keeps its own path); null for every other study. */
export function externalFieldNorms(decl: {
  discretization: { kind: string; output?: string; degree?: number };
  pde?: { fields: Readonly<Record<string, 'scalar' | 'vector'>>; preset?: { name: PresetName } };
  time?: unknown;
}): FieldNormTable | null {
  const d = decl.discretization;
  if (d.kind !== 'external' || d.output !== 'vtk' || !decl.pde) return null;
  const preset = decl.pde.preset?.name;
  if (preset === 'diffusion-convection-reaction') return null;
  return fieldNorms(decl.pde.fields, preset, d.degree, decl.time !== undefined);
}
