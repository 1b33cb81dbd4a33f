// Turns a VTK unstructured grid with nodal values into a rungs Mesh and Lagrange DiscreteFields (one scalar field, or
// the fields of a system — vector arrays, a pressure of lower degree on the corners — on the same cells), so that
// src/norms integrates their errors exactly as for rungs's own solutions. VTK's node order (see cell-types.ts) is mapped
// to rungs's local dof order (vertices, edges in REFERENCE_EDGES order, interior); cells listed with a negative
// orientation are re-ordered, their mid-edge nodes following their edges.
import { RungsInputError } from '../../errors.ts';
import { REFERENCE_EDGES } from '../../fem/element/nodes.ts';
import { lagrangeElement } from '../../fem/element/lagrange.ts';
import type { FunctionSpace } from '../../fem/dofmap/types.ts';
import { mapReferencePoint } from '../../fem/geometry/map.ts';
import { meshFromArrays } from '../../mesh/from-arrays.ts';
import { CELL_DIM, type Mesh } from '../../mesh/types.ts';
import { lagrangeField } from '../../fem/field/lagrange-field.ts';
import { vectorLagrangeField } from '../../fem/field/vector-field.ts';
import type { DiscreteField } from '../../norms/types.ts';
import { placeOf, type LevelRef } from '../where.ts';
import { SUPPORTED_CELL_TYPES_TEXT, VTK_CELL_TYPES, vtkCellTypeName, type VtkCellType } from './cell-types.ts';
import type { VtkGrid, VtkPointArray } from './grid.ts';
import { edgeTable, faceTable } from './facet-table.ts';
import { findOverlap } from './overlap.ts';

/** A mid-edge node may sit this fraction of its cell's size away from the edge midpoint (ASCII round-off),
 *  far below the half-edge offset a wrong node order produces (common practice, no source). */
export const MID_NODE_TOLERANCE = 1e-3;

/** Unused coordinates (z in 2D; y, z in 1D) must agree to this fraction of the mesh size. */
const FLAT_TOLERANCE = 1e-9;

/** Orientation-reversing re-ordering of each cell's corners: rungs vertex i is VTK corner FLIP[kind][i]. */
const FLIP: Record<string, number[]> = {
  interval: [1, 0],
  triangle: [0, 2, 1],
  quadrilateral: [0, 3, 2, 1],
  tetrahedron: [0, 2, 1, 3],
};

export interface VtkFieldOptions {
  /** Name of the point-data array holding the solution (default: the only one-component array). */
  field?: string;
  /** Degree the study declares; the file's cells must have it. */
  degree?: number;
  level?: LevelRef;
}

export interface VtkField {
  mesh: Mesh;
  field: DiscreteField;
  degree: 1 | 2;
  /** Distinct nodes the cells use: the unknowns of a continuous Lagrange solution. */
  dofs: number;
  fieldName: string;
  cellType: VtkCellType;
  /** The Lagrange space of the field (for interpolating the exact solution on the same nodes). */
  space: FunctionSpace;
}

/** Builds the mesh and the discrete field of a VTK grid; every problem names the level, the file and the line. */
export function gridToField(grid: VtkGrid, opts: VtkFieldOptions = {}): VtkField {
  const fail = failure(grid, opts.level);
  const t = checkCells(grid, opts.degree, fail);
  const solution = pickArray(grid, opts.field, fail);
  const g = buildGrid(grid, t, opts.level, fail);
  const nodeValues = new Float64Array(g.nNodes);
  const values = solution.values;
  for (let p = 0; p < grid.nPoints; p++) {
    const q = g.compact[p]!;
    if (q >= 0) nodeValues[q] = values[p]!;
  }
  return { mesh: g.mesh, field: lagrangeField(g.space, nodeValues), degree: t.degree, dofs: g.nNodes, fieldName: solution.name, cellType: t, space: g.space };
}

