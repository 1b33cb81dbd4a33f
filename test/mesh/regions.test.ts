import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boundaryStrips, regionErrors, type BoundaryStrips } from '../../src/mesh/regions.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { polygonArea, cellPoints } from './geometry-helpers.ts';

// Every count and measure below is worked out by hand from the layout of the generated meshes (cells square by
// square, row by row from the bottom; see src/mesh/rectangle.ts and box.ts) and the definition of a strip (cells
// with a vertex on a facet of that tag): closed forms, common practice, no source.

const TAG = { left: 0, right: 1, bottom: 2, top: 3 } as const;
const count = (s: BoundaryStrips, t: number) => s.strips[t]!.cells.length;
const meet = (s: BoundaryStrips, a: number, b: number) => s.meets.find((m) => m.tags[0] === a && m.tags[1] === b);
const relClose = (actual: number, expected: number) => expect(Math.abs(actual - expected)).toBeLessThanOrEqual(1e-13 * Math.abs(expected));

describe('boundaryStrips on the unit square, n × n squares', () => {
  const n = 5;

  it.each(['right', 'left', 'alternating'] as const)("two triangles per square ('%s'): each strip is the row of squares along its side", (diagonal) => {
    const s = boundaryStrips(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles', diagonal }));
    for (let t = 0; t < 4; t++) {
      expect(count(s, t)).toBe(2 * n); // both triangles of each of the n squares along the side touch it
      relClose(s.strips[t]!.measure, 1 / n);
      expect(s.own[t]!.cells.length).toBe(2 * n - 4); // less the two corner squares
      relClose(s.own[t]!.measure, (n - 2) / (n * n));
    }
    // The top row is squares n(n − 1) .. n² − 1, two triangles each.
    expect(Array.from(s.strips[TAG.top]!.cells)).toEqual(Array.from({ length: 2 * n }, (_, k) => 2 * n * (n - 1) + k));
    expect(s.meets.map((m) => m.tags)).toEqual([[0, 2], [0, 3], [1, 2], [1, 3]]); // the four corners
    for (const m of s.meets) { expect(m.cells.length).toBe(2); relClose(m.measure, 1 / (n * n)); }
    expect(s.interior.cells.length).toBe(2 * (n - 2) ** 2);
    relClose(s.interior.measure, (n - 2) ** 2 / (n * n));
  });

  it("four triangles per square ('crossed'): the triangle facing inward is left out", () => {
    const s = boundaryStrips(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles', diagonal: 'crossed' }));
    for (let t = 0; t < 4; t++) {
      expect(count(s, t)).toBe(3 * n);
      relClose(s.strips[t]!.measure, 3 / (4 * n));
      expect(s.own[t]!.cells.length).toBe(3 * n - 4); // the two triangles at each corner that touch both sides
    }
    const corner = meet(s, TAG.left, TAG.top)!;
    expect(corner.cells.length).toBe(2);
    relClose(corner.measure, 1 / (2 * n * n));
    // Boundary squares off the corners keep one interior triangle: 4(n − 2)² + 4(n − 2) = 4(n − 1)(n − 2).
    expect(s.interior.cells.length).toBe(4 * (n - 1) * (n - 2));
    relClose(s.interior.measure, ((n - 1) * (n - 2)) / (n * n));
  });

  it('quadrilaterals: one row of squares per side, one square per corner', () => {
    const s = boundaryStrips(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'quadrilaterals' }));
    expect(Array.from(s.strips[TAG.top]!.cells)).toEqual([20, 21, 22, 23, 24]);
    expect(Array.from(s.strips[TAG.left]!.cells)).toEqual([0, 5, 10, 15, 20]);
    expect(Array.from(s.own[TAG.left]!.cells)).toEqual([5, 10, 15]);
    expect(Array.from(meet(s, TAG.left, TAG.top)!.cells)).toEqual([20]);
    expect(meet(s, TAG.left, TAG.right)).toBeUndefined();
    expect(s.interior.cells.length).toBe((n - 2) ** 2);
    relClose(s.strips[TAG.top]!.measure, 1 / n);
    relClose(s.interior.measure, (n - 2) ** 2 / (n * n));
  });

  it('a wider rectangle with unequal cell sides: measures follow the cell sizes', () => {
    // [0, 2] × [0, 1] in 4 × 3 cells of 0.5 × 1/3.
    const s = boundaryStrips(rectangleMesh({ x: [0, 2], y: [0, 1], nx: 4, ny: 3, cells: 'quadrilaterals' }));
    expect(count(s, TAG.top)).toBe(4);
    relClose(s.strips[TAG.top]!.measure, 2 / 3);
    expect(count(s, TAG.left)).toBe(3);
    relClose(s.strips[TAG.left]!.measure, 0.5);
    expect(s.interior.cells.length).toBe(2);
    relClose(s.interior.measure, 2 * 0.5 / 3);
  });

  it('layers: 2 widens each strip to two rows of squares', () => {
    const s = boundaryStrips(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 6, ny: 6, cells: 'quadrilaterals' }), { layers: 2 });
    expect(count(s, TAG.top)).toBe(12);
    relClose(s.strips[TAG.top]!.measure, 2 / 6);
    expect(s.interior.cells.length).toBe(4);
    expect(() => boundaryStrips(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 2, cells: 'quadrilaterals' }), { layers: 0 }))
      .toThrow(RungsInputError);
  });

  it('the regions cover the mesh: own strips, interior and meets account for every cell once', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 7, ny: 4, cells: 'triangles', diagonal: 'alternating' });
    const s = boundaryStrips(mesh);
    // Areas by the shoelace formula (common practice, no source); 7 × 4 cells have no cell on three sides.
    let total = 0;
    for (let c = 0; c < mesh.nCells; c++) total += polygonArea(cellPoints(mesh, c));
    const parts = s.own.reduce((a, o) => a + o.measure, 0) + s.interior.measure + s.meets.reduce((a, m) => a + m.measure, 0);
    relClose(parts, total);
    relClose(total, 1);
  });
});

