import { RungsInputError } from '../errors.ts';
import { findBoundaryFaces } from './boundary-faces.ts';
import { findBoundaryFacets } from './boundary-facets.ts';
import { computeH } from './diameter.ts';
import { checkMesh } from './quality.ts';
import { CELL_DIM, VERTICES_PER_CELL, VERTICES_PER_FACET, type CellKind, type Mesh } from './types.ts';

/** A user mesh as flat arrays (see Mesh for the layout). Without facets the boundary is found from the cells
 *  (in 3D turned outward, see findBoundaryFaces) and tagged with the one name in tagNames, default 'boundary'; facets without facetTags all get
 *  tag 0. */
export interface MeshArrays {
  cellKind: CellKind;
  coords: ArrayLike<number>;
  cells: ArrayLike<number>;
  facets?: ArrayLike<number>;
  facetTags?: ArrayLike<number>;
  tagNames?: readonly string[];
}

/** Builds a Mesh from flat arrays, computes h, and validates it with checkMesh (`where` names the source in errors). */
export function meshFromArrays(arrays: MeshArrays, where = 'mesh'): Mesh {
  const kind = arrays.cellKind;
  if (!Object.hasOwn(VERTICES_PER_CELL, kind)) {
    throw new RungsInputError(
      `${where}: cellKind ${JSON.stringify(kind)} is not one of ${Object.keys(VERTICES_PER_CELL).join(', ')}`,
      `${where}.cellKind`,
    );
  }
  const dim = CELL_DIM[kind];
  const verticesPerCell = VERTICES_PER_CELL[kind];
  const verticesPerFacet = VERTICES_PER_FACET[kind];
  const coords = Float64Array.from(requireGroups(arrays.coords, dim, 'coords', where, false));
  const cells = Int32Array.from(requireGroups(arrays.cells, verticesPerCell, 'cells', where, true));
  const nVertices = coords.length / dim;

  let facets: Int32Array;
  let facetTags: Int32Array;
  let tagNames: string[];
  if (arrays.facets === undefined) {
    if (arrays.facetTags !== undefined) {
      throw new RungsInputError(`${where}: facetTags given without facets`, `${where}.facetTags`);
    }
    tagNames = [...(arrays.tagNames ?? ['boundary'])];
    if (tagNames.length !== 1) {
      throw new RungsInputError(
        `${where}: without facets the whole boundary gets one tag, so tagNames must hold one name, got ${tagNames.length}`,
        `${where}.tagNames`,
      );
    }
    facets = kind === 'tetrahedron' || kind === 'hexahedron'
      ? findBoundaryFaces(kind, nVertices, coords, cells, where)
      : findBoundaryFacets(kind, nVertices, cells, where);
    facetTags = new Int32Array(facets.length / verticesPerFacet);
  } else {
    facets = Int32Array.from(requireGroups(arrays.facets, verticesPerFacet, 'facets', where, true));
    const nFacets = facets.length / verticesPerFacet;
    facetTags =
      arrays.facetTags === undefined
        ? new Int32Array(nFacets)
        : Int32Array.from(requireGroups(arrays.facetTags, 1, 'facetTags', where, true));
    tagNames = [...(arrays.tagNames ?? ['boundary'])];
  }

  const mesh: Mesh = {
    dim,
    cellKind: kind,
    nVertices,
    coords,
    nCells: cells.length / verticesPerCell,
    verticesPerCell,
    cells,
    nFacets: facetTags.length,
    verticesPerFacet,
    facets,
    facetTags,
    tagNames,
    h: 0,
  };
  mesh.h = computeH(mesh);
  checkMesh(mesh, where);
  return mesh;
}

/** The array itself, after checking its length is a multiple of `group` and (for indices) its entries are integers
 *  that fit an Int32Array, so the typed-array copy cannot silently truncate or wrap. */
function requireGroups(
  values: ArrayLike<number> | undefined,
  group: number,
  field: string,
  where: string,
  integers: boolean,
): ArrayLike<number> {
  if (values === undefined || values === null || typeof values.length !== 'number') {
    throw new RungsInputError(`${where}: ${field} must be an array of numbers`, `${where}.${field}`);
  }
  if (values.length % group !== 0) {
    throw new RungsInputError(
      `${where}: ${field} has ${values.length} entries, not a multiple of ${group} per item`,
      `${where}.${field}`,
    );
  }
  for (let k = 0; k < values.length; k++) {
    const x = values[k];
    const ok = typeof x === 'number' && (integers ? Number.isInteger(x) && x >= -0x80000000 && x <= 0x7fffffff : true);
    if (!ok) {
      throw new RungsInputError(
        `${where}: ${field}[${k}] is ${String(x)}, expected ${integers ? 'an integer index' : 'a number'}`,
        `${where}.${field}[${Math.floor(k / group)}]`,
      );
    }
  }
  return values;
}