/** One field of a system the study asks for in a VTK file. */
export interface VtkFieldRequest {
  /** The study's name of the field ('u', 'p'), for messages. */
  name: string;
  /** A scalar field takes a one-component array; a vector field one component per dimension of the mesh (or three,
   *  the third zero to round-off, on a two-dimensional mesh: what VECTORS and most writers give). */
  kind: 'scalar' | 'vector';
  /** The point-data array holding it (default: the array named like the field; with one field, else the only array
   *  of its shape). */
  array?: string;
  /** Polynomial degree of the field (default: the cells' own). 1 on quadratic cells: the field is the P1 / Q1
   *  function of its corner values, and every other node must hold that function's value there to round-off
   *  (VALUE_ROUND_OFF), as a Taylor–Hood code writes its pressure interpolated to all nodes of the quadratic mesh. */
  degree?: number;
}

/** A field of a system read from a VTK file, as a rungs field with its Lagrange space. */
export interface VtkSystemField {
  name: string;
  /** The point-data array it came from. */
  array: string;
  kind: 'scalar' | 'vector';
  /** Components of the field (1, or the mesh dimension). */
  components: number;
  degree: 1 | 2;
  field: DiscreteField;
  /** The scalar Lagrange space of each component (the nodes the exact field is interpolated on). */
  space: FunctionSpace;
  /** Unknowns: the space's nodes times the components. */
  dofs: number;
  /** The field was taken from the corners of cells of higher degree (its other nodes checked to agree). */
  fromCorners: boolean;
}

export interface VtkFields {
  mesh: Mesh;
  cellType: VtkCellType;
  /** Degree of the cells. */
  degree: 1 | 2;
  fields: VtkSystemField[];
  /** Unknowns of all fields together. */
  dofs: number;
}

export interface VtkFieldsOptions {
  fields: readonly VtkFieldRequest[];
  /** Degree the study declares (of its first field: the displacement or velocity); the file's cells must have it. */
  degree?: number;
  level?: LevelRef;
}

/** Written values may carry the round-off of single precision (Float32 arrays: 2^-24 ≈ 6e-8 relative), so a third
 *  component of a 2D vector or the mid-edge value of a linear field may miss its exact value by this fraction of the
 *  array's largest value; a wrong array, a component order mixed up or a field that is not linear misses it by far
 *  more (common practice, no source). */
export const VALUE_ROUND_OFF = 1e-6;

/** Builds the mesh and one discrete field per request (all on the same cells) from a VTK grid: vector fields from
 *  arrays with several components, fields of lower degree from the corners of the cells. Every problem names the
 *  level, the file, the array and what would be valid. */
export function gridToFields(grid: VtkGrid, opts: VtkFieldsOptions): VtkFields {
  const fail = failure(grid, opts.level);
  if (opts.fields.length === 0) throw new Error('internal: gridToFields needs at least one field');
  const t = checkCells(grid, opts.degree, fail);
  const dim = CELL_DIM[t.cellKind];
  const arrays = opts.fields.map((r) => pickFieldArray(grid, r, opts.fields.length, dim, t, fail));
  const g = buildGrid(grid, t, opts.level, fail);
  const fields = opts.fields.map((r, i) => systemField(grid, g, t, r, arrays[i]!, dim, fail));
  return { mesh: g.mesh, cellType: t, degree: t.degree, fields, dofs: fields.reduce((s, f) => s + f.dofs, 0) };
}

function failure(grid: VtkGrid, ref: LevelRef | undefined): Fail {
  return (message: string, line?: number): never => {
    throw new RungsInputError(`${placeOf(ref, grid.file, line)}: ${message}`, grid.file);
  };
}

