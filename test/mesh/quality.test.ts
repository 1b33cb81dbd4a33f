import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { signedCellMeasure } from '../../src/mesh/measure.ts';
import { cellDiameter, checkMesh, computeH, meshSummary } from '../../src/mesh/quality.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { CellKind, Mesh } from '../../src/mesh/types.ts';

/** A hand-built mesh; facets and h left for the test to choose. */
function rawMesh(kind: CellKind, coords: number[], cells: number[], extra: Partial<Mesh> = {}): Mesh {
  const dim = kind === 'interval' ? 1 : kind === 'tetrahedron' ? 3 : 2;
  const perCell = kind === 'interval' ? 2 : kind === 'triangle' ? 3 : 4;
  const mesh: Mesh = {
    dim,
    cellKind: kind,
    nVertices: coords.length / dim,
    coords: Float64Array.from(coords),
    nCells: cells.length / perCell,
    verticesPerCell: perCell,
    cells: Int32Array.from(cells),
    nFacets: 0,
    verticesPerFacet: dim,
    facets: new Int32Array(0),
    facetTags: new Int32Array(0),
    tagNames: [],
    h: 0,
    ...extra,
  };
  if (extra.h === undefined) mesh.h = computeH(mesh);
  return mesh;
}

// Unit square as two counter-clockwise triangles, with its four boundary edges (counter-clockwise).
const squareCoords = [0, 0, 1, 0, 1, 1, 0, 1];
const squareFacets = { nFacets: 4, facets: Int32Array.of(0, 1, 1, 2, 2, 3, 3, 0), facetTags: new Int32Array(4), tagNames: ['wall'] };

describe('cellDiameter and computeH', () => {
  it('a 3-4-5 triangle has diameter 5, its hypotenuse', () => {
    // Pythagorean triple (common practice, no source).
    const mesh = rawMesh('triangle', [0, 0, 3, 0, 0, 4], [0, 1, 2]);
    expect(cellDiameter(mesh, 0)).toBe(5);
    expect(computeH(mesh)).toBe(5);
    expect(signedCellMeasure(mesh, 0)).toBe(6);
  });

  it('computeH of triangles (its own loop) is the largest cellDiameter, bit for bit, on a perturbed mesh', () => {
    const mesh = perturbMesh(rectangleMesh({ x: [0, 1.3], y: [0, 1], nx: 13, ny: 9, cells: 'triangles' }), { fraction: 0.2, seed: 4 });
    let largest = 0;
    for (let c = 0; c < mesh.nCells; c++) largest = Math.max(largest, cellDiameter(mesh, c));
    expect(Object.is(computeH(mesh), largest)).toBe(true);
    // Unperturbed: the longest edge is a diagonal of a 0.1 × 1/9 square (common practice, no source).
    expect(computeH(rectangleMesh({ x: [0, 1.3], y: [0, 1], nx: 13, ny: 9, cells: 'triangles' }))).toBeCloseTo(Math.hypot(0.1, 1 / 9), 14);
  });

  it('a flat trapezoid has its long base, not a diagonal, as diameter', () => {
    // Diagonals √37 ≈ 6.08 < base 10 (common practice, no source).
    const mesh = rawMesh('quadrilateral', [0, 0, 10, 0, 6, 1, 4, 1], [0, 1, 2, 3]);
    expect(cellDiameter(mesh, 0)).toBe(10);
    // Trapezoid area (10 + 2)/2 · 1 = 6 (common practice, no source).
    expect(signedCellMeasure(mesh, 0)).toBe(6);
  });

  it('the reference tetrahedron has diameter √2 and volume 1/6', () => {
    // Edges between unit vectors have length √2; volume of the unit simplex is 1/3! (common practice, no source).
    const mesh = rawMesh('tetrahedron', [0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1], [0, 1, 2, 3]);
    expect(cellDiameter(mesh, 0)).toBeCloseTo(Math.SQRT2, 15);
    expect(signedCellMeasure(mesh, 0)).toBeCloseTo(1 / 6, 15);
  });

  it("meshSummary of a 'crossed' 4 × 3 mesh: h = max(dx, dy), hMin = min(dx, dy)", () => {
    // dx = 1/4, dy = 1/3: the triangles on a side of length s have diameter max(s, d/2) = s with d = 5/12
    // (3-4-5 right triangle scaled by 1/12; common practice, no source).
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 4, ny: 3, cells: 'triangles', diagonal: 'crossed' });
    const summary = meshSummary(mesh);
    expect(summary.cells).toBe(48);
    expect(summary.vertices).toBe(20 + 12);
    expect(summary.h).toBeCloseTo(1 / 3, 15);
    expect(summary.hMin).toBeCloseTo(1 / 4, 15);
  });
});

