import { describe, expect, it } from 'vitest';
import { boxMesh } from '../../src/mesh/box.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { signedCellMeasure } from '../../src/mesh/measure.ts';
import { lagrangeElement } from '../../src/fem/element/index.ts';
import { locateFacets } from '../../src/fem/geometry/facets.ts';
import { makeFacetGeometry, reinitFacetGeometry } from '../../src/fem/geometry/facet-geometry.ts';

describe.each(['tetrahedra', 'hexahedra'] as const)('facet geometry on a box of %s', (cells) => {
  const mesh = boxMesh({ x: [0, 2], y: [0, 1.5], z: [0, 0.75], nx: 4, ny: 3, nz: 2, cells });
  const el = lagrangeElement(mesh.cellKind, 2);

  it('finds each boundary facet\'s cell, with the outward axis normal and areas per side summing to the side (by hand)', () => {
    const { cell, local } = locateFacets(mesh);
    const fg = makeFacetGeometry(el, 2);
    const normals = [[-1, 0, 0], [1, 0, 0], [0, -1, 0], [0, 1, 0], [0, 0, -1], [0, 0, 1]];
    const sideArea = [1.125, 1.125, 1.5, 1.5, 3, 3];
    const area = new Array(6).fill(0);
    let worst = 0;
    for (let f = 0; f < mesh.nFacets; f++) {
      const t = mesh.facetTags[f]!;
      reinitFacetGeometry(fg, mesh, cell[f]!, local[f]!);
      for (let q = 0; q < fg.nq; q++) {
        area[t] += fg.wds[q]!;
        for (let d = 0; d < 3; d++) worst = Math.max(worst, Math.abs(fg.normals[3 * q + d]! - normals[t]![d]!));
      }
    }
    expect(worst).toBeLessThan(1e-14);
    for (let t = 0; t < 6; t++) expect(area[t]).toBeCloseTo(sideArea[t]!, 13);
  });

  it('satisfies the divergence theorem on every cell of a perturbed mesh: ∮ n dS = 0 and ∮ x·n dS = 3|K|', () => {
    // div x = 3 (by hand). On a trilinear hexahedron x·n dS is a polynomial of degree ≤ 2 in each face variable
    // (each tangent is linear in the other variable), and on a tetrahedron n is constant and x linear, so a degree-3
    // facet rule integrates both exactly (Abramowitz & Stegun 1964, 25.4.29; Dunavant 1985).
    const moved = perturbMesh(mesh, { fraction: 0.25, seed: 9 });
    const fg = makeFacetGeometry(el, 3);
    const nFaces = cells === 'tetrahedra' ? 4 : 6;
    let worst = 0;
    for (let c = 0; c < moved.nCells; c++) {
      const closed = [0, 0, 0];
      let flux = 0;
      for (let lf = 0; lf < nFaces; lf++) {
        reinitFacetGeometry(fg, moved, c, lf);
        for (let q = 0; q < fg.nq; q++) {
          for (let d = 0; d < 3; d++) {
            closed[d] += fg.wds[q]! * fg.normals[3 * q + d]!;
            flux += fg.wds[q]! * fg.x[3 * q + d]! * fg.normals[3 * q + d]!;
          }
        }
      }
      worst = Math.max(worst, ...closed.map(Math.abs), Math.abs(flux - 3 * signedCellMeasure(moved, c)));
    }
    expect(worst).toBeLessThan(1e-14);
  });
});