/** One cell type of rungs's, the declared degree, node counts and point indices in range. */
function checkCells(grid: VtkGrid, degree: number | undefined, fail: Fail): VtkCellType {
  if (grid.nCells === 0) fail('the grid has no cells', grid.endLine);

  const type = VTK_CELL_TYPES[grid.types[0]!];
  if (!type) {
    fail(`cell 1 has type ${grid.types[0]} (${vtkCellTypeName(grid.types[0]!)}), which rungs does not read; supported: ${SUPPORTED_CELL_TYPES_TEXT}`, grid.typeLines[0]);
  }
  const t = type!;
  for (let c = 1; c < grid.nCells; c++) {
    if (grid.types[c] !== t.id) {
      fail(
        `mixed-cell mesh: cell ${c + 1} has type ${grid.types[c]} (${vtkCellTypeName(grid.types[c]!)}) but cell 1 has type ` +
          `${t.id} (${t.name}); rungs needs one cell type per mesh`,
        grid.typeLines[c],
      );
    }
  }
  if (degree !== undefined && degree !== t.degree) {
    fail(
      `the study declares degree ${degree}, but the cells are ${t.name} (degree ${t.degree}); write the solution on cells of its own ` +
        'degree (a refined linear mesh of a quadratic solution would measure a different discretization)',
      grid.typeLines[0],
    );
  }
  const { offsets, connectivity, connectivityLines: lines, nPoints } = grid;
  for (let c = 0; c < grid.nCells; c++) {
    const k = offsets[c + 1]! - offsets[c]!;
    const line = lines[offsets[c]!] ?? grid.typeLines[c];
    if (k !== t.nodes) fail(`cell ${c + 1} (${t.name}) lists ${k} nodes; ${t.name} has ${t.nodes}`, line);
    for (let j = offsets[c]!; j < offsets[c + 1]!; j++) {
      const p = connectivity[j]!;
      if (p < 0 || p >= nPoints) fail(`cell ${c + 1} refers to point ${p}, but the file has points 0..${nPoints - 1}`, lines[j]);
    }
  }
  return t;
}

/** The mesh of a grid and the Lagrange space of its nodes: `compact` maps a VTK point to its node (-1: unused),
 *  the corners first (ascending point index, the mesh's vertices), then the other nodes. */
interface BuiltGrid {
  mesh: Mesh;
  compact: Int32Array;
  nVertices: number;
  nNodes: number;
  /** Node coordinates (nNodes·dim). */
  coords: Float64Array;
  /** Global node of each local dof of each cell, in rungs's local order. */
  cellDofs: Int32Array;
  space: FunctionSpace;
}