describe('boundaryStrips on an interval and a box', () => {
  it('interval [−1, 2] in n cells: one end cell per strip', () => {
    const n = 6;
    const s = boundaryStrips(intervalMesh(-1, 2, n));
    expect(s.tagNames).toEqual(['left', 'right']);
    expect(Array.from(s.strips[0]!.cells)).toEqual([0]);
    expect(Array.from(s.strips[1]!.cells)).toEqual([n - 1]);
    relClose(s.strips[0]!.measure, 3 / n);
    expect(s.meets).toEqual([]);
    expect(s.interior.cells.length).toBe(n - 2);
    relClose(s.interior.measure, (3 * (n - 2)) / n);
  });

  it('unit cube of hexahedra: a face strip is one layer of n² boxes, twelve edges meet', () => {
    const n = 4;
    const s = boundaryStrips(boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: n, ny: n, nz: n, cells: 'hexahedra' }));
    for (let t = 0; t < 6; t++) {
      expect(count(s, t)).toBe(n * n);
      relClose(s.strips[t]!.measure, 1 / n);
      expect(s.own[t]!.cells.length).toBe((n - 2) ** 2);
    }
    expect(s.meets.length).toBe(12); // every pair of faces but the three opposite pairs
    for (const m of s.meets) expect(m.cells.length).toBe(n);
    expect(s.interior.cells.length).toBe((n - 2) ** 3);
    relClose(s.interior.measure, ((n - 2) / n) ** 3);
  });

  it('unit cube of Kuhn tetrahedra: all six tetrahedra of a boundary box touch its face', () => {
    // Every Kuhn tetrahedron holds the lowest and the highest corner of its box (Kuhn 1960), so each touches every
    // face of the cube that its box touches.
    const n = 3;
    const s = boundaryStrips(boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: n, ny: n, nz: n, cells: 'tetrahedra' }));
    for (let t = 0; t < 6; t++) {
      expect(count(s, t)).toBe(6 * n * n);
      relClose(s.strips[t]!.measure, 1 / n);
      expect(s.own[t]!.cells.length).toBe(6 * (n - 2) ** 2);
    }
    for (const m of s.meets) expect(m.cells.length).toBe(6 * n);
    expect(s.interior.cells.length).toBe(6 * (n - 2) ** 3);
    relClose(s.interior.measure, ((n - 2) / n) ** 3);
  });
});

