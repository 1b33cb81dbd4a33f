/**
 * Invented demo results with maps of where the error lives (heat in ceramic tiles, a kiln rod and a kiln brick). The
 * per-cell values are made-up closed forms meant to look like real runs; nothing in here is a reference value.
 */
import { boxMesh, intervalMesh, lShapeMesh, rectangleMesh, type Mesh } from '../../src/mesh/index.ts';
import { encodeErrorMap, rasterizeCells } from '../../src/mesh/raster.ts';
import type { ErrorMapEntry, StudyResult } from '../../src/study/result.ts';
import { buildStudy, lTileCorner, tileP1Flawed } from './fixture.ts';

/** Per-cell values f(centroid). */
function perCell(mesh: Mesh, f: (x: number, y: number, z: number) => number): Float64Array {
  const out = new Float64Array(mesh.nCells);
  const { dim, coords, cells, verticesPerCell: nv } = mesh;
  for (let c = 0; c < mesh.nCells; c++) {
    const p = [0, 0, 0];
    for (let k = 0; k < nv; k++) for (let d = 0; d < dim; d++) p[d] += coords[dim * cells[c * nv + k] + d] / nv;
    out[c] = f(p[0], p[1], p[2]);
  }
  return out;
}

function entry(mesh: Mesh, level: number, norm: string, what: ErrorMapEntry['what'], f: (x: number, y: number, z: number) => number): ErrorMapEntry {
  return { level, norm, what, map: encodeErrorMap(rasterizeCells(mesh, perCell(mesh, f))) };
}

/** The L-shaped tile: densities that grow toward the re-entrant corner, local orders that drop near it. */
export function lTileCornerWithMaps(): StudyResult {
  const r = lTileCorner();
  const fine = lShapeMesh(64);
  const coarse = lShapeMesh(32);
  const rr = (x: number, y: number) => Math.hypot(x, y) + 1e-3;
  r.errorMaps = [
    entry(fine, 4, 'L2', 'density', (x, y) => 2e-4 * rr(x, y) ** (-1 / 3)),
    entry(fine, 4, 'H1semi', 'density', (x, y) => 3e-2 * rr(x, y) ** (-2 / 3)),
    entry(coarse, 3, 'L2', 'local-order', (x, y) => 2 - (2 / 3) * Math.exp(-rr(x, y) / 0.15)),
  ];
  return r;
}

/** The flawed tile: the error sits in a strip along the top edge, where the local order is 1. */
export function tileFlawedWithMaps(): StudyResult {
  const r = tileP1Flawed();
  const fine = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 64, ny: 64, cells: 'triangles' });
  const coarse = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 32, ny: 32, cells: 'triangles' });
  r.errorMaps = [
    entry(fine, 4, 'L2', 'density', (x, y) => 1e-5 + 4e-3 * Math.exp(-(1 - y) / 0.05) * (0.5 + x)),
    entry(coarse, 3, 'L2', 'local-order', (_x, y) => (y > 0.9 ? 1.02 : 1.97 + 0.03 * Math.sin(40 * y))),
  ];
  return r;
}

/** A kiln rod in 1D: the error profile and the local orders along it. */
export function kilnRodWithMaps(): StudyResult {
  const r = buildStudy({
    study: 'kiln-rod-p1',
    file: 'studies/kiln-rod-p1.study.ts',
    description: 'Heat along a kiln rod, linear elements',
    dim: 1,
    n: [8, 16, 32, 64],
    dofs: (n) => n + 1,
    cells: (n) => n,
    series: [
      { name: 'L2', expected: 2, constant: 0.05, order: 2, wobble: [0.02, 0.01, 0.004, 0.001], verdict: 'on-order', reasons: ['fitted order {fit} within 0.1 of the expected 2'] },
      { name: 'H1semi', expected: 1, constant: 0.4, order: 1, wobble: [0.01, 0.005, 0.002, 0.001], verdict: 'on-order', reasons: ['fitted order {fit} within 0.1 of the expected 1'] },
    ],
    expectation: { verdict: 'pass' },
    asExpected: true,
  });
  const fine = intervalMesh(0, 1, 64);
  const coarse = intervalMesh(0, 1, 32);
  r.errorMaps = [
    entry(fine, 3, 'L2', 'density', (x) => 1e-5 * (1 + 30 * Math.sin(Math.PI * x) ** 2)),
    entry(fine, 3, 'H1semi', 'density', (x) => 3e-3 * (1 + 5 * Math.cos(Math.PI * x) ** 2)),
    entry(coarse, 2, 'L2', 'local-order', (x) => 2 + 0.04 * Math.cos(9 * x)),
  ];
  return r;
}

/** A kiln brick in 3D: the density on the mid-plane slice. */
export function kilnBrickWithMaps(): StudyResult {
  const r = buildStudy({
    study: 'kiln-brick-q1',
    file: 'studies/kiln-brick-q1.study.ts',
    description: 'Heat in a kiln brick, trilinear hexahedra',
    dim: 3,
    n: [2, 4, 8],
    dofs: (n) => (n + 1) ** 3,
    cells: (n) => n ** 3,
    series: [
      { name: 'L2', expected: 2, constant: 0.08, order: 2, wobble: [0.02, 0.01, 0.004], verdict: 'on-order', reasons: ['fitted order {fit} within 0.1 of the expected 2'] },
    ],
    expectation: { verdict: 'pass' },
    asExpected: true,
  });
  const fine = boxMesh({ x: [0, 2], y: [0, 1], z: [0, 1], nx: 16, ny: 8, nz: 8, cells: 'hexahedra' });
  r.errorMaps = [entry(fine, 2, 'L2', 'density', (x, y, z) => 1e-4 * (1 + 10 * x * y * z))];
  return r;
}

/** The studies with maps, in report order. */
export function mapResults(): StudyResult[] {
  return [tileFlawedWithMaps(), lTileCornerWithMaps(), kilnRodWithMaps(), kilnBrickWithMaps()];
}
