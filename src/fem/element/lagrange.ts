import { Matrix, inverse } from 'ml-matrix';
import type { CellKind } from '../../mesh/types.ts';
import { CELL_DIM } from '../../mesh/types.ts';
import { RungsInputError } from '../../errors.ts';
import type { LagrangeElement } from './types.ts';
import { lagrangeNodes, REFERENCE_EDGES, REFERENCE_FACES, REFERENCE_FACETS } from './nodes.ts';
import { monomialExponents } from './monomials.ts';

const SUPPORTED: Record<CellKind, number[]> = {
  interval: [1, 2, 3],
  triangle: [1, 2, 3],
  quadrilateral: [1, 2],
  tetrahedron: [1, 2, 3],
  hexahedron: [1, 2],
};

const cache = new Map<string, LagrangeElement>();

/** The Lagrange element of degree k on a reference cell (P_k on simplices, Q_k on quadrilaterals and hexahedra).
 *  P3 on tetrahedra has one node at each face centroid and none inside (20 dofs); Q2 on hexahedra has vertices, edge
 *  midpoints, face centres and the body centre (27 dofs). Degrees that would put more than one node inside a face
 *  (P4 tetrahedra, Q3 hexahedra) are not offered: their face dofs would need an orientation rule.
 *  Basis = monomials times the inverse of the nodal Vandermonde matrix, so that φ_i(x_j) = δ_ij
 *  (the classical nodal construction; Ciarlet 1978, The Finite Element Method for Elliptic Problems, §2.2). */
export function lagrangeElement(cell: CellKind, degree: number): LagrangeElement {
  const key = `${cell}:${degree}`;
  const hit = cache.get(key);
  if (hit) return hit;
  if (!SUPPORTED[cell]?.includes(degree)) {
    throw new RungsInputError(
      `no Lagrange element of degree ${degree} on ${cell}s; valid degrees: ${SUPPORTED[cell]?.join(', ') ?? 'none'}`,
    );
  }
  const dim = CELL_DIM[cell];
  const { nodes, perEdge, perFace, perInterior } = lagrangeNodes(cell, degree);
  const exps = monomialExponents(cell, degree);
  const n = nodes.length;
  if (exps.length !== n) throw new Error(`internal: ${exps.length} monomials for ${n} nodes`);
  const V = new Matrix(n, n);
  for (let i = 0; i < n; i++) for (let m = 0; m < n; m++) V.set(i, m, monomial(nodes[i], exps[m]));
  const Cinv = inverse(V);
  // coef[m * n + i]: coefficient of monomial m in basis function i.
  const coef = new Float64Array(n * n);
  for (let m = 0; m < n; m++) for (let i = 0; i < n; i++) coef[m * n + i] = Cinv.get(m, i);
  const expFlat = Int32Array.from(exps.flat());
  const mono = new Float64Array(n);
  const dmono = new Float64Array(n * dim);

  const tabulate = (points: Float64Array, nPoints: number, values: Float64Array, grads: Float64Array): void => {
    for (let p = 0; p < nPoints; p++) {
      evalMonomials(points, p * dim, dim, expFlat, n, mono, dmono);
      const vo = p * n;
      for (let i = 0; i < n; i++) {
        let v = 0;
        for (let m = 0; m < n; m++) v += coef[m * n + i] * mono[m];
        values[vo + i] = v;
        for (let d = 0; d < dim; d++) {
          let g = 0;
          for (let m = 0; m < n; m++) g += coef[m * n + i] * dmono[m * dim + d];
          grads[(vo + i) * dim + d] = g;
        }
      }
    }
  };

  const edges = REFERENCE_EDGES[cell];
  const facetVertices = REFERENCE_FACETS[cell];
  const faces = REFERENCE_FACES[cell];
  const nv = vertexCount(cell);
  // In 3D the facets are the faces (REFERENCE_FACES = REFERENCE_FACETS), so facet f also holds face f's dofs.
  const faceBase = nv + edges.length * perEdge;
  const facetDofs = facetVertices.map((fv, f) => {
    const dofs = [...fv];
    edges.forEach(([a, b], e) => {
      if (fv.includes(a) && fv.includes(b)) for (let j = 0; j < perEdge; j++) dofs.push(nv + e * perEdge + j);
    });
    if (faces.length > 0) for (let j = 0; j < perFace; j++) dofs.push(faceBase + f * perFace + j);
    return dofs;
  });

  const el: LagrangeElement = {
    cell,
    family: cell === 'quadrilateral' || cell === 'hexahedron' ? 'Q' : 'P',
    degree,
    dim,
    nDofs: n,
    nodes: Float64Array.from(nodes.flat()),
    edges,
    perEdge,
    faces,
    perFace,
    perInterior,
    facetDofs,
    facetVertices,
    tabulate,
  };
  cache.set(key, el);
  return el;
}

function vertexCount(cell: CellKind): number {
  return cell === 'interval' ? 2 : cell === 'triangle' ? 3 : cell === 'hexahedron' ? 8 : 4;
}

function monomial(x: number[], e: number[]): number {
  let v = 1;
  for (let d = 0; d < e.length; d++) v *= x[d] ** e[d];
  return v;
}

function evalMonomials(
  pts: Float64Array, off: number, dim: number, exps: Int32Array, n: number, mono: Float64Array, dmono: Float64Array,
): void {
  for (let m = 0; m < n; m++) {
    let v = 1;
    for (let d = 0; d < dim; d++) v *= pts[off + d] ** exps[m * dim + d];
    mono[m] = v;
    for (let d = 0; d < dim; d++) {
      const e = exps[m * dim + d];
      if (e === 0) { dmono[m * dim + d] = 0; continue; }
      let g = e * pts[off + d] ** (e - 1);
      for (let q = 0; q < dim; q++) if (q !== d) g *= pts[off + q] ** exps[m * dim + q];
      dmono[m * dim + d] = g;
    }
  }
}
