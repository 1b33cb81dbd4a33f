import { RungsInputError } from '../errors.ts';
import { findDefectiveCell } from './cell-validity.ts';
import { cellDiameter, computeH, diameterRange } from './diameter.ts';
import { findFacetProblem } from './facet-check.ts';
import { CELL_DIM, VERTICES_PER_CELL, VERTICES_PER_FACET, type Mesh } from './types.ts';

export { cellDiameter, computeH };

/** Relative mismatch allowed between mesh.h and the recomputed largest diameter (round-off only). */
const H_TOLERANCE = 1e-12;

export interface MeshSummary {
  cells: number;
  vertices: number;
  /** Largest cell diameter. */
  h: number;
  /** Smallest cell diameter. */
  hMin: number;
}

export function meshSummary(mesh: Mesh): MeshSummary {
  const { hMax, hMin } = diameterRange(mesh);
  return { cells: mesh.nCells, vertices: mesh.nVertices, h: hMax, hMin };
}

/** Throws RungsInputError (naming the vertex, cell or facet index) unless the mesh is consistent: sizes match the
 *  counts, coordinates are finite, indices are in range, no cell is inverted or degenerate, boundary facets are
 *  boundary edges with the domain on their left, tags are known, and h is the largest cell diameter.
 *  `where` names the mesh's origin (a file or study) in messages. */
export function checkMesh(mesh: Mesh, where = 'mesh'): void {
  checkShape(mesh, where);
  const { coords, cells, facets, facetTags, nVertices, dim } = mesh;

  for (let k = 0; k < coords.length; k++) {
    if (!Number.isFinite(coords[k]!)) {
      const v = Math.floor(k / dim);
      fail(`${where}: vertex ${v} has a non-finite coordinate (${coords[k]})`, `${where}.coords[${v}]`);
    }
  }
  for (let k = 0; k < cells.length; k++) {
    const v = cells[k]!;
    if (v < 0 || v >= nVertices) {
      const c = Math.floor(k / mesh.verticesPerCell);
      fail(
        `${where}: cell ${c} refers to vertex ${v}, but valid vertex indices are 0..${nVertices - 1}`,
        `${where}.cells[${c}]`,
      );
    }
  }
  for (let k = 0; k < facets.length; k++) {
    const v = facets[k]!;
    if (v < 0 || v >= nVertices) {
      const f = Math.floor(k / mesh.verticesPerFacet);
      fail(
        `${where}: boundary facet ${f} refers to vertex ${v}, but valid vertex indices are 0..${nVertices - 1}`,
        `${where}.facets[${f}]`,
      );
    }
  }
  for (let f = 0; f < facetTags.length; f++) {
    const t = facetTags[f]!;
    if (t < 0 || t >= mesh.tagNames.length) {
      fail(
        `${where}: boundary facet ${f} has tag index ${t}, but valid tag indices are 0..${mesh.tagNames.length - 1} ` +
          `(${mesh.tagNames.join(', ') || 'no tags defined'})`,
        `${where}.facetTags[${f}]`,
      );
    }
  }

  const defect = findDefectiveCell(mesh);
  if (defect !== null) {
    const vertices = Array.from(cells.subarray(defect.cell * mesh.verticesPerCell, (defect.cell + 1) * mesh.verticesPerCell));
    const detail =
      defect.problem === 'inverted'
        ? `is inverted (negative Jacobian determinant ${defect.jacobian}); list its vertices ` +
          (dim === 1 ? 'in increasing x' : dim === 2 ? 'counter-clockwise' : mesh.cellKind === 'hexahedron'
            ? 'with the bottom face counter-clockwise seen from the top face, then the top face in the same order'
            : 'with a positive orientation')
        : `is degenerate (Jacobian determinant ${defect.jacobian}, zero for its diameter ${defect.diameter})`;
    fail(`${where}: cell ${defect.cell} with vertices [${vertices.join(', ')}] ${detail}`, `${where}.cells[${defect.cell}]`);
  }

  const facetProblem = findFacetProblem(mesh);
  if (facetProblem !== null) {
    fail(`${where}: boundary facet ${facetProblem.facet}: ${facetProblem.problem}`, `${where}.facets[${facetProblem.facet}]`);
  }

  const h = computeH(mesh);
  if (!(Math.abs(mesh.h - h) <= H_TOLERANCE * h)) {
    fail(`${where}: h is ${mesh.h}, but the largest cell diameter is ${h}`, `${where}.h`);
  }
}

/** Kinds, counts and array lengths agree with each other. */
function checkShape(mesh: Mesh, where: string): void {
  const kind = mesh.cellKind;
  if (!Object.hasOwn(VERTICES_PER_CELL, kind)) {
    fail(
      `${where}: cellKind ${JSON.stringify(kind)} is not one of ${Object.keys(VERTICES_PER_CELL).join(', ')}`,
      `${where}.cellKind`,
    );
  }
  const expected: Array<[keyof Mesh, number]> = [
    ['dim', CELL_DIM[kind]],
    ['verticesPerCell', VERTICES_PER_CELL[kind]],
    ['verticesPerFacet', VERTICES_PER_FACET[kind]],
  ];
  for (const [field, value] of expected) {
    if (mesh[field] !== value) fail(`${where}: ${field} must be ${value} for ${kind} cells, got ${String(mesh[field])}`, `${where}.${field}`);
  }
  for (const field of ['nVertices', 'nCells', 'nFacets'] as const) {
    if (!Number.isInteger(mesh[field]) || mesh[field] < 0) {
      fail(`${where}: ${field} must be a non-negative integer, got ${mesh[field]}`, `${where}.${field}`);
    }
  }
  if (mesh.nCells === 0) fail(`${where}: the mesh has no cells`, `${where}.nCells`);
  const arrays: Array<[string, unknown, typeof Float64Array | typeof Int32Array, number]> = [
    ['coords', mesh.coords, Float64Array, mesh.nVertices * mesh.dim],
    ['cells', mesh.cells, Int32Array, mesh.nCells * mesh.verticesPerCell],
    ['facets', mesh.facets, Int32Array, mesh.nFacets * mesh.verticesPerFacet],
    ['facetTags', mesh.facetTags, Int32Array, mesh.nFacets],
  ];
  for (const [field, array, type, length] of arrays) {
    if (!(array instanceof type)) fail(`${where}: ${field} must be a ${type.name}`, `${where}.${field}`);
    if ((array as ArrayLike<number>).length !== length) {
      fail(`${where}: ${field} has length ${(array as ArrayLike<number>).length}, expected ${length}`, `${where}.${field}`);
    }
  }
  if (!Array.isArray(mesh.tagNames)) fail(`${where}: tagNames must be an array of strings`, `${where}.tagNames`);
  const seen = new Set<string>();
  for (const name of mesh.tagNames) {
    if (typeof name !== 'string' || name === '') fail(`${where}: tag names must be non-empty strings`, `${where}.tagNames`);
    if (seen.has(name)) fail(`${where}: tag name '${name}' appears twice`, `${where}.tagNames`);
    seen.add(name);
  }
}

function fail(message: string, where: string): never {
  throw new RungsInputError(message, where);
}
