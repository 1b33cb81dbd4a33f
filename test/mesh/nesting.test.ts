import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { DIAGONALS } from '../../src/mesh/grid.ts';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { parentCells } from '../../src/mesh/nesting.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';

// Expected parents are worked out by hand from the generators' numbering (cells square by square, i fastest, a
// fixed number of cells per square or box): halving a grid puts fine square (I, J) in coarse square
// (⌊I/2⌋, ⌊J/2⌋); uniform refinement by r splits a cell into r^dim children (common practice, no source).

/** In a plain loop, the first fine cell whose parent's square is not the one that holds its own square. */
function firstMisplaced(parent: Int32Array, perSquareFine: number, perSquareCoarse: number, squareOf: (fineSquare: number) => number): number {
  for (let c = 0; c < parent.length; c++) {
    if (Math.floor(parent[c]! / perSquareCoarse) !== squareOf(Math.floor(c / perSquareFine))) return c;
  }
  return -1;
}

describe('parentCells on nested ladders', () => {
  const square = { x: [0, 1], y: [0, 1] } as const;

  it.each(DIAGONALS)("triangles ('%s'), 3 × 3 to 6 × 6: four children per coarse triangle, in its own square", (diagonal) => {
    const coarse = rectangleMesh({ ...square, nx: 3, ny: 3, cells: 'triangles', diagonal });
    const fine = rectangleMesh({ ...square, nx: 6, ny: 6, cells: 'triangles', diagonal });
    const p = parentCells(coarse, fine);
    expect(p.reason).toBeNull();
    expect(p.nested).toBe(true);
    expect(Array.from(p.childCount)).toEqual(new Array(coarse.nCells).fill(4));
    const per = diagonal === 'crossed' ? 4 : 2;
    expect(firstMisplaced(p.parent, per, per, (s) => Math.floor((s % 6) / 2) + 3 * Math.floor(Math.floor(s / 6) / 2))).toBe(-1);
  });

  it('quadrilaterals on [0, 2] × [−1, 1], 3 × 2 to 6 × 4 and 2 × 2 to 6 × 6', () => {
    const p = parentCells(
      rectangleMesh({ x: [0, 2], y: [-1, 1], nx: 3, ny: 2, cells: 'quadrilaterals' }),
      rectangleMesh({ x: [0, 2], y: [-1, 1], nx: 6, ny: 4, cells: 'quadrilaterals' }),
    );
    expect(p.nested).toBe(true);
    expect(Array.from(p.parent)).toEqual(Array.from({ length: 24 }, (_, c) => Math.floor((c % 6) / 2) + 3 * Math.floor(Math.floor(c / 6) / 2)));
    const thirds = parentCells(
      rectangleMesh({ ...square, nx: 2, ny: 2, cells: 'quadrilaterals' }),
      rectangleMesh({ ...square, nx: 6, ny: 6, cells: 'quadrilaterals' }),
    );
    expect(thirds.nested).toBe(true);
    expect(Array.from(thirds.childCount)).toEqual([9, 9, 9, 9]);
  });

  it('interval: two children per cell (5 to 10), three (4 to 12)', () => {
    const p = parentCells(intervalMesh(-1, 3, 5), intervalMesh(-1, 3, 10));
    expect(p.nested).toBe(true);
    expect(Array.from(p.parent)).toEqual(Array.from({ length: 10 }, (_, c) => Math.floor(c / 2)));
    const q = parentCells(intervalMesh(0, 1, 4), intervalMesh(0, 1, 12));
    expect(Array.from(q.childCount)).toEqual([3, 3, 3, 3]);
    expect(q.nested).toBe(true);
  });

  it.each(['tetrahedra', 'hexahedra'] as const)('box of %s, 2 × 3 × 1 to 4 × 6 × 2: eight children per cell', (cells) => {
    const box = { x: [0, 2], y: [-1, 0.5], z: [1, 1.75] } as const;
    const coarse = boxMesh({ ...box, nx: 2, ny: 3, nz: 1, cells });
    const fine = boxMesh({ ...box, nx: 4, ny: 6, nz: 2, cells });
    const p = parentCells(coarse, fine);
    expect(p.reason).toBeNull();
    expect(p.nested).toBe(true);
    expect(Array.from(p.childCount)).toEqual(new Array(coarse.nCells).fill(8));
    // Fine box (i, j, k) of 4 × 6 × 2 lies in coarse box (⌊i/2⌋, ⌊j/2⌋, ⌊k/2⌋) of 2 × 3 × 1.
    const per = cells === 'tetrahedra' ? 6 : 1;
    const coarseBox = (b: number) => {
      const i = b % 4, j = Math.floor(b / 4) % 6, k = Math.floor(b / 24);
      return Math.floor(i / 2) + 2 * (Math.floor(j / 2) + 3 * Math.floor(k / 2));
    };
    expect(firstMisplaced(p.parent, per, per, coarseBox)).toBe(-1);
  });
});