function buildGrid(grid: VtkGrid, t: VtkCellType, ref: LevelRef | undefined, fail: Fail): BuiltGrid {
  const { file, offsets, connectivity, connectivityLines: lines, nPoints } = grid;
  const dim = CELL_DIM[t.cellKind];

  // Corners become mesh vertices (ascending point index), the other nodes follow; -1 marks unused points.
  const role = new Int8Array(nPoints); // 0 unused, 1 corner, 2 other node
  const firstUse = new Int32Array(nPoints).fill(-1);
  for (let c = 0; c < grid.nCells; c++) {
    for (let j = 0; j < t.nodes; j++) {
      const p = connectivity[offsets[c]! + j]!;
      const r = j < t.corners ? 1 : 2;
      if (role[p] !== 0 && role[p] !== r) {
        fail(`point ${p} is a corner of one cell and a mid-edge node of another (cell ${c + 1}, cell ${firstUse[p]! + 1}): the mesh is not conforming`, lines[offsets[c]! + j]);
      }
      if (role[p] === 0) firstUse[p] = c;
      role[p] = r;
    }
  }
  const compact = new Int32Array(nPoints).fill(-1);
  let nVertices = 0;
  for (let p = 0; p < nPoints; p++) if (role[p] === 1) compact[p] = nVertices++;
  let nNodes = nVertices;
  for (let p = 0; p < nPoints; p++) if (role[p] === 2) compact[p] = nNodes++;
  checkFlat(grid, role, dim, fail);

  const coords = new Float64Array(nNodes * dim);
  for (let p = 0; p < nPoints; p++) {
    const q = compact[p]!;
    if (q < 0) continue;
    for (let d = 0; d < dim; d++) coords[q * dim + d] = grid.points[3 * p + d]!;
  }
  // Corners per cell in rungs's orientation; the node map follows the same permutation.
  const nc = t.corners;
  const cells = new Int32Array(grid.nCells * nc);
  const perms = new Uint8Array(grid.nCells); // 1 where the cell was flipped
  const flipped = FLIP[t.cellKind]!;
  for (let c = 0; c < grid.nCells; c++) {
    const o = offsets[c]!;
    const flip = orientation(t.cellKind, coords, dim, compact, connectivity, o) < 0;
    perms[c] = flip ? 1 : 0;
    for (let i = 0; i < nc; i++) cells[c * nc + i] = compact[connectivity[o + (flip ? flipped[i]! : i)]!]!;
  }
  const where = placeOf(ref, file);
  const pointOfVertex = new Int32Array(nVertices);
  for (let p = 0; p < nPoints; p++) if (role[p] === 1) pointOfVertex[compact[p]!] = p;
  // Shared facets, found once: the boundary facets the mesh needs (as src/mesh's findBoundaryFacets and
  // src/mesh/boundary-faces.ts give them) and the fold check below. An edge on three or more cells goes to src/mesh, which
  // reports it.
  const table = t.cellKind === 'tetrahedron' ? faceTable(nVertices, coords, cells)
    : t.cellKind === 'interval' ? null : edgeTable(nc, nVertices, cells);
  let mesh: Mesh;
  try {
    const meshCoords = coords.subarray(0, nVertices * dim);
    mesh = table !== null && (t.cellKind === 'tetrahedron' || (table.maxShare <= 2 && nVertices * nVertices <= Number.MAX_SAFE_INTEGER))
      ? meshFromArrays({ cellKind: t.cellKind, coords: meshCoords, cells, facets: table.boundary }, where)
      : meshFromArrays({ cellKind: t.cellKind, coords: meshCoords, cells }, where);
  } catch (err) {
    // src/mesh counts cells and vertices from 0 in its own numbering: say it in the file's terms, with the cell's line.
    if (!(err instanceof RungsInputError) || !err.message.startsWith(`${where}: `)) throw err;
    const rest = err.message.slice(where.length + 2);
    const hit = /\bcell (\d+)\b/.exec(rest);
    const c = hit ? Number(hit[1]) : -1;
    const text = rest
      .replace(/\bcell (\d+)\b/, (_m, k: string) => `cell ${Number(k) + 1}`)
      .replace(/with vertices \[([\d, ]+)\]/, (_m, list: string) => `with points [${list.split(', ').map((v) => pointOfVertex[Number(v)]).join(', ')}]`);
    return fail(text, c >= 0 && c < grid.nCells ? lines[offsets[c]!] ?? grid.typeLines[c] : grid.typeLines[0]);
  }
  // Cells were turned positive one by one above, so a fold would pass the inverted-cell check: look for it here.
  const overlap = findOverlap(t.cellKind, mesh.coords, dim, nVertices, cells, (v) => pointOfVertex[v]!, table);
  if (overlap) fail(overlap.message, lines[offsets[overlap.cell]!] ?? grid.typeLines[overlap.cell]);

  const element = lagrangeElement(t.cellKind, t.degree);
  const local = localNodeMaps(t);
  const nLoc = element.nDofs;
  if (local[0]!.length !== nLoc) throw new Error(`internal: ${t.name} maps ${local[0]!.length} nodes onto ${nLoc} dofs`);
  const cellDofs = new Int32Array(grid.nCells * nLoc);
  for (let c = 0; c < grid.nCells; c++) {
    const map = local[perms[c]!]!;
    for (let i = 0; i < nLoc; i++) cellDofs[c * nLoc + i] = compact[connectivity[offsets[c]! + map[i]!]!]!;
  }
  if (t.degree > 1) checkNodePositions(mesh, element.nodes, cellDofs, nLoc, nc, coords, dim, grid, fail);

  const space: FunctionSpace = { mesh, element, nDofs: nNodes, cellDofs, dofCoords: coords, nEdges: 0 };
  return { mesh, compact, nVertices, nNodes, coords, cellDofs, space };
}

type Fail = (message: string, line?: number) => never;