describe('regionErrors', () => {
  const n = 4;
  const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'quadrilaterals' });
  const s = boundaryStrips(mesh);
  const area = 1 / (n * n);
  // Densities: e² = 9 on the top row of squares, 1 elsewhere; |∇e|² = 16 everywhere. Per cell ∫_K = density × |K|.
  const topRow = (c: number) => c >= n * (n - 1);
  const l2 = Float64Array.from({ length: mesh.nCells }, (_, c) => (topRow(c) ? 9 : 1) * area);
  const h1 = new Float64Array(mesh.nCells).fill(16 * area);

  it('sums densities over each region: L2 = sqrt(Σ), RMS = sqrt(Σ / measure)', () => {
    const r = regionErrors(mesh, s, l2, h1);
    const top = r.strips[TAG.top]!;
    relClose(top.L2, Math.sqrt(9 * n * area));
    relClose(top.rmsL2!, 3);
    relClose(top.rmsH1semi!, 4);
    // The whole left strip holds one top-row square of n: mean density (9 + (n − 1)) / n.
    relClose(r.strips[TAG.left]!.rmsL2!, Math.sqrt((9 + n - 1) / n));
    relClose(r.own[TAG.left]!.rmsL2!, 1);
    const corner = r.meets.find((m) => m.tags[0] === 'left' && m.tags[1] === 'top')!;
    relClose(corner.rmsL2!, 3);
    expect(r.interior.cells).toBe((n - 2) ** 2);
    relClose(r.interior.L2, Math.sqrt((n - 2) ** 2 * area));
    relClose(r.interior.H1semi!, Math.sqrt(16 * (n - 2) ** 2 * area));
  });

  it('an empty region has no RMS, and missing gradient densities give null H1 values', () => {
    const tagged: Mesh = { ...mesh, tagNames: [...mesh.tagNames, 'unused'] };
    const r = regionErrors(tagged, boundaryStrips(tagged), l2, null);
    expect(r.strips[4]).toEqual({ cells: 0, measure: 0, L2: 0, H1semi: null, rmsL2: null, rmsH1semi: null });
    expect(r.strips[TAG.top]!.H1semi).toBeNull();
  });

  it('refuses per-cell arrays of the wrong length', () => {
    expect(() => regionErrors(mesh, s, new Float64Array(3), null)).toThrow(RungsInputError);
    expect(() => regionErrors(mesh, s, l2, new Float64Array(mesh.nCells + 1))).toThrow(/perCellH1sq/);
  });
});

describe('boundaryStrips, one layer, against the definition', () => {
  it('on tetrahedra: each strip is every cell with a vertex on a facet of its tag, ascending; own, interior likewise', () => {
    const mesh = boxMesh({ x: [0, 1], y: [0, 2], z: [0, 1], nx: 6, ny: 5, nz: 4, cells: 'tetrahedra' });
    const s = boundaryStrips(mesh);
    const n = mesh.verticesPerCell, m = mesh.verticesPerFacet;
    const expected = mesh.tagNames.map((_, t) => {
      const onTag = new Set<number>();
      for (let f = 0; f < mesh.nFacets; f++) if (mesh.facetTags[f] === t) for (let k = 0; k < m; k++) onTag.add(mesh.facets[f * m + k]!);
      const cells: number[] = [];
      for (let c = 0; c < mesh.nCells; c++) {
        let touches = false;
        for (let k = 0; k < n; k++) if (onTag.has(mesh.cells[c * n + k]!)) touches = true;
        if (touches) cells.push(c);
      }
      return cells;
    });
    const strips = (c: number) => expected.filter((cells) => cells.includes(c)).length;
    expect(s.strips.map((x) => Array.from(x.cells))).toEqual(expected);
    expect(s.own.map((x) => Array.from(x.cells))).toEqual(expected.map((cells) => cells.filter((c) => strips(c) === 1)));
    expect(Array.from(s.interior.cells)).toEqual(Array.from({ length: mesh.nCells }, (_, c) => c).filter((c) => strips(c) === 0));
  });
});
