// locateFacets (src/fem/geometry/facets.ts) against its definition, checked by brute force: each boundary facet's
// cell is the first cell in cell order one of whose reference facets has exactly the facet's vertices.
import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { REFERENCE_FACETS } from '../../src/fem/element/nodes.ts';
import { locateFacets } from '../../src/fem/geometry/facets.ts';

function byDefinition(mesh: Mesh): { cell: number[]; local: number[] } {
  const cell: number[] = [], local: number[] = [];
  const vpc = mesh.verticesPerCell, vpf = mesh.verticesPerFacet;
  for (let f = 0; f < mesh.nFacets; f++) {
    const want = [...mesh.facets.subarray(f * vpf, (f + 1) * vpf)].sort((a, b) => a - b).join();
    let found = -1, lf = -1;
    for (let c = 0; c < mesh.nCells && found < 0; c++) {
      REFERENCE_FACETS[mesh.cellKind].forEach((lv, k) => {
        if (found < 0 && lv.map((l) => mesh.cells[c * vpc + l]!).sort((a, b) => a - b).join() === want) { found = c; lf = k; }
      });
    }
    cell.push(found); local.push(lf);
  }
  return { cell, local };
}

describe('locateFacets', () => {
  const meshes: [string, Mesh][] = [
    ['triangles', perturbMesh(rectangleMesh({ x: [0, 2], y: [0, 1], nx: 7, ny: 5, cells: 'triangles' }), { fraction: 0.2, seed: 4 })],
    ['quadrilaterals', rectangleMesh({ x: [0, 1], y: [0, 1], nx: 6, ny: 4, cells: 'quadrilaterals' })],
    ['tetrahedra', boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 3, ny: 2, nz: 2, cells: 'tetrahedra' })],
  ];
  for (const [name, mesh] of meshes) {
    it(`finds each boundary facet's first cell and local facet (${name})`, () => {
      const got = locateFacets(mesh);
      expect({ cell: [...got.cell], local: [...got.local] }).toEqual(byDefinition(mesh));
    });
  }
});
