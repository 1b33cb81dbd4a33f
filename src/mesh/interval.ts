import { computeH } from './diameter.ts';
import { gridPoints } from './grid.ts';
import { requireCount, requireIndexable, requireRange } from './input-checks.ts';
import type { Mesh } from './types.ts';

/** Uniform mesh of [a, b] with n cells; vertex i at a + i (b − a)/n. Boundary points tagged 'left' (x = a) and
 *  'right' (x = b). */
export function intervalMesh(a: number, b: number, n: number): Mesh {
  requireRange(a, b, 'interval [a, b]');
  requireCount(n, 'interval cell count n');
  requireIndexable(n + 1, 'vertices');
  const coords = gridPoints(a, b, n);
  const cells = new Int32Array(2 * n);
  for (let c = 0; c < n; c++) {
    cells[2 * c] = c;
    cells[2 * c + 1] = c + 1;
  }
  const mesh: Mesh = {
    dim: 1,
    cellKind: 'interval',
    nVertices: n + 1,
    coords,
    nCells: n,
    verticesPerCell: 2,
    cells,
    nFacets: 2,
    verticesPerFacet: 1,
    facets: Int32Array.of(0, n),
    facetTags: Int32Array.of(0, 1),
    tagNames: ['left', 'right'],
    h: 0,
  };
  mesh.h = computeH(mesh);
  return mesh;
}
