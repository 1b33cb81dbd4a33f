import type { Mesh } from '../../mesh/types.ts';
import type { QuadratureRule } from '../quadrature/types.ts';
import type { LagrangeElement } from '../element/types.ts';
import { cellJacobian } from './jacobian.ts';
import { mapReferencePoint } from './map.ts';
import { RungsInputError } from '../../errors.ts';
import { AFFINE_CELL } from '../../mesh/types.ts';

/** Basis values, physical gradients, physical points and weights×|detJ| of one element on one cell at the points
 *  of one rule. Buffers are allocated once per (element, rule) and refilled per cell: no allocation per point. */
export interface CellValues {
  rule: QuadratureRule;
  element: LagrangeElement;
  nq: number;
  n: number;
  dim: number;
  /** nq * n reference values (fixed). */
  values: Float64Array;
  /** nq * n * dim reference gradients (fixed). */
  refGrads: Float64Array;
  /** nq * n * dim physical gradients (per cell). */
  grads: Float64Array;
  /** nq * 3 physical points (per cell). */
  x: Float64Array;
  /** nq weights × |detJ| (per cell). */
  wdet: Float64Array;
}

export function makeCellValues(element: LagrangeElement, rule: QuadratureRule): CellValues {
  const nq = rule.nPoints, n = element.nDofs, dim = element.dim;
  const values = new Float64Array(nq * n);
  const refGrads = new Float64Array(nq * n * dim);
  element.tabulate(rule.points, nq, values, refGrads);
  return {
    rule, element, nq, n, dim, values, refGrads,
    grads: new Float64Array(nq * n * dim),
    x: new Float64Array(nq * 3),
    wdet: new Float64Array(nq),
  };
}

const J = new Float64Array(9);
const invJ = new Float64Array(9);
const xp = new Float64Array(3);

/** Refills cv for cell c. Throws naming the cell when it is inverted or degenerate. */
export function reinitCell(cv: CellValues, mesh: Mesh, c: number, withGrads = true): void {
  const { nq, n, dim, rule, values: _v, refGrads, grads, x, wdet } = cv;
  const affine = AFFINE_CELL[mesh.cellKind];
  const pts = rule.points, coords = mesh.coords;
  const v0 = mesh.cells[c * mesh.verticesPerCell] * dim;
  let det = 0;
  for (let q = 0; q < nq; q++) {
    if (q === 0 || !affine) {
      det = cellJacobian(mesh, c, pts, q * dim, J, invJ);
      if (!(det > 0)) throw badCell(mesh, c, det);
    }
    wdet[q] = rule.weights[q] * det;
    if (affine) {
      // x = x0 + J ξ inline (simplices): no call per point.
      for (let d = 0; d < 3; d++) {
        if (d >= dim) { x[q * 3 + d] = 0; continue; }
        let s = coords[v0 + d];
        for (let r = 0; r < dim; r++) s += J[d * dim + r] * pts[q * dim + r];
        x[q * 3 + d] = s;
      }
    } else {
      mapReferencePoint(mesh, c, pts, q * dim, xp);
      x[q * 3] = xp[0]; x[q * 3 + 1] = xp[1]; x[q * 3 + 2] = dim > 2 ? xp[2] : 0;
    }
    if (!withGrads) continue;
    const o = q * n * dim;
    for (let i = 0; i < n; i++) {
      const gi = o + i * dim;
      for (let d = 0; d < dim; d++) {
        let s = 0;
        for (let r = 0; r < dim; r++) s += invJ[r * dim + d] * refGrads[gi + r];
        grads[gi + d] = s;
      }
    }
  }
}

function badCell(mesh: Mesh, c: number, det: number): RungsInputError {
  const vs = Array.from(mesh.cells.subarray(c * mesh.verticesPerCell, (c + 1) * mesh.verticesPerCell));
  const kind = det < 0 ? 'inverted (negative Jacobian determinant)' : 'degenerate (zero measure)';
  return new RungsInputError(
    `mesh cell ${c} (vertices ${vs.join(', ')}) is ${kind}: det J = ${det.toExponential(3)}; cells must be listed counter-clockwise with positive area`,
  );
}
