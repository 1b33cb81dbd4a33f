import type { NormName, StudyDeclaration } from './declaration.ts';

/** Expected order of each norm for degree-k Lagrange elements on a smooth solution and quasi-uniform meshes:
 *  H1 seminorm, H1 and energy O(h^k) (Céa's lemma with interpolation estimates), L2 O(h^(k+1)) (Aubin–Nitsche;
 *  Brenner & Scott 2008, Thms 4.4.20 and 5.4.8), largest nodal error O(h^(k+1)) (common practice, no source:
 *  pointwise estimates carry a log factor for k = 1 in 2D). */
export function lagrangeOrders(k: number): Record<NormName, number> {
  return { L2: k + 1, H1semi: k, H1: k, energy: k, maxNodal: k + 1 };
}

/** Expected order per requested norm: the study's own value, else derived from its element degree, else null. */
export function expectedOrders(decl: StudyDeclaration, norms: NormName[]): Record<string, number | null> {
  const k = decl.discretization.degree;
  const derived = k !== undefined && k > 0 ? lagrangeOrders(k) : null;
  const out: Record<string, number | null> = {};
  for (const nm of norms) out[nm] = decl.expected?.[nm] ?? derived?.[nm] ?? null;
  return out;
}
