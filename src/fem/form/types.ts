import type { CellValues } from '../geometry/cellvalues.ts';
import type { FacetGeometry } from '../geometry/facet-geometry.ts';

/** A bilinear term on cells: a(trial, test) restricted to one pair of fields, integrated with its own quadrature.
 *  `add` adds the term's cell matrix into out (row-major with row length `stride`): the row of test local unknown
 *  a·nc_test + i is rowOff + a·nc_test + i, the column of trial unknown b·nc_trial + j is colOff + b·nc_trial + j.
 *  Test and trial values come at the term's rule on cell c (the same CellValues when the fields share an element). */
export interface CellMatrixTerm {
  name: string;
  test: number;
  trial: number;
  /** Quadrature degree: the term chooses its own rule. */
  degree: number;
  add(c: number, test: CellValues, trial: CellValues, out: Float64Array, stride: number, rowOff: number, colOff: number): void;
}

/** A linear term on cells (a source): adds into out[off + a·nc + i]. */
export interface CellVectorTerm {
  name: string;
  test: number;
  degree: number;
  add(c: number, test: CellValues, out: Float64Array, off: number): void;
}

/** A linear term on boundary facets with the given tags (Neumann, traction): values of the test element on local
 *  facet lf of cell c, physical points, weights × surface element and the outward unit normal at every point in fv
 *  (curved faces of hexahedra included). */
export interface FacetVectorTerm {
  name: string;
  test: number;
  degree: number;
  tags: readonly string[];
  add(c: number, lf: number, fv: FacetGeometry, out: Float64Array, off: number): void;
}

/** A bilinear term on boundary facets with the given tags (Robin): values of the test and trial elements on local
 *  facet lf; the two fields must share their element. */
export interface FacetMatrixTerm {
  name: string;
  test: number;
  trial: number;
  degree: number;
  tags: readonly string[];
  add(c: number, lf: number, fv: FacetGeometry, out: Float64Array, stride: number, rowOff: number, colOff: number): void;
}

/** A weak form as lists of terms; one generic loop assembles any of them (src/fem/form/assemble.ts). */
export interface Form {
  matrix: CellMatrixTerm[];
  vector: CellVectorTerm[];
  facetVector?: FacetVectorTerm[];
  facetMatrix?: FacetMatrixTerm[];
}
