import type { CellKind } from '../../mesh/types.ts';
import type { FormCoefficients, QuadratureDegrees, Term } from './types.ts';

/** Degree assumed for a coefficient that is not a polynomial: enough over-integration that the quadrature
 *  consistency error stays below the discretization error for smooth data (Ciarlet 1978, §4.1; common practice). */
const NON_POLYNOMIAL_EXTRA = 2;

function hint(h: number | null | undefined, k: number): number {
  if (h === undefined || h === null) return k + NON_POLYNOMIAL_EXTRA;
  return h;
}

/** Quadrature degree of each term, from the element degree k and the coefficient hints; overrides win.
 *  Simplices: integrands are polynomials of degree (sum of factors). Quadrilaterals and hexahedra: the multilinear
 *  map makes the stiffness rational, so one degree more per variable is taken. */
export function quadratureDegrees(cell: CellKind, k: number, coef: FormCoefficients, override: QuadratureDegrees = {}): Record<Term, number> {
  const hk = coef.k ? hint(coef.hints?.k, k) : 0;
  const hb = hint(coef.hints?.b, k);
  const hc = hint(coef.hints?.c, k);
  const hf = hint(coef.hints?.f, k);
  const extra = cell === 'quadrilateral' || cell === 'hexahedron' ? 1 : 0;
  const base: Record<Term, number> = {
    stiffness: Math.max(0, 2 * (k - 1) + hk) + 2 * extra,
    convection: 2 * k - 1 + hb + extra,
    reaction: 2 * k + hc + extra,
    load: k + hf + extra,
    boundary: 2 * k + Math.max(hc, hf),
  };
  return { ...base, ...override };
}
