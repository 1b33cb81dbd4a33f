import { describe, expect, it } from 'vitest';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { errorNorms } from '../../src/norms/errors.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import type { ExactSolution } from '../../src/norms/types.ts';
import { parseLegacyVtk } from '../../src/external/vtk/legacy.ts';
import { parseVtu } from '../../src/external/vtk/vtu.ts';
import { gridToField } from '../../src/external/vtk/to-field.ts';
import { kuhnCubeMesh } from './cube-mesh.ts';
import { legacyVtk, nodalGrid, vtuText } from './vtk-writers.ts';

const rate = (e1: number, e2: number) => Math.log(e1 / e2) / Math.log(2);
const fieldOf = (text: string, file = 'solution.vtk', degree?: number) =>
  gridToField(file.endsWith('.vtu') ? parseVtu(text, file) : parseLegacyVtk(text, file), { degree });

const tile: ExactSolution = {
  u: (x, y) => Math.sin(Math.PI * x) * Math.sinh(Math.PI * y) / Math.sinh(Math.PI) + 0.5 * x * (1 - x),
  grad: (x, y, _z, g) => {
    g[0] = Math.PI * Math.cos(Math.PI * x) * Math.sinh(Math.PI * y) / Math.sinh(Math.PI) + 0.5 - x;
    g[1] = Math.PI * Math.sin(Math.PI * x) * Math.cosh(Math.PI * y) / Math.sinh(Math.PI);
  },
};
const brick: ExactSolution = {
  u: (x, y, z) => Math.exp(x + 2 * y - z),
  grad: (x, y, z, g) => { const e = Math.exp(x + 2 * y - z); g[0] = e; g[1] = 2 * e; g[2] = -e; },
};
const square = (n: number, cells: 'triangles' | 'quadrilaterals' = 'triangles') => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells });

/** Errors of rungs's own nodal interpolant on the same mesh (dofs numbered by src/fem/dofmap). */
function ownInterpolantErrors(mesh: Mesh, degree: number, exact: ExactSolution) {
  const space = lagrangeSpace(mesh, degree);
  return errorNorms(lagrangeField(space, interpolate(space, exact.u)), exact);
}

describe('VTK line cells against exact interpolation errors on [0, 1] with n equal cells, h = 1/n', () => {
  it('VTK_LINE, u = x²: ||u − I_h u||_L2 = h²/√30, |u − I_h u|_H1 = h/√3 (exact integrals of (x−a)(b−x))', () => {
    const n = 5, h = 1 / n;
    const x2: ExactSolution = { u: (x) => x * x, grad: (x, _y, _z, g) => { g[0] = 2 * x; } };
    const v = fieldOf(legacyVtk(nodalGrid(intervalMesh(0, 1, n), 1, x2.u)));
    expect(v.mesh.cellKind).toBe('interval');
    expect(v.dofs).toBe(n + 1);
    const e = errorNorms(v.field, x2);
    expect(e.L2).toBeCloseTo(h * h / Math.sqrt(30), 14);
    expect(e.H1semi).toBeCloseTo(h / Math.sqrt(3), 14);
  });

  it('VTK_QUADRATIC_EDGE, u = x³: L2 error h³/√840, H1 seminorm h²/√20 (exact integrals of (x−a)(x−m)(x−b))', () => {
    const n = 4, h = 1 / n;
    const x3: ExactSolution = { u: (x) => x ** 3, grad: (x, _y, _z, g) => { g[0] = 3 * x * x; } };
    // Every other cell written right to left: the reader must re-orient it.
    const v = fieldOf(legacyVtk(nodalGrid(intervalMesh(0, 1, n), 2, x3.u, new Set([1, 3]))));
    expect(v.degree).toBe(2);
    expect(v.dofs).toBe(2 * n + 1);
    const e = errorNorms(v.field, x3);
    expect(e.L2).toBeCloseTo(h ** 3 / Math.sqrt(840), 14);
    expect(e.H1semi).toBeCloseTo(h * h / Math.sqrt(20), 13);
  });
});

