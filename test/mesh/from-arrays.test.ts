import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { boundingBox } from '../../src/mesh/bounding-box.ts';
import { meshFromArrays } from '../../src/mesh/from-arrays.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { conformityProblems, taggedLength } from './geometry-helpers.ts';

// The unit square as two counter-clockwise triangles.
const coords = [0, 0, 1, 0, 1, 1, 0, 1];
const cells = [0, 1, 2, 0, 2, 3];

describe('meshFromArrays', () => {
  it('finds and tags the boundary when no facets are given', () => {
    const mesh = meshFromArrays({ cellKind: 'triangle', coords, cells });
    expect(mesh.nVertices).toBe(4);
    expect(mesh.nCells).toBe(2);
    expect(mesh.nFacets).toBe(4);
    expect(mesh.tagNames).toEqual(['boundary']);
    // Perimeter of the unit square (common practice, no source).
    expect(taggedLength(mesh, 'boundary')).toBeCloseTo(4, 15);
    expect(conformityProblems(mesh)).toEqual([]);
    expect(mesh.h).toBeCloseTo(Math.SQRT2, 15);
  });

  it('keeps given facets and tags', () => {
    const mesh = meshFromArrays({
      cellKind: 'triangle', coords, cells,
      facets: [0, 1, 1, 2, 2, 3, 3, 0], facetTags: [0, 1, 0, 1], tagNames: ['floor', 'sides'],
    });
    expect(taggedLength(mesh, 'sides')).toBeCloseTo(2, 15);
  });

  it('finds the end points of a 1D mesh', () => {
    const mesh = meshFromArrays({ cellKind: 'interval', coords: [0, 0.3, 1], cells: [0, 1, 1, 2], tagNames: ['ends'] });
    expect(Array.from(mesh.facets)).toEqual([0, 2]);
  });

  it('rejects clockwise cells, non-integer indices, ragged arrays and unknown kinds', () => {
    expect(() => meshFromArrays({ cellKind: 'triangle', coords, cells: [0, 2, 1, 0, 2, 3] }, 'plate.json')).toThrow(
      /plate\.json: cell 0 .*inverted/,
    );
    expect(() => meshFromArrays({ cellKind: 'triangle', coords, cells: [0, 1, 2.5, 0, 2, 3] })).toThrow(/cells\[2\] is 2.5/);
    expect(() => meshFromArrays({ cellKind: 'triangle', coords: [0, 0, 1], cells })).toThrow(/coords has 3 entries/);
    expect(() => meshFromArrays({ cellKind: 'hexagon' as 'triangle', coords, cells })).toThrow(RungsInputError);
    expect(() => meshFromArrays({ cellKind: 'triangle', coords, cells, tagNames: ['a', 'b'] })).toThrow(/one name/);
  });
});

describe('boundingBox', () => {
  it('is the rectangle for a rectangle mesh, also after perturbing (boundary fixed)', () => {
    const mesh = rectangleMesh({ x: [-2, 3], y: [1, 1.5], nx: 10, ny: 1, cells: 'triangles', diagonal: 'crossed' });
    expect(boundingBox(mesh)).toEqual({ min: [-2, 1], max: [3, 1.5] });
    expect(boundingBox(perturbMesh(mesh, { fraction: 0.3, seed: 1 }))).toEqual({ min: [-2, 1], max: [3, 1.5] });
  });
});
