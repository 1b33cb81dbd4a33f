import { RungsInputError } from '../errors.ts';
import { computeH } from './diameter.ts';
import { gridPoints } from './grid.ts';
import { requireCount, requireIndexable, requireRange } from './input-checks.ts';
import type { Mesh } from './types.ts';
import { meshFloat64, meshInt32 } from './shared-arrays.ts';

export interface BoxOptions {
  x: readonly [number, number];
  y: readonly [number, number];
  z: readonly [number, number];
  nx: number;
  ny: number;
  nz: number;
  cells: 'tetrahedra' | 'hexahedra';
}

/** Tag names of box meshes, in tag-index order: left x = x0, right x = x1, bottom y = y0, top y = y1 (as for
 *  rectangles), front z = z0, back z = z1. */
export const BOX_TAGS = ['left', 'right', 'bottom', 'top', 'front', 'back'] as const;

/** The six orderings of the axes, one Kuhn tetrahedron each. */
const AXIS_ORDERS = [[0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]] as const;

/**
 * Structured mesh of [x0,x1]×[y0,y1]×[z0,z1] with nx×ny×nz equal boxes, each kept as a hexahedron or cut into six
 * tetrahedra.
 *
 * Grid vertex (i, j, k) is number i + j (nx + 1) + k (nx + 1)(ny + 1). Cells go box by box in the same order (i
 * fastest). A hexahedron lists its box's corners in the reference order of src/mesh/types.ts: bottom (z-lower) face
 * counter-clockwise seen from above from the (i, j, k) corner, then the top face in the same order.
 *
 * Tetrahedra: Kuhn's subdivision (Kuhn 1960, "Some combinatorial lemmas in topology"; Freudenthal 1942): one
 * tetrahedron per ordering of the three axes, following the path from the box's lowest corner to its highest one
 * axis step at a time, so all six share the main diagonal. Every box is cut the same way, so each square face is
 * cut along its own lowest-to-highest diagonal from both sides and neighbouring boxes agree (the mesh is
 * conforming). For the three odd orderings the middle two vertices are swapped so that every tetrahedron is
 * positively oriented.
 *
 * Boundary facets go side by side in tag order (left, right, bottom, top, front, back), each side's squares with
 * the first in-plane axis fastest; every facet is turned so that its normal ((b − a) × (c − a) for a triangle,
 * (c − a) × (d − b) for a quadrilateral) points out of the box.
 */
