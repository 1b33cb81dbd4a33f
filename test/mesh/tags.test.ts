import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { lShapeMesh } from '../../src/mesh/lshape.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { facetsWithTags, tagIndex } from '../../src/mesh/tags.ts';

const mesh = rectangleMesh({ x: [0, 2], y: [0, 1], nx: 6, ny: 3, cells: 'quadrilaterals' });

describe('tagIndex', () => {
  it('finds known tags', () => {
    expect(mesh.tagNames[tagIndex(mesh, 'top')]).toBe('top');
  });
  it('names the unknown tag and lists the existing ones', () => {
    expect(() => tagIndex(mesh, 'north')).toThrow(RungsInputError);
    expect(() => tagIndex(mesh, 'north')).toThrow("unknown boundary tag 'north'; this mesh has the tags 'left', 'right', 'bottom', 'top'");
  });
});

describe('facetsWithTags', () => {
  it('selects the facets of the named sides, in ascending order', () => {
    // nx edges on bottom and top, ny on left and right.
    expect(facetsWithTags(mesh, ['bottom'])).toHaveLength(6);
    const walls = facetsWithTags(mesh, ['left', 'right']);
    expect(walls).toHaveLength(6);
    expect(Array.from(walls)).toEqual([...walls].sort((a, b) => a - b));
    for (const f of walls) expect(['left', 'right']).toContain(mesh.tagNames[mesh.facetTags[f]!]);
    expect(facetsWithTags(mesh, ['left', 'right', 'bottom', 'top'])).toHaveLength(mesh.nFacets);
    expect(facetsWithTags(mesh, [])).toHaveLength(0);
  });
  it('selects the L-shape re-entrant edges: 2n of them', () => {
    expect(facetsWithTags(lShapeMesh(5), ['reentrant'])).toHaveLength(10);
  });
  it('throws on an unknown name in the list', () => {
    expect(() => facetsWithTags(mesh, ['left', 'outer'])).toThrow(/'outer'.*'left', 'right', 'bottom', 'top'/);
  });
});