/** The point array holding the solution, with its name. */
function pickArray(grid: VtkGrid, wanted: string | undefined, fail: Fail): { name: string; values: Float64Array } {
  const scalars = grid.pointData.filter((a) => a.components === 1);
  const list = grid.pointData.map((a) => `'${a.name}'${a.components > 1 ? ` (${a.components} components)` : ''}`).join(', ') || 'none';
  let chosen;
  // Where the point arrays start (or the end of the file when there are none), for messages about a missing one.
  const at = grid.pointData[0]?.line ?? grid.endLine;
  if (wanted !== undefined) {
    chosen = grid.pointData.find((a) => a.name === wanted);
    if (!chosen) fail(`no point data named '${wanted}'; the file has ${list}`, at);
    if (chosen!.components !== 1) fail(`point data '${wanted}' has ${chosen!.components} components; rungs needs a scalar (1 component)`, chosen!.line);
  } else {
    if (scalars.length === 0) fail(`no scalar point data (POINT_DATA SCALARS or a one-component PointData DataArray) holds the solution; the file has ${list}`, at);
    if (scalars.length > 1) fail(`several scalar point arrays (${list}); choose the solution with field: '<name>'`, scalars[1]!.line);
    chosen = scalars[0];
  }
  return { name: chosen!.name, values: chosen!.values };
}

/** A list of the file's point arrays for messages: 'a', 'b' (3 components). */
function arrayList(grid: VtkGrid): string {
  return grid.pointData.map((a) => `'${a.name}'${a.components > 1 ? ` (${a.components} components)` : ''}`).join(', ') || 'none';
}

/** Components a field's array may have: 1 for a scalar; for a vector the mesh dimension, or 3 on a lower-dimensional
 *  mesh (the extra components must then be zero, checked once the used points are known). */
function fits(kind: 'scalar' | 'vector', components: number, dim: number): boolean {
  return kind === 'scalar' ? components === 1 : components === dim || (dim < 3 && components === 3);
}

function shapeText(kind: 'scalar' | 'vector', dim: number): string {
  if (kind === 'scalar') return 'a one-component array (SCALARS name type 1, or a DataArray with NumberOfComponents="1")';
  if (dim === 3) return 'three components (VECTORS name type, or NumberOfComponents="3")';
  return `${dim} components, or 3 with the ${dim === 2 ? 'third' : 'second and third'} zero (what VECTORS and most writers give)`;
}

/** The point array of one requested field: named, else named like the field, else (one field) the only array of its
 *  shape; its component count must fit the field. */
function pickFieldArray(grid: VtkGrid, r: VtkFieldRequest, nFields: number, dim: number, t: VtkCellType, fail: Fail): VtkPointArray {
  const at = grid.pointData[0]?.line ?? grid.endLine;
  const what = `field ${r.name} (${r.kind === 'scalar' ? 'scalar' : `a vector of this ${dim}-dimensional mesh`})`;
  let chosen: VtkPointArray | undefined;
  if (r.array !== undefined) {
    chosen = grid.pointData.find((a) => a.name === r.array);
    if (!chosen) fail(`no point data named '${r.array}' for ${what}; the file has ${arrayList(grid)}`, at);
  } else {
    chosen = grid.pointData.find((a) => a.name === r.name);
    if (!chosen && nFields === 1) {
      const shaped = grid.pointData.filter((a) => fits(r.kind, a.components, dim));
      if (shaped.length === 1) chosen = shaped[0];
      else if (shaped.length > 1) fail(`several point arrays could hold ${what} (${shaped.map((a) => `'${a.name}'`).join(', ')}); name it with fields: { ${r.name}: '<array>' }`, shaped[1]!.line);
    }
    if (!chosen) {
      fail(`no point data named '${r.name}' for ${what}; the file has ${arrayList(grid)}: name its array with fields: { ${r.name}: '<array>' }`, at);
    }
  }
  const a = chosen!;
  if (!fits(r.kind, a.components, dim)) {
    fail(`point data '${a.name}' has ${a.components} component${a.components > 1 ? 's' : ''}, but ${what} on ${t.name} cells needs ${shapeText(r.kind, dim)}`, a.line);
  }
  return a;
}

/** One field of a system on the grid's nodes: vector components interleaved node by node, a third component of a 2D
 *  vector checked to be zero, a field of lower degree than the cells taken from the corners and checked at the
 *  other nodes. */