describe('parentCells on ladders that are not nested', () => {
  const square = { x: [0, 1], y: [0, 1] } as const;

  it('a perturbed fine mesh: children no longer fill their parents', () => {
    const coarse = rectangleMesh({ ...square, nx: 4, ny: 4, cells: 'triangles', diagonal: 'right' });
    const fine = perturbMesh(rectangleMesh({ ...square, nx: 8, ny: 8, cells: 'triangles', diagonal: 'right' }), { fraction: 0.2, seed: 7 });
    const p = parentCells(coarse, fine);
    expect(p.nested).toBe(false);
    expect(p.reason).toMatch(/coarse cell \d+ measures/);
    const quads = parentCells(
      rectangleMesh({ ...square, nx: 4, ny: 4, cells: 'quadrilaterals' }),
      perturbMesh(rectangleMesh({ ...square, nx: 8, ny: 8, cells: 'quadrilaterals' }), { fraction: 0.25, seed: 3 }),
    );
    expect(quads.nested).toBe(false);
  });

  it('3 × 3 to 4 × 4 squares: not a refinement', () => {
    const p = parentCells(
      rectangleMesh({ ...square, nx: 3, ny: 3, cells: 'quadrilaterals' }),
      rectangleMesh({ ...square, nx: 4, ny: 4, cells: 'quadrilaterals' }),
    );
    expect(p.nested).toBe(false);
  });

  it('a fine mesh reaching outside the coarse one: cells outside get −1', () => {
    const p = parentCells(
      rectangleMesh({ ...square, nx: 2, ny: 2, cells: 'quadrilaterals' }),
      rectangleMesh({ x: [0, 2], y: [0, 1], nx: 8, ny: 4, cells: 'quadrilaterals' }),
    );
    expect(p.nested).toBe(false);
    expect(p.reason).toMatch(/no coarse cell/);
    // Fine columns 4..7 (x > 1) are outside [0, 1]².
    const outside = Array.from(p.parent).map((K, c) => (K < 0 ? c % 8 : -1)).filter((i) => i >= 0);
    expect(outside.length).toBe(16);
    expect(outside.every((i) => i >= 4)).toBe(true);
  });

  it('the plane\'s written-out loops give the same parents as the general ones (nested, perturbed, non-nested, outside, quadrilaterals)', () => {
    const pairs = [
      ...DIAGONALS.map((diagonal) => [rectangleMesh({ ...square, nx: 5, ny: 4, cells: 'triangles', diagonal }), rectangleMesh({ ...square, nx: 10, ny: 8, cells: 'triangles', diagonal })]),
      // Perturbed fine vertices: centroids near coarse edges and in no coarse cell at all.
      [rectangleMesh({ ...square, nx: 6, ny: 6, cells: 'triangles' }), perturbMesh(rectangleMesh({ ...square, nx: 12, ny: 12, cells: 'triangles' }), { fraction: 0.3, seed: 11 })],
      [perturbMesh(rectangleMesh({ ...square, nx: 7, ny: 7, cells: 'triangles', diagonal: 'crossed' }), { fraction: 0.25, seed: 5 }), rectangleMesh({ ...square, nx: 9, ny: 9, cells: 'triangles' })],
      // Centroids outside the coarse mesh, and a quadrilateral coarse mesh (its buckets through enterCells2D).
      [rectangleMesh({ ...square, nx: 3, ny: 3, cells: 'triangles' }), rectangleMesh({ x: [-0.5, 1.5], y: [0, 1], nx: 8, ny: 4, cells: 'triangles' })],
      [perturbMesh(rectangleMesh({ ...square, nx: 4, ny: 4, cells: 'quadrilaterals' }), { fraction: 0.2, seed: 2 }), rectangleMesh({ ...square, nx: 8, ny: 8, cells: 'triangles' })],
    ] as const;
    const differing: string[] = [];
    pairs.forEach(([coarse, fine], i) => {
      const fast = parentCells(coarse, fine), reference = parentCells(coarse, fine, { reference: true });
      if (Array.from(fast.parent).join() !== Array.from(reference.parent).join() || fast.nested !== reference.nested || fast.reason !== reference.reason) differing.push(`pair ${i}`);
    });
    expect(differing).toEqual([]);
    // The comparison covers both outcomes: nested pairs and pairs with cells in no coarse cell.
    const outcomes = pairs.map(([coarse, fine]) => parentCells(coarse, fine).nested);
    expect(outcomes).toContain(true);
    expect(outcomes).toContain(false);
  });

  it('refuses meshes of different dimensions', () => {
    expect(() => parentCells(intervalMesh(0, 1, 2), rectangleMesh({ ...square, nx: 2, ny: 2, cells: 'quadrilaterals' })))
      .toThrow(RungsInputError);
  });
});
