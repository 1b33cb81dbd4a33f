import type { Mesh } from '../../mesh/types.ts';
import type { LagrangeElement } from '../element/types.ts';
import { REFERENCE_FACETS, REFERENCE_VERTICES } from '../element/nodes.ts';
import { ruleFor } from '../quadrature/index.ts';
import { mapReferencePoint } from '../geometry/map.ts';

/** Basis values on each local facet of the reference cell at the points of a facet rule, plus per-facet physical
 *  points, weights × facet measure and the outward unit normal (straight facets). Buffers refilled per facet. */
export interface FacetValues {
  element: LagrangeElement;
  nq: number;
  n: number;
  /** Per local facet: nq * n basis values. */
  values: Float64Array[];
  /** Per local facet: nq * dim reference points in the cell. */
  refPoints: Float64Array[];
  /** Facet rule weights on the reference facet (sum to 1). */
  weights: Float64Array;
  x: Float64Array;
  wds: Float64Array;
  normal: Float64Array;
}

export function makeFacetValues(element: LagrangeElement, degree: number): FacetValues {
  const dim = element.dim;
  const n = element.nDofs;
  const verts = REFERENCE_VERTICES[element.cell];
  let tPoints: Float64Array, weights: Float64Array, nq: number;
  if (dim === 1) { tPoints = new Float64Array([0]); weights = new Float64Array([1]); nq = 1; }
  else if (dim === 2) {
    const r = ruleFor('interval', Math.max(0, degree));
    tPoints = r.points; weights = r.weights; nq = r.nPoints;
  } else {
    const r = ruleFor('triangle', Math.max(0, degree));
    tPoints = r.points; weights = new Float64Array(r.weights.map((w) => 2 * w)); nq = r.nPoints;
  }
  const values: Float64Array[] = [];
  const refPoints: Float64Array[] = [];
  for (const fv of REFERENCE_FACETS[element.cell]) {
    const pts = new Float64Array(nq * dim);
    for (let q = 0; q < nq; q++) {
      for (let d = 0; d < dim; d++) {
        let v = verts[fv[0]][d];
        if (dim >= 2) v += tPoints[q * (dim - 1)] * (verts[fv[1]][d] - verts[fv[0]][d]);
        if (dim === 3) v += tPoints[q * 2 + 1] * (verts[fv[2]][d] - verts[fv[0]][d]);
        pts[q * dim + d] = v;
      }
    }
    const vals = new Float64Array(nq * n);
    element.tabulate(pts, nq, vals, new Float64Array(nq * n * dim));
    values.push(vals);
    refPoints.push(pts);
  }
  return { element, nq, n, values, refPoints, weights, x: new Float64Array(nq * 3), wds: new Float64Array(nq), normal: new Float64Array(3) };
}

const xa = new Float64Array(3), xb = new Float64Array(3), xc = new Float64Array(3), tmp = new Float64Array(3);

/** Refills fv for local facet lf of cell c: physical points, weights × measure, outward normal. */
export function reinitFacet(fv: FacetValues, mesh: Mesh, c: number, lf: number): void {
  const dim = mesh.dim;
  const { nq, refPoints, weights, x, wds, normal } = fv;
  const pts = refPoints[lf];
  const facetVerts = REFERENCE_FACETS[mesh.cellKind][lf];
  const refV = REFERENCE_VERTICES[mesh.cellKind];
  // Cell centroid, to orient the normal outward.
  let cx = 0, cy = 0, cz = 0;
  const vpc = mesh.verticesPerCell;
  for (let k = 0; k < vpc; k++) {
    const v = mesh.cells[c * vpc + k] * dim;
    cx += mesh.coords[v]; if (dim > 1) cy += mesh.coords[v + 1]; if (dim > 2) cz += mesh.coords[v + 2];
  }
  cx /= vpc; cy /= vpc; cz /= vpc;
  let measure = 1;
  mapReferencePoint(mesh, c, refV[facetVerts[0]], 0, xa);
  if (dim === 1) {
    normal[0] = xa[0] > cx ? 1 : -1; normal[1] = 0; normal[2] = 0;
  } else if (dim === 2) {
    mapReferencePoint(mesh, c, refV[facetVerts[1]], 0, xb);
    const tx = xb[0] - xa[0], ty = xb[1] - xa[1];
    measure = Math.hypot(tx, ty);
    let nx = ty / measure, ny = -tx / measure;
    if (nx * (xa[0] - cx) + ny * (xa[1] - cy) < 0) { nx = -nx; ny = -ny; }
    normal[0] = nx; normal[1] = ny; normal[2] = 0;
  } else {
    mapReferencePoint(mesh, c, refV[facetVerts[1]], 0, xb);
    mapReferencePoint(mesh, c, refV[facetVerts[2]], 0, xc);
    const ux = xb[0] - xa[0], uy = xb[1] - xa[1], uz = xb[2] - xa[2];
    const vx = xc[0] - xa[0], vy = xc[1] - xa[1], vz = xc[2] - xa[2];
    let nx = uy * vz - uz * vy, ny = uz * vx - ux * vz, nz = ux * vy - uy * vx;
    const len = Math.hypot(nx, ny, nz);
    measure = len / 2;
    nx /= len; ny /= len; nz /= len;
    if (nx * (xa[0] - cx) + ny * (xa[1] - cy) + nz * (xa[2] - cz) < 0) { nx = -nx; ny = -ny; nz = -nz; }
    normal[0] = nx; normal[1] = ny; normal[2] = nz;
  }
  for (let q = 0; q < nq; q++) {
    mapReferencePoint(mesh, c, pts, q * dim, tmp);
    x[q * 3] = tmp[0]; x[q * 3 + 1] = dim > 1 ? tmp[1] : 0; x[q * 3 + 2] = dim > 2 ? tmp[2] : 0;
    wds[q] = weights[q] * measure;
  }
}
