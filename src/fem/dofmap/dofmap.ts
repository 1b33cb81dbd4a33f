import type { Mesh } from '../../mesh/types.ts';
import type { LagrangeElement } from '../element/types.ts';
import { lagrangeElement } from '../element/lagrange.ts';
import { RungsInputError } from '../../errors.ts';
import type { FunctionSpace } from './types.ts';
import { numberEdges } from './edges.ts';
import { numberFaces } from './faces.ts';
import { mapReferencePoint } from '../geometry/map.ts';

/** Builds the continuous Lagrange space of the given degree on a mesh.
 *  Global numbering from the element's dofs per entity: vertex dofs first (dof = vertex index), then edge dofs (k-1
 *  per edge, ordered from the edge's lower-numbered vertex to the higher, so neighbouring cells agree on
 *  orientation), then face dofs (3D cells; at most one per face, so no orientation is needed), then cell interiors. */
export function lagrangeSpace(mesh: Mesh, degree: number): FunctionSpace {
  const el = lagrangeElement(mesh.cellKind, degree);
  return buildSpace(mesh, el);
}

export function buildSpace(mesh: Mesh, el: LagrangeElement): FunctionSpace {
  if (el.cell !== mesh.cellKind) {
    throw new RungsInputError(`element on ${el.cell}s cannot be used on a mesh of ${mesh.cellKind}s`);
  }
  const { nCells, nVertices, cells, verticesPerCell: vpc } = mesh;
  const nLoc = el.nDofs;
  const ne = el.edges.length;
  const pe = el.perEdge;
  const pi = el.perInterior;
  const nf = el.faces.length;
  const pf = el.perFace;
  if (pf > 1) throw new Error(`internal: ${pf} dofs per face need an orientation rule; at most 1 is supported`);
  // Degree 1 has no edge dofs: the edges need not be numbered (nor faces without face dofs).
  const { nEdges, cellEdges } = pe > 0 ? numberEdges(mesh, el.edges) : { nEdges: 0, cellEdges: new Int32Array(0) };
  const { nFaces, cellFaces } = pf > 0 ? numberFaces(mesh, el.faces) : { nFaces: 0, cellFaces: new Int32Array(0) };
  const edgeBase = nVertices;
  const faceBase = nVertices + nEdges * pe;
  const interiorBase = faceBase + nFaces * pf;
  const nDofs = interiorBase + nCells * pi;
  // Dofs only at the vertices, one per vertex in the cell's vertex order (P1, Q1): the unknowns of a cell are its
  // vertices, and the mesh's cell array serves as they are (no copy: 96 MB on 6M tetrahedra, fresh memory that costs
  // up to 3 ms per MB to touch on these machines, DEVELOPERS.md). Nothing in rungs writes into a space's cellDofs.
  const verticesOnly = nLoc === vpc && ne * pe + nf * pf + pi === 0;
  const cellDofs = verticesOnly ? cells : new Int32Array(nCells * nLoc);
  for (let c = 0; c < nCells && !verticesOnly; c++) {
    const o = c * nLoc;
    for (let v = 0; v < vpc; v++) cellDofs[o + v] = cells[c * vpc + v];
    for (let e = 0; e < ne; e++) {
      const a = cells[c * vpc + el.edges[e][0]];
      const b = cells[c * vpc + el.edges[e][1]];
      const g = edgeBase + cellEdges[c * ne + e] * pe;
      for (let j = 0; j < pe; j++) cellDofs[o + vpc + e * pe + j] = a < b ? g + j : g + pe - 1 - j;
    }
    for (let f = 0; f < nf * pf; f++) cellDofs[o + vpc + ne * pe + f] = faceBase + cellFaces[c * nf + f];
    for (let j = 0; j < pi; j++) cellDofs[o + vpc + ne * pe + nf * pf + j] = interiorBase + c * pi + j;
  }
  const dim = mesh.dim;
  // Degree 1: the dofs are the vertices, and their coordinates the mesh's own array (no copy: 17 MB at 1024² P1
  // squares; nothing in rungs writes into a space's dofCoords or a mesh's coords).
  if (nDofs === nVertices) return { mesh, element: el, nDofs, cellDofs, dofCoords: mesh.coords, nEdges };
  const dofCoords = new Float64Array(nDofs * dim);
  const x = new Float64Array(3);
  for (let c = 0; c < nCells; c++) {
    for (let i = 0; i < nLoc; i++) {
      mapReferencePoint(mesh, c, el.nodes, i * dim, x);
      const g = cellDofs[c * nLoc + i];
      for (let d = 0; d < dim; d++) dofCoords[g * dim + d] = x[d];
    }
  }
  return { mesh, element: el, nDofs, cellDofs, dofCoords, nEdges };
}

/** Global dofs on the given boundary facets (vertex and edge dofs of each facet's closure), sorted, unique. */
export function facetClosureDofs(space: FunctionSpace, facetCell: Int32Array, facetLocal: Int32Array, facets: Int32Array): Int32Array {
  const mark = new Uint8Array(space.nDofs);
  const nLoc = space.element.nDofs;
  for (let i = 0; i < facets.length; i++) {
    const f = facets[i];
    const c = facetCell[f];
    for (const l of space.element.facetDofs[facetLocal[f]]) mark[space.cellDofs[c * nLoc + l]] = 1;
  }
  let n = 0;
  for (let i = 0; i < mark.length; i++) n += mark[i];
  const out = new Int32Array(n);
  for (let i = 0, k = 0; i < mark.length; i++) if (mark[i]) out[k++] = i;
  return out;
}
