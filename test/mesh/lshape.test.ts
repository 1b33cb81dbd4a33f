import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import type { Diagonal } from '../../src/mesh/grid.ts';
import { lShapeMesh } from '../../src/mesh/lshape.ts';
import { checkMesh } from '../../src/mesh/quality.ts';
import { bruteDiameter, cellAreas, conformityProblems, point, taggedLength } from './geometry-helpers.ts';

const n = 3;
const splits: Diagonal[] = ['right', 'left', 'alternating', 'crossed'];

describe.each(splits)("lShapeMesh(n, '%s')", (diagonal) => {
  const mesh = lShapeMesh(n, diagonal);
  const crossed = diagonal === 'crossed';

  it('counts: (2n+1)² − n² grid vertices, 3n² squares, 8n boundary edges', () => {
    expect(mesh.nVertices).toBe((2 * n + 1) ** 2 - n * n + (crossed ? 3 * n * n : 0));
    expect(mesh.nCells).toBe((crossed ? 4 : 2) * 3 * n * n);
    // Perimeter of the L-shape is 8; each boundary edge has length 1/n.
    expect(mesh.nFacets).toBe(8 * n);
  });

  it('cells are counter-clockwise and their areas sum to 3', () => {
    // Exact integral: |[−1,1]² minus one unit quadrant| = 4 − 1 = 3 (common practice, no source).
    const areas = cellAreas(mesh);
    for (const area of areas) expect(area).toBeGreaterThan(0);
    expect(areas.reduce((s, v) => s + v, 0)).toBeCloseTo(3, 12);
  });

  it('no vertex lies in the removed quadrant x > 0, y < 0', () => {
    for (let v = 0; v < mesh.nVertices; v++) {
      const [px, py] = point(mesh, v);
      expect(px! > 0 && py! < 0).toBe(false);
    }
  });

  it("tags: 'outer' has length 6, 'reentrant' has length 2 and lies on the two edges at the origin", () => {
    expect(mesh.tagNames).toEqual(['outer', 'reentrant']);
    expect(taggedLength(mesh, 'outer')).toBeCloseTo(6, 12);
    expect(taggedLength(mesh, 'reentrant')).toBeCloseTo(2, 12);
    const reentrant = mesh.tagNames.indexOf('reentrant');
    for (let f = 0; f < mesh.nFacets; f++) {
      const ends = [point(mesh, mesh.facets[2 * f]!), point(mesh, mesh.facets[2 * f + 1]!)];
      const onInnerEdges = ends.every(([px, py]) => (px === 0 && py! <= 0) || (py === 0 && px! >= 0));
      expect(onInnerEdges).toBe(mesh.facetTags[f] === reentrant);
    }
  });

  it('the interior angle at the origin is 3π/2', () => {
    // The classical re-entrant corner of the L-shape (common practice, no source): sum the angles at the origin.
    const origin = [...Array(mesh.nVertices).keys()].find((v) => point(mesh, v).every((c) => c === 0))!;
    expect(origin).toBeDefined();
    let angle = 0;
    for (let c = 0; c < mesh.nCells; c++) {
      const vs = Array.from(mesh.cells.subarray(3 * c, 3 * c + 3));
      const k = vs.indexOf(origin);
      if (k < 0) continue;
      const [ax, ay] = point(mesh, vs[(k + 1) % 3]!);
      const [bx, by] = point(mesh, vs[(k + 2) % 3]!);
      angle += Math.atan2(ax! * by! - ay! * bx!, ax! * bx! + ay! * by!);
    }
    expect(angle).toBeCloseTo((3 * Math.PI) / 2, 12);
  });

  it('is conforming with facets along the boundary, h is the largest diameter, checkMesh passes', () => {
    expect(conformityProblems(mesh)).toEqual([]);
    let largest = 0;
    for (let c = 0; c < mesh.nCells; c++) largest = Math.max(largest, bruteDiameter(mesh, c));
    expect(mesh.h).toBeCloseTo(largest, 14);
    // Squares of side 1/n: diagonal √2/n for two-triangle splits, side 1/n for 'crossed' (common practice, no source).
    expect(mesh.h).toBeCloseTo(crossed ? 1 / n : Math.SQRT2 / n, 14);
    expect(() => checkMesh(mesh)).not.toThrow();
  });
});

describe("lShapeMesh with 'sides' tagging", () => {
  it('tags the straight sides by name and keeps the re-entrant edges together', () => {
    const mesh = lShapeMesh(4, 'right', 'sides');
    expect(mesh.tagNames).toEqual(['left', 'right', 'bottom', 'top', 'reentrant']);
    // Side lengths of the L-shape with the lower-right quadrant removed (common practice, no source).
    const lengths = { left: 2, right: 1, bottom: 1, top: 2, reentrant: 2 };
    for (const [name, length] of Object.entries(lengths)) expect(taggedLength(mesh, name)).toBeCloseTo(length, 12);
    expect(() => checkMesh(mesh)).not.toThrow();
  });

  it('rejects bad arguments', () => {
    expect(() => lShapeMesh(0)).toThrow(RungsInputError);
    expect(() => lShapeMesh(2, 'diagonal' as Diagonal)).toThrow(/L-shape diagonal/);
    expect(() => lShapeMesh(2, 'right', 'corners' as 'sides')).toThrow(/tagging/);
  });
});