describe('VTK triangles, quadrilaterals and tetrahedra give the errors of the same nodal field', () => {
  // The file is written in VTK's documented node order; rungs numbers its own interpolant with src/fem/dofmap. Both
  // describe one function (u at the same nodes), so the integrated errors agree to round-off (common practice, no source).
  it.each([
    { name: 'P1 triangles, legacy classic layout', mesh: () => square(6), degree: 1 as const, exact: tile, write: 'classic' },
    { name: 'P2 triangles, legacy 5.1 layout', mesh: () => square(6), degree: 2 as const, exact: tile, write: '5.1' },
    { name: 'P2 triangles, .vtu', mesh: () => square(6), degree: 2 as const, exact: tile, write: 'vtu' },
    { name: 'Q1 quadrilaterals, .vtu', mesh: () => square(5, 'quadrilaterals'), degree: 1 as const, exact: tile, write: 'vtu' },
    { name: 'Q2 quadrilaterals (VTK_BIQUADRATIC_QUAD), legacy', mesh: () => square(4, 'quadrilaterals'), degree: 2 as const, exact: tile, write: 'classic' },
    { name: 'P1 tetrahedra, legacy', mesh: () => kuhnCubeMesh(2), degree: 1 as const, exact: brick, write: 'classic' },
    { name: 'P2 tetrahedra, legacy 5.1', mesh: () => kuhnCubeMesh(2), degree: 2 as const, exact: brick, write: '5.1' },
  ])('$name', ({ mesh: make, degree, exact, write }) => {
    const mesh = make();
    const g = nodalGrid(mesh, degree, exact.u);
    const text = write === 'vtu' ? vtuText(g) : legacyVtk(g, write as 'classic' | '5.1');
    const v = fieldOf(text, write === 'vtu' ? 'solution.vtu' : 'solution.vtk', degree);
    const mine = errorNorms(v.field, exact);
    const own = ownInterpolantErrors(mesh, degree, exact);
    expect(v.mesh.nCells).toBe(mesh.nCells);
    expect(v.dofs).toBe(lagrangeSpace(mesh, degree).nDofs);
    expect(Math.abs(mine.L2 - own.L2) / own.L2).toBeLessThan(1e-12);
    expect(Math.abs(mine.H1semi - own.H1semi) / own.H1semi).toBeLessThan(1e-12);
    expect(Math.abs(mine.maxNodal)).toBeLessThan(1e-15);
  });

  it('cells written with the opposite orientation (mid nodes following their edges) give the same errors', () => {
    const mesh = kuhnCubeMesh(2);
    const flip = new Set(Array.from({ length: mesh.nCells }, (_, c) => c).filter((c) => c % 3 === 0));
    const straight = errorNorms(fieldOf(legacyVtk(nodalGrid(mesh, 2, brick.u))).field, brick);
    const flipped = errorNorms(fieldOf(legacyVtk(nodalGrid(mesh, 2, brick.u, flip))).field, brick);
    expect(Math.abs(flipped.L2 - straight.L2) / straight.L2).toBeLessThan(1e-12);
    expect(Math.abs(flipped.H1semi - straight.H1semi) / straight.H1semi).toBeLessThan(1e-12);
    const quads = square(3, 'quadrilaterals');
    const q1 = errorNorms(fieldOf(legacyVtk(nodalGrid(quads, 2, tile.u))).field, tile);
    const q2 = errorNorms(fieldOf(legacyVtk(nodalGrid(quads, 2, tile.u, new Set([1, 4, 8])))).field, tile);
    expect(Math.abs(q1.L2 - q2.L2) / q1.L2).toBeLessThan(1e-12);
    const tri = square(4);
    const flipTri = new Set([0, 3, 5, 8, 13]);
    const a = errorNorms(fieldOf(legacyVtk(nodalGrid(tri, 2, tile.u))).field, tile);
    const b = errorNorms(fieldOf(legacyVtk(nodalGrid(tri, 2, tile.u, flipTri))).field, tile);
    expect(Math.abs(a.H1semi - b.H1semi) / a.H1semi).toBeLessThan(1e-12);
  });

  // Interpolation errors converge at h^(k+1) in L2 and h^k in H1 (Ciarlet 1978, Theorem 3.1.6; number from memory): a wrong node map would
  // break the rate even where the dofs happen to match.
  it('P2 triangle files converge at rates 3 (L2) and 2 (H1 seminorm)', () => {
    const e = [8, 16].map((n) => errorNorms(fieldOf(vtuText(nodalGrid(square(n), 2, tile.u)), 'solution.vtu').field, tile));
    expect(Math.abs(rate(e[0]!.L2, e[1]!.L2) - 3)).toBeLessThan(0.1);
    expect(Math.abs(rate(e[0]!.H1semi, e[1]!.H1semi) - 2)).toBeLessThan(0.1);
  });

  it('P2 tetrahedron files converge at rates 3 (L2) and 2 (H1 seminorm)', () => {
    const e = [4, 8].map((n) => errorNorms(fieldOf(legacyVtk(nodalGrid(kuhnCubeMesh(n), 2, brick.u))).field, brick));
    expect(Math.abs(rate(e[0]!.L2, e[1]!.L2) - 3)).toBeLessThan(0.1);
    expect(Math.abs(rate(e[0]!.H1semi, e[1]!.H1semi) - 2)).toBeLessThan(0.1);
  });
});
