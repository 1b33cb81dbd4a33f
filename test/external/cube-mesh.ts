/**
 * The unit cube cut into n^3 small cubes, each split into 6 tetrahedra around its main diagonal (Kuhn 1960,
 * "Some combinatorial lemmas in topology"; Freudenthal 1942): one tetrahedron per ordering of the axes, following the
 * path from the cube's (0,0,0) corner to its (1,1,1) corner one axis step at a time. Neighbouring cubes agree on their
 * shared faces, so the mesh is conforming.
 */
import { meshFromArrays } from '../../src/mesh/from-arrays.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { tetrahedronBoundaryFacets } from '../../src/mesh/boundary-faces.ts';

const AXIS_ORDERS = [[0, 1, 2], [0, 2, 1], [1, 0, 2], [1, 2, 0], [2, 0, 1], [2, 1, 0]];

export function kuhnCubeMesh(n: number): Mesh {
  const id = (i: number, j: number, k: number) => (k * (n + 1) + j) * (n + 1) + i;
  const coords: number[] = [];
  for (let k = 0; k <= n; k++) for (let j = 0; j <= n; j++) for (let i = 0; i <= n; i++) coords.push(i / n, j / n, k / n);
  const cells: number[] = [];
  for (let k = 0; k < n; k++) {
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        for (const order of AXIS_ORDERS) {
          const p = [i, j, k];
          const tet = [id(p[0]!, p[1]!, p[2]!)];
          for (const axis of order) { p[axis]!++; tet.push(id(p[0]!, p[1]!, p[2]!)); }
          if (orientation(coords, tet) < 0) [tet[1], tet[2]] = [tet[2]!, tet[1]!];
          cells.push(...tet);
        }
      }
    }
  }
  const c = Float64Array.from(coords);
  const t = Int32Array.from(cells);
  return meshFromArrays({ cellKind: 'tetrahedron', coords: c, cells: t, facets: tetrahedronBoundaryFacets(c.length / 3, c, t) }, `kuhn cube ${n}`);
}

function orientation(x: number[], t: number[]): number {
  const v = (a: number, d: number) => x[3 * t[a]! + d]! - x[3 * t[0]! + d]!;
  return v(1, 0) * (v(2, 1) * v(3, 2) - v(2, 2) * v(3, 1)) - v(1, 1) * (v(2, 0) * v(3, 2) - v(2, 2) * v(3, 0)) + v(1, 2) * (v(2, 0) * v(3, 1) - v(2, 1) * v(3, 0));
}
