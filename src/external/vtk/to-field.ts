// Turns a VTK unstructured grid with nodal values into a rungs Mesh and a Lagrange DiscreteField, so that
// src/norms integrates its errors exactly as for rungs's own solutions. VTK's node order (see cell-types.ts) is mapped
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
import type { DiscreteField } from '../../norms/types.ts';
import { placeOf, type LevelRef } from '../where.ts';
import { SUPPORTED_CELL_TYPES_TEXT, VTK_CELL_TYPES, vtkCellTypeName, type VtkCellType } from './cell-types.ts';
import type { VtkGrid } from './grid.ts';
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
  const { file } = grid;
  const ref = opts.level;
  const fail = (message: string, line?: number): never => {
    throw new RungsInputError(`${placeOf(ref, file, line)}: ${message}`, file);
  };
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
  if (opts.degree !== undefined && opts.degree !== t.degree) {
    fail(
      `the study declares degree ${opts.degree}, but the cells are ${t.name} (degree ${t.degree}); write the solution on cells of its own ` +
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

  const solution = pickArray(grid, opts.field, fail);
  const values = solution.values;
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
  const nodeValues = new Float64Array(nNodes);
  for (let p = 0; p < nPoints; p++) {
    const q = compact[p]!;
    if (q < 0) continue;
    for (let d = 0; d < dim; d++) coords[q * dim + d] = grid.points[3 * p + d]!;
    nodeValues[q] = values[p]!;
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
  return { mesh, field: lagrangeField(space, nodeValues), degree: t.degree, dofs: nNodes, fieldName: solution.name, cellType: t, space };
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
