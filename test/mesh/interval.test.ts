import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { checkMesh } from '../../src/mesh/quality.ts';

describe('intervalMesh', () => {
  const a = -0.5;
  const b = 2.5;
  const n = 12;
  const mesh = intervalMesh(a, b, n);

  it('has n cells, n + 1 vertices and the two end points as tagged facets', () => {
    expect(mesh.nCells).toBe(n);
    expect(mesh.nVertices).toBe(n + 1);
    expect(mesh.nFacets).toBe(2);
    expect(mesh.verticesPerFacet).toBe(1);
    const byTag = new Map<string, number>();
    for (let f = 0; f < mesh.nFacets; f++) byTag.set(mesh.tagNames[mesh.facetTags[f]!]!, mesh.coords[mesh.facets[f]!]!);
    expect(byTag.get('left')).toBe(a);
    expect(byTag.get('right')).toBe(b);
  });

  it('cells have positive lengths summing to b − a, and h = (b − a)/n', () => {
    // Exact integral: the length of [a, b] is b − a (common practice, no source).
    let total = 0;
    for (let c = 0; c < n; c++) {
      const length = mesh.coords[mesh.cells[2 * c + 1]!]! - mesh.coords[mesh.cells[2 * c]!]!;
      expect(length).toBeGreaterThan(0);
      expect(length).toBeCloseTo((b - a) / n, 14);
      total += length;
    }
    expect(total).toBeCloseTo(b - a, 13);
    expect(mesh.h).toBeCloseTo((b - a) / n, 14);
    expect(() => checkMesh(mesh)).not.toThrow();
  });

  it('rejects an empty interval and a non-integer cell count', () => {
    expect(() => intervalMesh(1, 1, 4)).toThrow(RungsInputError);
    expect(() => intervalMesh(0, 1, 2.5)).toThrow(/positive integer/);
    expect(() => intervalMesh(0, Number.NaN, 2)).toThrow(RungsInputError);
  });
});
