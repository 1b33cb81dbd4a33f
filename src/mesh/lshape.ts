import { RungsInputError } from '../errors.ts';
import { walkGridBoundary } from './boundary-walk.ts';
import { computeH } from './diameter.ts';
import { trianglesPerSquare, writeSquareTriangles, type Diagonal } from './grid.ts';
import { requireCount, requireDiagonal, requireIndexable } from './input-checks.ts';
import type { Mesh } from './types.ts';

/** How the L-shape's boundary is tagged.
 *  'grouped': 'outer' (the four sides on x = ±1, y = ±1) and 'reentrant' (the two edges meeting at the origin).
 *  'sides':   'left' (x = −1), 'right' (x = 1, 0 ≤ y ≤ 1), 'bottom' (y = −1, −1 ≤ x ≤ 0), 'top' (y = 1), and
 *             'reentrant' as above. */
export type LShapeTagging = 'grouped' | 'sides';

/** The L-shaped domain [−1,1]^2 minus the lower-right quadrant (0,1]×[−1,0): the re-entrant corner is at the origin
 *  with interior angle 3π/2, and the edges meeting there are {0}×[−1,0] and [0,1]×{0}. It is meshed as the
 *  structured 2n×2n grid of squares of side 1/n with the squares of the removed quadrant left out, each square cut
 *  into triangles by `diagonal` (parity for 'alternating' is that of the full grid, i + j). Vertices are numbered
 *  row by row from (−1, −1), skipping the removed ones; 'crossed' centre vertices follow in square order. Boundary
 *  facets run counter-clockwise from (−1, −1). */
export function lShapeMesh(n: number, diagonal: Diagonal = 'right', tagging: LShapeTagging = 'grouped'): Mesh {
  requireCount(n, 'L-shape cells per unit length n');
  requireDiagonal(diagonal, 'L-shape diagonal');
  if (tagging !== 'grouped' && tagging !== 'sides') {
    throw new RungsInputError(`L-shape tagging must be 'grouped' or 'sides', got ${JSON.stringify(tagging)}`, 'L-shape tagging');
  }
  const m = 2 * n;
  const rowLength = m + 1;
  const isRemovedVertex = (i: number, j: number) => i > n && j < n;
  const isRemovedSquare = (i: number, j: number) => i >= n && j < n;

  const nGrid = rowLength * rowLength - n * n;
  const nSquares = 3 * n * n;
  const nCentres = diagonal === 'crossed' ? nSquares : 0;
  const nVertices = nGrid + nCentres;
  const nCells = trianglesPerSquare(diagonal) * nSquares;
  requireIndexable(rowLength * rowLength, 'grid vertices');
  requireIndexable(3 * nCells, 'cell vertex entries');

  // (i − n)/n is one correctly rounded division: exact at −1, 0, 1 and symmetric about the origin.
  const ticks = new Float64Array(m + 1);
  for (let i = 0; i <= m; i++) ticks[i] = (i - n) / n;
  const vertexAt = new Int32Array(rowLength * rowLength).fill(-1);
  const coords = new Float64Array(2 * nVertices);
  let v = 0;
  for (let j = 0; j <= m; j++) {
    for (let i = 0; i <= m; i++) {
      if (isRemovedVertex(i, j)) continue;
      vertexAt[i + j * rowLength] = v;
      coords[2 * v] = ticks[i]!;
      coords[2 * v + 1] = ticks[j]!;
      v++;
    }
  }

  const cells = new Int32Array(3 * nCells);
  let o = 0;
  let centre = nGrid;
  for (let j = 0; j < m; j++) {
    for (let i = 0; i < m; i++) {
      if (isRemovedSquare(i, j)) continue;
      const g = i + j * rowLength;
      if (nCentres > 0) {
        coords[2 * centre] = 0.5 * (ticks[i]! + ticks[i + 1]!);
        coords[2 * centre + 1] = 0.5 * (ticks[j]! + ticks[j + 1]!);
      }
      o = writeSquareTriangles(
        cells, o, vertexAt[g]!, vertexAt[g + 1]!, vertexAt[g + rowLength + 1]!, vertexAt[g + rowLength]!, centre, diagonal, i + j,
      );
      centre++;
    }
  }

  // Polygon corners in grid indices, counter-clockwise from (−1, −1).
  const corners: Array<[number, number]> = [[0, 0], [n, 0], [n, n], [m, n], [m, m], [0, m]];
  const tagNames = tagging === 'grouped' ? ['outer', 'reentrant'] : ['left', 'right', 'bottom', 'top', 'reentrant'];
  const tag = (name: string) => tagNames.indexOf(tagging === 'grouped' && name !== 'reentrant' ? 'outer' : name);
  const sideTags = ['bottom', 'reentrant', 'reentrant', 'right', 'top', 'left'].map(tag);
  const { facets, facetTags } = walkGridBoundary(corners, sideTags, (i, j) => vertexAt[i + j * rowLength]!);

  const mesh: Mesh = {
    dim: 2,
    cellKind: 'triangle',
    nVertices,
    coords,
    nCells,
    verticesPerCell: 3,
    cells,
    nFacets: facetTags.length,
    verticesPerFacet: 2,
    facets,
    facetTags,
    tagNames,
    h: 0,
  };
  mesh.h = computeH(mesh);
  return mesh;
}