function systemField(grid: VtkGrid, g: BuiltGrid, t: VtkCellType, r: VtkFieldRequest, a: VtkPointArray, dim: number, fail: Fail): VtkSystemField {
  const nc = r.kind === 'scalar' ? 1 : dim;
  const stride = a.components;
  const src = a.values;
  const { compact, nNodes, nVertices } = g;
  const degree = r.degree ?? t.degree;
  if (degree !== 1 && degree !== t.degree) {
    fail(`field ${r.name} has degree ${degree}, but the cells are ${t.name} (degree ${t.degree}); a field can be read on cells of its own degree, ` +
      'or of degree 1 from the corners of quadratic cells', grid.typeLines[0]);
  }
  // Largest value of the used points over the field's own components: the scale round-off is judged against.
  let scale = 0;
  for (let p = 0; p < grid.nPoints; p++) {
    if (compact[p]! < 0) continue;
    for (let i = 0; i < nc; i++) scale = Math.max(scale, Math.abs(src[p * stride + i]!));
  }
  if (stride > nc) {
    const tol = VALUE_ROUND_OFF * scale;
    for (let p = 0; p < grid.nPoints; p++) {
      if (compact[p]! < 0) continue;
      for (let i = nc; i < stride; i++) {
        const v = src[p * stride + i]!;
        if (!(Math.abs(v) <= tol)) {
          const axis = 'xyz'[i];
          fail(`point data '${a.name}' (field ${r.name}) has ${axis} component ${v} at point ${p} (${pointText(grid, p)}); a vector field of ` +
            `this ${dim}-dimensional mesh has ${nc} component${nc > 1 ? 's' : ''}, and a written ${axis} component must be zero to round-off ` +
            `(at most ${VALUE_ROUND_OFF.toExponential(0)} of the largest in-plane value, ${scale} here): the array does not hold the field ${r.name}, or ` +
            'its components are in another order', a.line);
        }
      }
    }
  }
  const full = new Float64Array(nNodes * nc);
  for (let p = 0; p < grid.nPoints; p++) {
    const q = compact[p]!;
    if (q < 0) continue;
    for (let i = 0; i < nc; i++) full[q * nc + i] = src[p * stride + i]!;
  }
  let space = g.space;
  let coeffs = full;
  const fromCorners = degree < t.degree;
  if (fromCorners) {
    space = cornerSpace(g, t);
    coeffs = full.slice(0, nVertices * nc);
    checkCornerField(grid, g, t, r, a, space, full, nc, scale, fail);
  }
  const field = r.kind === 'scalar' ? lagrangeField(space, coeffs) : vectorLagrangeField(space, nc, coeffs);
  return { name: r.name, array: a.name, kind: r.kind, components: nc, degree: degree as 1 | 2, field, space, dofs: space.nDofs * nc, fromCorners };
}

function pointText(grid: VtkGrid, p: number): string {
  return Array.from(grid.points.subarray(3 * p, 3 * p + 3)).map((x) => Number(x.toPrecision(12))).join(', ');
}

/** The degree-1 space on the corners of the cells (the mesh's vertices, numbered first). */
function cornerSpace(g: BuiltGrid, t: VtkCellType): FunctionSpace {
  const element = lagrangeElement(t.cellKind, 1);
  const nLoc = g.space.element.nDofs, nc = t.corners;
  const cellDofs = new Int32Array(g.mesh.nCells * nc);
  for (let c = 0; c < g.mesh.nCells; c++) for (let i = 0; i < nc; i++) cellDofs[c * nc + i] = g.cellDofs[c * nLoc + i]!;
  const dim = g.mesh.dim;
  return { mesh: g.mesh, element, nDofs: g.nVertices, cellDofs, dofCoords: g.coords.slice(0, g.nVertices * dim), nEdges: 0 };
}

/** Every node of a cell that is not a corner must hold the degree-1 interpolation of the corner values there (the
 *  average of its edge's corners for a mid-edge node, of the four corners for a quad's centre), to round-off. */
