import type { CellKind } from '../../mesh/types.ts';

/** A quadrature rule on a reference cell; weights sum to the reference cell's measure
 *  (interval 1, triangle 1/2, quadrilateral 1, tetrahedron 1/6, hexahedron 1). */
export interface QuadratureRule {
  cell: CellKind;
  /** Highest total polynomial degree integrated exactly (per-variable degree for the quadrilateral and hexahedron). */
  degree: number;
  nPoints: number;
  /** nPoints * dim reference coordinates, point-major. */
  points: Float64Array;
  weights: Float64Array;
  /** Where the rule comes from, for reports and docs. */
  source: string;
}
