import type { NormName, StudyDeclaration } from './declaration.ts';
import { builtInNorms, externalFieldNorms } from './discretizations/system-norms.ts';
import type { PresetName } from '../equation/types.ts';
import { temporalOrder, timeAxis } from './time-ladder.ts';

/** Expected order of each norm for degree-k Lagrange elements on a smooth solution and quasi-uniform meshes:
 *  H1 seminorm, H1 and energy O(h^k) (Céa's lemma with interpolation estimates), L2 O(h^(k+1)) (Aubin–Nitsche;
 *  Brenner & Scott 2008, Thms 4.4.20 and 5.4.8), largest nodal error O(h^(k+1)) (common practice, no source:
 *  pointwise estimates carry a log factor for k = 1 in 2D). */
export function lagrangeOrders(k: number): Record<NormName, number> {
  return { L2: k + 1, H1semi: k, H1: k, energy: k, maxNodal: k + 1 };
}

/** The equation rungs's own elements solve for this study (today's scalar equation when it declares no pde). */
export function builtInPreset(decl: StudyDeclaration): PresetName {
  return decl.pde?.preset?.name ?? 'diffusion-convection-reaction';
}

/** The norms a study measures when it names none: L2 and the H1 seminorm of its field(s), the pressure too. */
export function defaultNorms(decl: StudyDeclaration): string[] {
  if (decl.discretization.kind === 'lagrange') return builtInNorms(builtInPreset(decl), 1).defaults;
  // An external code's VTK solution of a system: the norms of its fields, as rungs's own elements measure them.
  const fieldTable = externalFieldNorms(decl);
  if (fieldTable) return fieldTable.defaults;
  return ['L2', 'H1semi'];
}

/** Expected order per requested norm: the study's own value, else derived from its element degree, else null. */
export function expectedOrders(decl: StudyDeclaration, norms: readonly string[]): Record<string, number | null> {
  const k = decl.discretization.degree;
  const derived: Record<string, number> | null = k !== undefined && k > 0
    ? (decl.discretization.kind === 'lagrange' ? builtInNorms(builtInPreset(decl), k).orders : externalFieldNorms(decl)?.orders ?? lagrangeOrders(k))
    : null;
  const out: Record<string, number | null> = {};
  for (const nm of norms) out[nm] = decl.expected?.[nm] ?? derived?.[nm] ?? null;
  return decl.time ? alongTimeAxis(decl, out) : out;
}

/** The order each norm should show along a study's time ladder (src/study/time-ladder.ts), from the spatial order p
 *  of the norm and the stepper's temporal order q, with e ≈ C_h h^p + C_t Δt^q: refined in Δt on one mesh, q; in h
 *  at one Δt, p (until the time step limits it); on a coupled path Δt = c·h^s, min(p, q·s); a two-axis design keeps
 *  p here and fits q jointly. */
function alongTimeAxis(decl: StudyDeclaration, spatial: Record<string, number | null>): Record<string, number | null> {
  const axis = timeAxis(decl);
  const q = temporalOrder(decl);
  const out: Record<string, number | null> = {};
  for (const [nm, p] of Object.entries(spatial)) {
    out[nm] = axis === 'dt' ? q
      : axis === 'coupled' ? (p === null || q === null ? null : Math.min(p, q * decl.ladder.coupled!.exponent))
        : p;
  }
  return out;
}