function checkCornerField(
  grid: VtkGrid, g: BuiltGrid, t: VtkCellType, r: VtkFieldRequest, a: VtkPointArray, corner: FunctionSpace, full: Float64Array,
  nc: number, scale: number, fail: Fail,
): void {
  const high = g.space.element, nLoc = high.nDofs, nCorner = t.corners, dim = g.mesh.dim;
  // Weights of the corners at each node of the cell of higher degree: the degree-1 basis at its reference nodes
  // (tabulated once; the same for every cell).
  const w = new Float64Array(nLoc * nCorner);
  corner.element.tabulate(high.nodes, nLoc, w, new Float64Array(nLoc * nCorner * dim));
  const tol = VALUE_ROUND_OFF * scale;
  const pointOf = new Int32Array(g.nNodes);
  for (let p = 0; p < grid.nPoints; p++) if (g.compact[p]! >= 0) pointOf[g.compact[p]!] = p;
  for (let c = 0; c < g.mesh.nCells; c++) {
    const o = c * nLoc;
    for (let i = nCorner; i < nLoc; i++) {
      const q = g.cellDofs[o + i]!;
      for (let k = 0; k < nc; k++) {
        let expected = 0;
        for (let j = 0; j < nCorner; j++) expected += w[i * nCorner + j]! * full[g.cellDofs[o + j]! * nc + k]!;
        const got = full[q * nc + k]!;
        if (Math.abs(got - expected) > tol) {
          const used: number[] = [];
          for (let j = 0; j < nCorner; j++) if (w[i * nCorner + j]! !== 0) used.push(pointOf[g.cellDofs[o + j]!]!);
          used.sort((x, y) => x - y);
          const comp = nc > 1 ? ` component ${k + 1}` : '';
          fail(`point data '${a.name}' (field ${r.name}, degree 1) is not a degree-1 field on the corners of the ${t.name} cells: point ${pointOf[q]} ` +
            `(${pointText(grid, pointOf[q]!)}) holds${comp} ${got}, but the degree-1 interpolation of its cell's corners there ` +
            `(${used.length === 2 ? `the average of points ${used[0]} and ${used[1]}` : `from points ${used.join(', ')}`}) is ${expected}, ${Math.abs(got - expected).toPrecision(3)} apart ` +
            `(round-off allows ${VALUE_ROUND_OFF.toExponential(0)} of the array's largest value, ${scale}); write the degree-1 field interpolated to every node ` +
            `(each mid-edge value the average of its edge's corners), or measure the degree-${t.degree} field the file holds with ` +
            `fields: { ${r.name}: { array: '${a.name}', degree: ${t.degree} } }`, a.line);
        }
      }
    }
  }
}

/** Lower-dimensional meshes must be flat: 2D cells in a plane z = const, 1D cells on a line y = z = const. */
function checkFlat(grid: VtkGrid, role: Int8Array, dim: number, fail: Fail): void {
  if (dim === 3) return;
  let first = -1;
  let scale = 0;
  for (let p = 0; p < grid.nPoints; p++) {
    if (!role[p]) continue;
    if (first < 0) first = p;
    for (let d = 0; d < 3; d++) scale = Math.max(scale, Math.abs(grid.points[3 * p + d]! - grid.points[3 * first + d]!));
  }
  const tol = FLAT_TOLERANCE * Math.max(scale, Number.MIN_VALUE);
  for (let p = 0; p < grid.nPoints; p++) {
    if (!role[p]) continue;
    for (let d = dim; d < 3; d++) {
      if (Math.abs(grid.points[3 * p + d]! - grid.points[3 * first + d]!) > tol) {
        const axis = 'xyz'[d];
        fail(`point ${p} has ${axis} = ${grid.points[3 * p + d]}, point ${first} has ${axis} = ${grid.points[3 * first + d]}: ` +
          `${dim === 2 ? 'two-dimensional cells must lie in a plane z = constant' : 'line cells must lie on the x axis (y and z constant)'}`);
      }
    }
  }
}