export function boxMesh(options: BoxOptions): Mesh {
  const [x0, x1] = requireRange(options.x?.[0], options.x?.[1], 'box x');
  const [y0, y1] = requireRange(options.y?.[0], options.y?.[1], 'box y');
  const [z0, z1] = requireRange(options.z?.[0], options.z?.[1], 'box z');
  const nx = requireCount(options.nx, 'box nx');
  const ny = requireCount(options.ny, 'box ny');
  const nz = requireCount(options.nz, 'box nz');
  const kind = options.cells;
  if (kind !== 'tetrahedra' && kind !== 'hexahedra') {
    throw new RungsInputError(`box cells must be 'tetrahedra' or 'hexahedra', got ${JSON.stringify(kind)}`, 'box cells');
  }
  const tets = kind === 'tetrahedra';
  const sx = 1, sy = nx + 1, sz = (nx + 1) * (ny + 1);
  const nVertices = sz * (nz + 1);
  const verticesPerCell = tets ? 4 : 8;
  const nCells = (tets ? 6 : 1) * nx * ny * nz;
  const verticesPerFacet = tets ? 3 : 4;
  const nSquares = 2 * (ny * nz + nz * nx + nx * ny);
  const nFacets = (tets ? 2 : 1) * nSquares;
  requireIndexable(nVertices, 'vertices');
  requireIndexable(nCells * verticesPerCell, 'cell vertex entries');
  requireIndexable(3 * nVertices, 'coordinates');

  const xs = gridPoints(x0, x1, nx), ys = gridPoints(y0, y1, ny), zs = gridPoints(z0, z1, nz);
  const coords = meshFloat64(3 * nVertices, nCells);
  for (let k = 0; k <= nz; k++) {
    for (let j = 0; j <= ny; j++) {
      for (let i = 0; i <= nx; i++) {
        const v = i * sx + j * sy + k * sz;
        coords[3 * v] = xs[i]!;
        coords[3 * v + 1] = ys[j]!;
        coords[3 * v + 2] = zs[k]!;
      }
    }
  }

  const step = [sx, sy, sz];
  const cells = meshInt32(nCells * verticesPerCell, nCells);
  let o = 0;
  for (let k = 0; k < nz; k++) {
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const v = i * sx + j * sy + k * sz;
        if (!tets) {
          cells[o++] = v; cells[o++] = v + sx; cells[o++] = v + sx + sy; cells[o++] = v + sy;
          cells[o++] = v + sz; cells[o++] = v + sx + sz; cells[o++] = v + sx + sy + sz; cells[o++] = v + sy + sz;
          continue;
        }
        for (let p = 0; p < 6; p++) {
          const [a, b] = AXIS_ORDERS[p]!;
          const first = v + step[a]!, second = first + step[b]!;
          // Orderings 1, 2 and 5 of AXIS_ORDERS are odd permutations: det[e_a, e_b, e_c] = −1.
          const odd = p === 1 || p === 2 || p === 5;
          cells[o++] = v;
          cells[o++] = odd ? second : first;
          cells[o++] = odd ? first : second;
          cells[o++] = v + sx + sy + sz;
        }
      }
    }
  }

  const facets = new Int32Array(nFacets * verticesPerFacet);
  const facetTags = new Int32Array(nFacets);
  const counts = [nx, ny, nz];
  let fo = 0, f = 0;
  // Side (axis, high): in-plane axes (u, w) with e_u × e_w = +e_axis, so (c00, c10, c11) and (c00, c11, c01) and the
  // quadrilateral (c00, c10, c11, c01) have normal +e_axis; on the low side they are reversed.
  for (let axis = 0; axis < 3; axis++) {
    const u = (axis + 1) % 3, w = (axis + 2) % 3;
    for (let high = 0; high < 2; high++) {
      const tag = 2 * axis + high;
      const plane = high ? counts[axis]! * step[axis]! : 0;
      for (let b = 0; b < counts[w]!; b++) {
        for (let a = 0; a < counts[u]!; a++) {
          const c00 = plane + a * step[u]! + b * step[w]!;
          const c10 = c00 + step[u]!, c01 = c00 + step[w]!, c11 = c10 + step[w]!;
          if (tets) {
            // The square is cut along its lowest-to-highest diagonal c00–c11, as the Kuhn tetrahedra cut it.
            if (high) {
              facets[fo++] = c00; facets[fo++] = c10; facets[fo++] = c11;
              facets[fo++] = c00; facets[fo++] = c11; facets[fo++] = c01;
            } else {
              facets[fo++] = c00; facets[fo++] = c11; facets[fo++] = c10;
              facets[fo++] = c00; facets[fo++] = c01; facets[fo++] = c11;
            }
            facetTags[f++] = tag;
            facetTags[f++] = tag;
          } else {
            facets[fo++] = c00;
            if (high) { facets[fo++] = c10; facets[fo++] = c11; facets[fo++] = c01; }
            else { facets[fo++] = c01; facets[fo++] = c11; facets[fo++] = c10; }
            facetTags[f++] = tag;
          }
        }
      }
    }
  }

  const mesh: Mesh = {
    dim: 3,
    cellKind: tets ? 'tetrahedron' : 'hexahedron',
    nVertices,
    coords,
    nCells,
    verticesPerCell,
    cells,
    nFacets,
    verticesPerFacet,
    facets,
    facetTags,
    tagNames: [...BOX_TAGS],
    h: 0,
  };
  mesh.h = computeH(mesh);
  return mesh;
}
