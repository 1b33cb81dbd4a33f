import { makeCellValues, reinitCell, type CellValues } from '../geometry/cellvalues.ts';
import { AFFINE_CELL, type Mesh } from '../../mesh/types.ts';
import { ruleFor } from '../quadrature/index.ts';
import { lagrangeElement } from '../element/lagrange.ts';
import type { MixedSpace } from '../space/types.ts';
import type { LagrangeElement } from '../element/types.ts';
import type { SharedMesh } from '../team/mesh.ts';

/** A time-dependent source f(x, y, z, t), written into out[0]. */
export type SourceFn = (x: number, y: number, z: number, t: number, out: Float64Array) => void;

/** Everything the load assembly reads, as numbers, strings and typed arrays only: the main thread builds it from the
 *  space, and a worker thread (load-worker.ts) rebuilds the same assembler from a copy of it, so that both run the
 *  same operations on the same values. */
export interface LoadGeometry extends Omit<SharedMesh, 'h'> {
  /** The space's unknowns per cell (nCells · L) and where the field's local unknowns start. */
  cellDofs: Int32Array;
  L: number;
  off: number;
  /** Degree of the field's Lagrange element and of the load quadrature. */
  degree: number;
  loadDegree: number;
  nDofs: number;
}

/** The load's geometry of the first field of a space (a scalar field). */
export function loadGeometry(space: MixedSpace, loadDegree: number): LoadGeometry {
  const { mesh } = space;
  const field = space.fields[0];
  const el = field.space.scalar.element;
  return {
    dim: mesh.dim, cellKind: mesh.cellKind, nVertices: mesh.nVertices, nCells: mesh.nCells, verticesPerCell: mesh.verticesPerCell,
    coords: mesh.coords, cells: mesh.cells, cellDofs: space.cellDofs, L: space.nLocal, off: field.localOffset,
    degree: el.degree, loadDegree, nDofs: space.nDofs,
  };
}

/** Whether a worker can rebuild the element of a load geometry: it is the standard one of its cell and degree
 *  (lagrangeElement's cached object, which every Lagrange space uses). */
export function rebuildable(space: MixedSpace): boolean {
  const el = space.fields[0].space.scalar.element;
  try { return lagrangeElement(space.mesh.cellKind, el.degree) === el; } catch { return false; }
}

/** The mesh of a load geometry: its cells and vertices, without boundary facets (the load does not read them). */
function meshOf(g: LoadGeometry): Mesh {
  return {
    dim: g.dim, cellKind: g.cellKind, nVertices: g.nVertices, coords: g.coords, nCells: g.nCells, verticesPerCell: g.verticesPerCell,
    cells: g.cells, nFacets: 0, verticesPerFacet: 0, facets: new Int32Array(0), facetTags: new Int32Array(0), tagNames: [], h: 0,
  };
}

/** The load vector F(t)_i = ∫ f(·, t) φ_i, written into `out`: the operations of assembleForm with the one term
 *  sourceTerm(0, 1, f(·, t), degree), in the same order (so the same bits), without what that generic loop does for
 *  forms in general and a source alone does not need (basis gradients per cell, the lookups of shared cell values,
 *  a new vector per call). Called once per step (per stage for the DIRK): through the generic loop it cost more
 *  than the step's solve at a million unknowns (measured). The space's own mesh and element when at hand (the main
 *  thread), else rebuilt from the geometry (a worker thread): the load reads only the cells and vertices. */
export function loadAssembler(
  g: LoadGeometry, f: SourceFn, own?: { mesh: Mesh; element: LagrangeElement },
): (t: number, out: Float64Array) => void {
  const cells = cellLoads(g, f, own);
  return (t, out) => { out.fill(0); cells(t, 0, g.nCells, out, null); };
}

/** The load cell by cell, for cells c0 … c1 − 1: each cell's vector is scattered into `out` (added, in cell order),
 *  or, when `perCell` is given, stored in perCell[c·L … c·L + L − 1] instead (to be scattered later by
 *  scatterCells, in cell order: then the same additions in the same order as the scatter here). */
export type CellLoads = (t: number, c0: number, c1: number, out: Float64Array | null, perCell: Float64Array | null) => void;

export function cellLoads(g: LoadGeometry, f: SourceFn, own?: { mesh: Mesh; element: LagrangeElement }): CellLoads {
  const mesh = own?.mesh ?? meshOf(g);
  const rule = ruleFor(g.cellKind, Math.max(0, g.loadDegree));
  const cv = makeCellValues(own?.element ?? lagrangeElement(g.cellKind, g.degree), rule);
  const w: LoadWork = {
    L: g.L, off: g.off, cellDofs: g.cellDofs, cv, J: new Float64Array(9), Fe: new Float64Array(g.L), fv: new Float64Array(1),
  };
  return AFFINE_CELL[g.cellKind]
    ? (t, c0, c1, out, perCell) => loadAffine(f, t, c0, c1, out, perCell, mesh, w)
    : (t, c0, c1, out, perCell) => loadMapped(f, t, c0, c1, out, perCell, mesh, w);
}

