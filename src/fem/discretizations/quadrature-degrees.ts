import type { CellKind } from '../../mesh/types.ts';

/** Degree assumed for a coefficient or source that is not a polynomial: over-integration by two, so that the
 *  quadrature error stays below the discretization error for smooth data (Ciarlet 1978, §4.1; the same rule as the
 *  scalar assembly, src/fem/assemble/degrees.ts). */
export const NON_POLYNOMIAL_EXTRA = 2;

/** Quadrature degrees of the terms of a system with degree-k elements: products of two gradients (2k − 2) and of
 *  two values (2k) times a coefficient of degree `coefficient` (null: not a polynomial), a source (k + degree of f).
 *  Cells with a multilinear map (quadrilaterals, hexahedra) take one more per variable. */
export function systemDegrees(cell: CellKind, k: number, coefficient: number | null, source: number | null = null): { gradGrad: number; valueGrad: number; valueValue: number; source: number } {
  const c = coefficient ?? k + NON_POLYNOMIAL_EXTRA;
  const s = source ?? k + NON_POLYNOMIAL_EXTRA;
  const extra = cell === 'quadrilateral' || cell === 'hexahedron' ? 1 : 0;
  return {
    gradGrad: Math.max(0, 2 * k - 2 + c) + 2 * extra,
    valueGrad: 2 * k - 1 + c + extra,
    valueValue: 2 * k + c + extra,
    source: k + s + extra,
  };
}
