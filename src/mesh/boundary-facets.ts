import { RungsInputError } from '../errors.ts';
import { CELL_EDGES } from './cell-edges.ts';
import type { CellKind } from './types.ts';

/** The boundary facets of a 1D or 2D mesh (3D: see findBoundaryFaces), found from its cells: in 1D the vertices of exactly one cell (ascending);
 *  in 2D the edges of exactly one cell, in that cell's direction (domain on the left when cells are counter-clockwise),
 *  in order of first appearance. Throws if an edge is shared by more than two cells. */
export function findBoundaryFacets(
  cellKind: CellKind,
  nVertices: number,
  cells: Int32Array,
  where: string,
): Int32Array {
  if (cellKind === 'interval') {
    const incidence = new Int32Array(nVertices);
    for (let k = 0; k < cells.length; k++) incidence[cells[k]!]!++;
    const ends: number[] = [];
    for (let v = 0; v < nVertices; v++) if (incidence[v] === 1) ends.push(v);
    return Int32Array.from(ends);
  }
  if (cellKind === 'tetrahedron' || cellKind === 'hexahedron') {
    // 3D faces need the coordinates to be turned outward: findBoundaryFaces (boundary-faces.ts).
    throw new RungsInputError(`${where}: give facets and facetTags for ${cellKind === 'tetrahedron' ? 'tetrahedral' : 'hexahedral'} meshes`, `${where}.facets`);
  }
  if (nVertices * nVertices > Number.MAX_SAFE_INTEGER) {
    throw new RungsInputError(`${where}: too many vertices to find boundary edges; give facets`, `${where}.facets`);
  }
  const n = cellKind === 'triangle' ? 3 : 4;
  const edges = CELL_EDGES[cellKind];
  // Undirected edge key → first cell-edge slot (c * n + k) while seen once, −1 once seen twice.
  const seen = new Map<number, number>();
  for (let c = 0; c * n < cells.length; c++) {
    for (let k = 0; k < edges.length; k++) {
      const a = cells[c * n + edges[k]![0]]!;
      const b = cells[c * n + edges[k]![1]]!;
      const key = Math.min(a, b) * nVertices + Math.max(a, b);
      const slot = seen.get(key);
      if (slot === undefined) seen.set(key, c * n + k);
      else if (slot >= 0) seen.set(key, -1);
      else {
        throw new RungsInputError(
          `${where}: edge (${a}, ${b}) of cell ${c} is shared by more than two cells`,
          `${where}.cells[${c}]`,
        );
      }
    }
  }
  const facets: number[] = [];
  for (const slot of seen.values()) {
    if (slot < 0) continue;
    const c = Math.floor(slot / n);
    const [p, q] = edges[slot % n]!;
    facets.push(cells[c * n + p]!, cells[c * n + q]!);
  }
  return Int32Array.from(facets);
}