/** out = Σ over cells, in cell order, of the cell vectors stored by cellLoads (out is cleared first). */
export function scatterCells(g: LoadGeometry, perCell: Float64Array, out: Float64Array): void {
  const { L, cellDofs, nCells } = g;
  out.fill(0);
  for (let c = 0; c < nCells; c++) {
    const o = c * L;
    for (let i = 0; i < L; i++) out[cellDofs[o + i]] += perCell[o + i];
  }
}

/** The end of one cell: its vector Fe scattered into out, or stored for later; Fe cleared. */
function finishCell(c: number, w: LoadWork, out: Float64Array | null, perCell: Float64Array | null): void {
  const { L, cellDofs, Fe } = w;
  const o = c * L;
  if (perCell) for (let i = 0; i < L; i++) { perCell[o + i] = Fe[i]; Fe[i] = 0; }
  else for (let i = 0; i < L; i++) { out![cellDofs[o + i]] += Fe[i]; Fe[i] = 0; }
}

/** Buffers of one load assembler, allocated once (no allocation per cell or point). */
interface LoadWork { L: number; off: number; cellDofs: Int32Array; cv: CellValues; J: Float64Array; Fe: Float64Array; fv: Float64Array }

/** The load on affine cells (intervals, triangles, tetrahedra). The points and weights × |det J| are reinitCell's,
 *  written out: J and det J by the operations of cellJacobian and invert (src/fem/geometry/jacobian.ts) in the same
 *  order, x = x0 + J ξ summed in the same order; the cell's vector as sourceTerm adds it, scattered as assembleForm
 *  does. A plain function of its arguments, so that V8 keeps the loop's values in registers (about twice as fast at
 *  a million unknowns as the same loop in a closure, measured); no allocation. */
function loadAffine(
  f: SourceFn, t: number, c0: number, c1: number, out: Float64Array | null, perCell: Float64Array | null, mesh: Mesh, w: LoadWork,
): void {
  const { coords, cells, verticesPerCell: vpc, dim } = mesh;
  const { off, cv, J, Fe, fv } = w;
  const { nq, n, values } = cv;
  const { points: pts, weights } = cv.rule;
  // Fe is zero at the start of every cell: finishCell clears what it added.
  for (let c = c0; c < c1; c++) {
    const base = c * vpc, v0 = cells[base] * dim;
    for (let r = 0; r < dim; r++) {
      const vr = cells[base + r + 1] * dim;
      for (let d = 0; d < dim; d++) J[d * dim + r] = coords[vr + d] - coords[v0 + d];
    }
    let det: number;
    if (dim === 2) det = J[0] * J[3] - J[1] * J[2];
    else if (dim === 1) det = J[0];
    else {
      const A = J[4] * J[8] - J[5] * J[7], B = -(J[3] * J[8] - J[5] * J[6]), C = J[3] * J[7] - J[4] * J[6];
      det = J[0] * A + J[1] * B + J[2] * C;
    }
    if (!(det > 0)) reinitCell(cv, mesh, c, false); // throws, naming the cell
    const x0 = coords[v0], y0 = dim > 1 ? coords[v0 + 1] : 0, z0 = dim > 2 ? coords[v0 + 2] : 0;
    for (let q = 0; q < nq; q++) {
      let x = x0, y = 0, z = 0;
      if (dim === 2) {
        const s = pts[2 * q], r = pts[2 * q + 1];
        x += J[0] * s; x += J[1] * r;
        y = y0; y += J[2] * s; y += J[3] * r;
      } else if (dim === 1) x += J[0] * pts[q];
      else {
        const s = pts[3 * q], r = pts[3 * q + 1], u = pts[3 * q + 2];
        x += J[0] * s; x += J[1] * r; x += J[2] * u;
        y = y0; y += J[3] * s; y += J[4] * r; y += J[5] * u;
        z = z0; z += J[6] * s; z += J[7] * r; z += J[8] * u;
      }
      f(x, y, z, t, fv);
      const wq = weights[q] * det, v = fv[0], qn = q * n;
      for (let a = 0; a < n; a++) Fe[off + a] += (wq * values[qn + a]) * v;
    }
    finishCell(c, w, out, perCell);
  }
}

/** The load on mapped cells (quadrilaterals, hexahedra): reinitCell's points and weights, without the gradients. */
function loadMapped(
  f: SourceFn, t: number, c0: number, c1: number, out: Float64Array | null, perCell: Float64Array | null, mesh: Mesh, w: LoadWork,
): void {
  const { off, cv, Fe, fv } = w;
  const { nq, n, values, x, wdet } = cv;
  for (let c = c0; c < c1; c++) {
    reinitCell(cv, mesh, c, false);
    for (let q = 0; q < nq; q++) {
      f(x[3 * q], x[3 * q + 1], x[3 * q + 2], t, fv);
      const wq = wdet[q], v = fv[0], qn = q * n;
      for (let a = 0; a < n; a++) Fe[off + a] += (wq * values[qn + a]) * v;
    }
    finishCell(c, w, out, perCell);
  }
}