/** Sign of the cell's orientation from its corners in VTK order (no closure: this runs once per cell). */
function orientation(kind: string, x: Float64Array, dim: number, compact: Int32Array, conn: Int32Array, o: number): number {
  const p0 = compact[conn[o]!]! * dim, p1 = compact[conn[o + 1]!]! * dim;
  if (kind === 'interval') return x[p1]! - x[p0]!;
  const p2 = compact[conn[o + 2]!]! * dim;
  if (kind === 'triangle') return (x[p1]! - x[p0]!) * (x[p2 + 1]! - x[p0 + 1]!) - (x[p2]! - x[p0]!) * (x[p1 + 1]! - x[p0 + 1]!);
  const p3 = compact[conn[o + 3]!]! * dim;
  if (kind === 'quadrilateral') {
    // shoelace, summed in the order i = 0..3 of P(i) × P(i + 1)
    let a = 0;
    a += x[p0]! * x[p1 + 1]! - x[p1]! * x[p0 + 1]!;
    a += x[p1]! * x[p2 + 1]! - x[p2]! * x[p1 + 1]!;
    a += x[p2]! * x[p3 + 1]! - x[p3]! * x[p2 + 1]!;
    a += x[p3]! * x[p0 + 1]! - x[p0]! * x[p3 + 1]!;
    return a;
  }
  const ux = x[p1]! - x[p0]!, uy = x[p1 + 1]! - x[p0 + 1]!, uz = x[p1 + 2]! - x[p0 + 2]!;
  const vx = x[p2]! - x[p0]!, vy = x[p2 + 1]! - x[p0 + 1]!, vz = x[p2 + 2]! - x[p0 + 2]!;
  const wx = x[p3]! - x[p0]!, wy = x[p3 + 1]! - x[p0 + 1]!, wz = x[p3 + 2]! - x[p0 + 2]!;
  return ux * (vy * wz - vz * wy) - uy * (vx * wz - vz * wx) + uz * (vx * wy - vy * wx);
}

/** For the cell as written (index 0) and flipped (index 1): VTK node index of each rungs local dof. */
function localNodeMaps(t: VtkCellType): [number[], number[]] {
  const build = (perm: number[]): number[] => {
    const map = perm.slice();
    for (const [a, b] of REFERENCE_EDGES[t.cellKind]) {
      const pa = perm[a]!, pb = perm[b]!;
      const hit = t.edgeNodes.find(([x, y]) => (x === pa && y === pb) || (x === pb && y === pa));
      if (t.degree > 1 && t.edgeNodes.length) {
        if (!hit) throw new Error(`internal: ${t.name} has no node on edge (${pa}, ${pb})`);
        map.push(hit[2]);
      }
    }
    map.push(...t.interiorNodes);
    return map;
  };
  const identity = Array.from({ length: t.corners }, (_, i) => i);
  return [build(identity), build(FLIP[t.cellKind]!)];
}

/** Every non-corner node must sit where rungs's reference map puts it (edge midpoints, the quad's centre). */
function checkNodePositions(
  mesh: Mesh, refNodes: Float64Array, cellDofs: Int32Array, nLoc: number, nc: number, coords: Float64Array, dim: number,
  grid: VtkGrid, fail: Fail,
): void {
  const x = new Float64Array(3);
  for (let c = 0; c < mesh.nCells; c++) {
    let size = 0;
    for (let i = 0; i < nc; i++) {
      for (let j = i + 1; j < nc; j++) {
        let s = 0;
        for (let d = 0; d < dim; d++) s += (coords[cellDofs[c * nLoc + i]! * dim + d]! - coords[cellDofs[c * nLoc + j]! * dim + d]!) ** 2;
        size = Math.max(size, Math.sqrt(s));
      }
    }
    for (let i = nc; i < nLoc; i++) {
      mapReferencePoint(mesh, c, refNodes, i * dim, x);
      const q = cellDofs[c * nLoc + i]!;
      let off = 0;
      for (let d = 0; d < dim; d++) off = Math.max(off, Math.abs(coords[q * dim + d]! - x[d]!));
      if (off > MID_NODE_TOLERANCE * size) {
        const at = Array.from(coords.subarray(q * dim, q * dim + dim)).join(', ');
        const expected = Array.from(x.subarray(0, dim)).map((v) => Number(v.toPrecision(12))).join(', ');
        fail(
          `cell ${c + 1}: its node at (${at}) should sit at (${expected}), where rungs's straight-sided element puts it; check the VTK node ` +
            'order (corners, then one mid-edge node per edge in VTK\'s edge order) — curved cells are not read',
          grid.connectivityLines[grid.offsets[c]!],
        );
      }
    }
  }
}