describe('checkMesh', () => {
  it('accepts a valid mesh with boundary facets', () => {
    expect(() => checkMesh(rawMesh('triangle', squareCoords, [0, 1, 2, 0, 2, 3], squareFacets))).not.toThrow();
  });

  it('rejects an inverted (clockwise) triangle, naming its index', () => {
    const mesh = rawMesh('triangle', squareCoords, [0, 1, 2, 0, 3, 2]);
    expect(() => checkMesh(mesh)).toThrow(RungsInputError);
    expect(() => checkMesh(mesh)).toThrow(/cell 1 .*inverted/);
  });

  it('rejects a degenerate (zero-area) triangle, naming its index', () => {
    const mesh = rawMesh('triangle', [...squareCoords, 2, 2], [0, 1, 2, 0, 2, 4]);
    expect(() => checkMesh(mesh)).toThrow(/cell 1 .*degenerate/);
  });

  it('rejects inverted quadrilaterals: a bow-tie and a dart with a reflex corner', () => {
    const bowTie = rawMesh('quadrilateral', squareCoords, [0, 1, 3, 2]);
    expect(() => checkMesh(bowTie)).toThrow(/cell 0 .*inverted/);
    // Reflex angle at (0.5, 0.5): the bilinear map folds there (common practice, no source).
    const dart = rawMesh('quadrilateral', [0, 0, 2, 0, 0.5, 0.5, 0, 2], [0, 1, 2, 3]);
    expect(() => checkMesh(dart)).toThrow(/cell 0 .*inverted/);
  });

  it('rejects an inverted interval and an inverted tetrahedron', () => {
    expect(() => checkMesh(rawMesh('interval', [0, 1, 2], [0, 1, 2, 1]))).toThrow(/cell 1 .*inverted/);
    expect(() => checkMesh(rawMesh('tetrahedron', [0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0, 1], [0, 2, 1, 3]))).toThrow(/cell 0 .*inverted/);
  });

  it('rejects non-finite coordinates, naming the vertex', () => {
    const mesh = rawMesh('triangle', [0, 0, 1, 0, Number.NaN, 1], [0, 1, 2], { h: 1 });
    expect(() => checkMesh(mesh)).toThrow(/vertex 2 has a non-finite coordinate/);
  });

  it('rejects out-of-range vertex indices in cells and facets', () => {
    const badCell = rawMesh('triangle', squareCoords, [0, 1, 2, 0, 2, 7], { h: 1 });
    expect(() => checkMesh(badCell)).toThrow(/cell 1 refers to vertex 7, but valid vertex indices are 0..3/);
    const badFacet = rawMesh('triangle', squareCoords, [0, 1, 2, 0, 2, 3], { ...squareFacets, facets: Int32Array.of(0, 1, 1, 2, 2, 3, 3, -1) });
    expect(() => checkMesh(badFacet)).toThrow(/boundary facet 3 refers to vertex -1/);
  });

  it('rejects facets that run clockwise, are interior, are not edges, repeat, or have an unknown tag', () => {
    const cells = [0, 1, 2, 0, 2, 3];
    const withFacets = (facets: number[], tags?: number[]) =>
      rawMesh('triangle', squareCoords, cells, {
        nFacets: facets.length / 2,
        facets: Int32Array.from(facets),
        facetTags: Int32Array.from(tags ?? facets.filter((_, k) => k % 2 === 0).map(() => 0)),
        tagNames: ['wall'],
      });
    expect(() => checkMesh(withFacets([0, 1, 2, 1]))).toThrow(/facet 1: edge \(2, 1\) runs clockwise/);
    expect(() => checkMesh(withFacets([0, 2]))).toThrow(/facet 0: edge \(0, 2\) is shared by 2 cells/);
    expect(() => checkMesh(withFacets([0, 1, 1, 3]))).toThrow(/facet 1: edge \(1, 3\) is not an edge of any cell/);
    expect(() => checkMesh(withFacets([0, 1, 0, 1]))).toThrow(/facet 1: it repeats facet 0/);
    expect(() => checkMesh(withFacets([0, 1], [2]))).toThrow(/facet 0 has tag index 2, but valid tag indices are 0..0 \(wall\)/);
  });

  it('rejects a 1D facet that is not an end point', () => {
    const mesh = rawMesh('interval', [0, 1, 2], [0, 1, 1, 2], {
      nFacets: 2, verticesPerFacet: 1, facets: Int32Array.of(0, 1), facetTags: new Int32Array(2), tagNames: ['end'],
    });
    expect(() => checkMesh(mesh)).toThrow(/facet 1: vertex 1 belongs to 2 cells/);
  });

  it('rejects a wrong h and inconsistent sizes', () => {
    expect(() => checkMesh(rawMesh('triangle', squareCoords, [0, 1, 2, 0, 2, 3], { h: 1 }))).toThrow(/h is 1, but the largest cell diameter is 1.414/);
    const short = rawMesh('triangle', squareCoords, [0, 1, 2, 0, 2, 3], { nCells: 3 });
    expect(() => checkMesh(short)).toThrow(/cells has length 6, expected 9/);
    const wrongDim = rawMesh('triangle', squareCoords, [0, 1, 2, 0, 2, 3], { dim: 3 });
    expect(() => checkMesh(wrongDim)).toThrow(/dim must be 2 for triangle cells/);
    const twice = rawMesh('triangle', squareCoords, [0, 1, 2, 0, 2, 3], { tagNames: ['a', 'a'] });
    expect(() => checkMesh(twice)).toThrow(/tag name 'a' appears twice/);
  });

  it('names the source given as `where` and records the field', () => {
    const mesh = rawMesh('triangle', squareCoords, [0, 1, 2, 0, 3, 2]);
    try {
      checkMesh(mesh, 'tile.msh');
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(RungsInputError);
      expect((error as RungsInputError).message).toMatch(/^tile\.msh: cell 1 with vertices \[0, 3, 2\]/);
      expect((error as RungsInputError).where).toBe('tile.msh.cells[1]');
    }
  });
});
