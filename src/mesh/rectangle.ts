import { RungsInputError } from '../errors.ts';
import { walkGridBoundary } from './boundary-walk.ts';
import { computeH } from './diameter.ts';
import { gridPoints, trianglesPerSquare, writeSquareTriangles, type Diagonal } from './grid.ts';
import { requireCount, requireDiagonal, requireIndexable, requireRange } from './input-checks.ts';
import type { Mesh } from './types.ts';
import { meshFloat64, meshInt32 } from './shared-arrays.ts';

export interface RectangleOptions {
  x: readonly [number, number];
  y: readonly [number, number];
  nx: number;
  ny: number;
  cells: 'triangles' | 'quadrilaterals';
  /** Triangles only; default 'right'. */
  diagonal?: Diagonal;
}

/** Tag names of rectangle meshes, in tag-index order. */
export const RECTANGLE_TAGS = ['left', 'right', 'bottom', 'top'] as const;

/** Structured mesh of [x0,x1]×[y0,y1] with nx×ny equal rectangles, each kept as a quadrilateral or cut into
 *  triangles (see Diagonal). Grid vertex (i, j) is number i + j (nx + 1) (row-major, so neighbours differ by 1 or
 *  nx + 1); 'crossed' centre vertices follow, square (i, j) at (nx + 1)(ny + 1) + i + j nx. Cells go square by
 *  square in the same order. Boundary facets run counter-clockwise from (x0, y0): bottom, right, top, left. */
export function rectangleMesh(options: RectangleOptions): Mesh {
  const [x0, x1] = requireRange(options.x?.[0], options.x?.[1], 'rectangle x');
  const [y0, y1] = requireRange(options.y?.[0], options.y?.[1], 'rectangle y');
  const nx = requireCount(options.nx, 'rectangle nx');
  const ny = requireCount(options.ny, 'rectangle ny');
  const kind = options.cells;
  if (kind !== 'triangles' && kind !== 'quadrilaterals') {
    throw new RungsInputError(
      `rectangle cells must be 'triangles' or 'quadrilaterals', got ${JSON.stringify(kind)}`,
      'rectangle cells',
    );
  }
  if (kind === 'quadrilaterals' && options.diagonal !== undefined) {
    throw new RungsInputError(
      `rectangle diagonal ${JSON.stringify(options.diagonal)} only applies to cells: 'triangles'`,
      'rectangle diagonal',
    );
  }
  const diagonal = kind === 'triangles' ? requireDiagonal(options.diagonal ?? 'right', 'rectangle diagonal') : 'right';

  const rowLength = nx + 1;
  const nGrid = rowLength * (ny + 1);
  const nCentres = kind === 'triangles' && diagonal === 'crossed' ? nx * ny : 0;
  const nVertices = nGrid + nCentres;
  const verticesPerCell = kind === 'triangles' ? 3 : 4;
  const nCells = kind === 'triangles' ? trianglesPerSquare(diagonal) * nx * ny : nx * ny;
  requireIndexable(nVertices, 'vertices');
  requireIndexable(nCells * verticesPerCell, 'cell vertex entries');

  const xs = gridPoints(x0, x1, nx);
  const ys = gridPoints(y0, y1, ny);
  const coords = meshFloat64(2 * nVertices, nCells);
  for (let j = 0; j <= ny; j++) {
    for (let i = 0; i <= nx; i++) {
      const v = i + j * rowLength;
      coords[2 * v] = xs[i]!;
      coords[2 * v + 1] = ys[j]!;
    }
  }
  if (nCentres > 0) {
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const v = nGrid + i + j * nx;
        coords[2 * v] = 0.5 * (xs[i]! + xs[i + 1]!);
        coords[2 * v + 1] = 0.5 * (ys[j]! + ys[j + 1]!);
      }
    }
  }

  const cells = meshInt32(nCells * verticesPerCell, nCells);
  let o = 0;
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const v00 = i + j * rowLength;
      if (kind === 'quadrilaterals') {
        cells[o++] = v00;
        cells[o++] = v00 + 1;
        cells[o++] = v00 + rowLength + 1;
        cells[o++] = v00 + rowLength;
      } else {
        o = writeSquareTriangles(cells, o, v00, v00 + 1, v00 + rowLength + 1, v00 + rowLength, nGrid + i + j * nx, diagonal, i + j);
      }
    }
  }

  const corners: Array<[number, number]> = [[0, 0], [nx, 0], [nx, ny], [0, ny]];
  const [left, right, bottom, top] = [0, 1, 2, 3];
  const { facets, facetTags } = walkGridBoundary(corners, [bottom, right, top, left], (i, j) => i + j * rowLength);

  const mesh: Mesh = {
    dim: 2,
    cellKind: kind === 'triangles' ? 'triangle' : 'quadrilateral',
    nVertices,
    coords,
    nCells,
    verticesPerCell,
    cells,
    nFacets: facetTags.length,
    verticesPerFacet: 2,
    facets,
    facetTags,
    tagNames: [...RECTANGLE_TAGS],
    h: 0,
  };
  mesh.h = computeH(mesh);
  return mesh;
}
