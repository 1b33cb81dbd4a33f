/** The degree-1 space on the same mesh (P1 on simplices, Q1 on quadrilaterals and hexahedra) as a subspace of a
 *  Lagrange space of higher degree: its unknowns are the vertex dofs, and a degree-1 function is carried into the
 *  finer space by its values at the finer space's nodes, φ_v(ξ_i) for vertex v and node ξ_i of a cell (exact:
 *  every degree-1 function is a member of the finer space on the same cell map). This is the first coarse level of
 *  a multigrid in the polynomial degree (p-multigrid, Rønquist & Patera 1987, Int. J. Numer. Methods Eng. 24,
 *  1795–1812, from memory): the Galerkin operator PᵀAP on it is the degree-1 operator of the same form, on which
 *  aggregation works as well as it does for P1 problems.
 *  Unknowns are interleaved node-major (unknown g·components + c) and may be reduced: `kept` lists the unknowns of
 *  the reduced system in order; a coarse unknown is a kept vertex unknown, so a vertex held by a Dirichlet
 *  condition contributes nothing (the correction is zero there, as in the reduced fine space). */
import { lagrangeElement } from '../element/lagrange.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import type { Csr } from '../../linalg/types.ts';

/** Values of the degree-1 basis below this are the round-off of an exact zero at a node (nodes lie on the cell's
 *  edges and faces, where some φ_v vanish exactly). */
const ZERO_VALUE = 1e-14;

export interface VertexSubspace {
  /** kept.length × coarseKept.length prolongator, rows in the order of `kept`. */
  P: Csr;
  /** The coarse unknowns (interleaved vertex unknowns v·components + c among all nVertices·components), in order. */
  coarseKept: Int32Array;
}

export function vertexSubspace(space: FunctionSpace, components: number, kept: Int32Array): VertexSubspace {
  const { mesh, element: el, cellDofs, nDofs } = space;
  const nV = mesh.nVertices, vpc = mesh.verticesPerCell, nLoc = el.nDofs;
  const linear = lagrangeElement(mesh.cellKind, 1);
  // φ_v at every node of the finer element: phi[i·vpc + v].
  const phi = new Float64Array(nLoc * vpc);
  linear.tabulate(el.nodes, nLoc, phi, new Float64Array(nLoc * vpc * el.dim));
  // One cell (and local node) for every dof that is not a vertex.
  const where = new Int32Array(nDofs).fill(-1);
  for (let c = 0, o = 0; c < mesh.nCells; c++, o += nLoc) {
    for (let i = vpc; i < nLoc; i++) { const g = cellDofs[o + i]; if (where[g] < 0) where[g] = o + i; }
  }
  // Coarse index of every kept vertex unknown.
  const coarseOf = new Int32Array(nV * components).fill(-1);
  let nc = 0;
  for (let r = 0; r < kept.length; r++) if (kept[r] < nV * components) coarseOf[kept[r]] = nc++;
  const coarseKept = new Int32Array(nc);
  for (let u = 0; u < nV * components; u++) if (coarseOf[u] >= 0) coarseKept[coarseOf[u]] = u;

  // Entries of row r: a vertex unknown is itself; any other one takes its node's nonzero degree-1 values at the kept
  // vertex unknowns of one cell. Visited twice: to count them, then to fill the arrays in place.
  const visitRow = (r: number, visit: (column: number, value: number) => void): void => {
    const u = kept[r];
    const g = Math.floor(u / components), comp = u - g * components;
    if (g < nV) { visit(coarseOf[u], 1); return; }
    const at = where[g];
    const cell = (at / nLoc) | 0, i = at - cell * nLoc;
    for (let v = 0; v < vpc; v++) {
      const value = phi[i * vpc + v];
      const J = coarseOf[mesh.cells[cell * vpc + v] * components + comp];
      if (Math.abs(value) > ZERO_VALUE && J >= 0) visit(J, value);
    }
  };
  const rowPtr = new Int32Array(kept.length + 1);
  let k = 0;
  for (let r = 0; r < kept.length; r++) { visitRow(r, () => { k++; }); rowPtr[r + 1] = k; }
  const colIdx = new Int32Array(k), values = new Float64Array(k);
  k = 0;
  for (let r = 0; r < kept.length; r++) visitRow(r, (column, value) => { colIdx[k] = column; values[k++] = value; });
  return { P: { nRows: kept.length, nCols: nc, rowPtr, colIdx, values }, coarseKept };
}
