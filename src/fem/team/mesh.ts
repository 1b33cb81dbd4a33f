import type { CellKind, Mesh } from '../../mesh/types.ts';
import type { FunctionSpace } from '../dofmap/types.ts';
import { shared } from './shared.ts';

/** A mesh's cells and vertices as plain data in shared memory: what a worker of the cell team reads (no boundary
 *  facets: the cell loops do not read them). */
export interface SharedMesh {
  dim: 1 | 2 | 3;
  cellKind: CellKind;
  nVertices: number;
  nCells: number;
  verticesPerCell: number;
  coords: Float64Array;
  cells: Int32Array;
  h: number;
}

/**
 * The mesh's data for the workers. Its coordinates and cells are MOVED into shared memory: the Mesh then holds the
 * shared arrays (the same values, shared.ts copies each array once) and its private arrays are left to the collector,
 * so a level holds one copy of them, not two (at 1024² P1 squares 17 MB of coordinates and 25 MB of cells; measured
 * with study.bench.ts, the seven-level P1 ladder). Nothing in rungs writes into a mesh's arrays or keeps them apart
 * from their Mesh across levels. A mesh whose properties cannot be set (frozen) keeps its arrays; the copies serve.
 */
export function sharedMesh(mesh: Mesh): SharedMesh {
  const coords = shared(mesh.coords), cells = shared(mesh.cells);
  adopt(mesh, 'coords', coords);
  adopt(mesh, 'cells', cells);
  return { dim: mesh.dim, cellKind: mesh.cellKind, nVertices: mesh.nVertices, nCells: mesh.nCells, verticesPerCell: mesh.verticesPerCell, coords, cells, h: mesh.h };
}

/** The space's unknowns per cell in shared memory, moved there as sharedMesh moves the mesh's arrays (with its mesh's:
 *  a P1 space's cellDofs IS its mesh's cell array, and stays the same array as the mesh's after the move). */
export function sharedCellDofs(space: FunctionSpace): Int32Array {
  sharedMesh(space.mesh);
  const cellDofs = shared(space.cellDofs);
  adopt(space, 'cellDofs', cellDofs);
  return cellDofs;
}

function adopt<O extends object, K extends keyof O>(o: O, key: K, value: O[K]): void {
  if (o[key] === value) return;
  try { o[key] = value; } catch { /* frozen: the copy serves the workers, the original stays */ }
}

/** The Mesh of shared data (in a worker): cells and vertices, no boundary facets. */
export function meshOf(m: SharedMesh): Mesh {
  return {
    dim: m.dim, cellKind: m.cellKind, nVertices: m.nVertices, coords: m.coords, nCells: m.nCells, verticesPerCell: m.verticesPerCell,
    cells: m.cells, nFacets: 0, verticesPerFacet: 0, facets: new Int32Array(0), facetTags: new Int32Array(0), tagNames: [], h: m.h,
  };
}
