import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import type { Diagonal } from '../../src/mesh/grid.ts';
import { checkMesh } from '../../src/mesh/quality.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { bruteDiameter, cellAreas, conformityProblems, edgeUses, point, taggedLength } from './geometry-helpers.ts';

// A 3 × 2 domain cut into 4 × 5 rectangles: dx = 3/4, dy = 2/5.
const x: [number, number] = [1, 4];
const y: [number, number] = [-1, 1];
const nx = 4;
const ny = 5;
const dx = (x[1] - x[0]) / nx;
const dy = (y[1] - y[0]) / ny;
const triangleSplits: Diagonal[] = ['right', 'left', 'alternating', 'crossed'];

function make(cells: 'triangles' | 'quadrilaterals', diagonal?: Diagonal): Mesh {
  return rectangleMesh({ x, y, nx, ny, cells, ...(diagonal ? { diagonal } : {}) });
}

const variants: Array<[string, Mesh]> = [
  ...triangleSplits.map((d): [string, Mesh] => [`triangles/${d}`, make('triangles', d)]),
  ['quadrilaterals', make('quadrilaterals')],
];

describe('rectangleMesh counts', () => {
  it('two-triangle splits: (nx+1)(ny+1) vertices, 2 nx ny cells', () => {
    for (const d of ['right', 'left', 'alternating'] as const) {
      const mesh = make('triangles', d);
      expect(mesh.nVertices).toBe((nx + 1) * (ny + 1));
      expect(mesh.nCells).toBe(2 * nx * ny);
      expect(mesh.verticesPerCell).toBe(3);
    }
  });
  it("'crossed': nx ny extra centre vertices and 4 nx ny cells", () => {
    const mesh = make('triangles', 'crossed');
    expect(mesh.nVertices).toBe((nx + 1) * (ny + 1) + nx * ny);
    expect(mesh.nCells).toBe(4 * nx * ny);
  });
  it('quadrilaterals: (nx+1)(ny+1) vertices, nx ny cells of 4 vertices', () => {
    const mesh = make('quadrilaterals');
    expect(mesh.cellKind).toBe('quadrilateral');
    expect(mesh.nVertices).toBe((nx + 1) * (ny + 1));
    expect(mesh.nCells).toBe(nx * ny);
    expect(mesh.verticesPerCell).toBe(4);
  });
  it('every variant has 2(nx + ny) boundary edges', () => {
    for (const [, mesh] of variants) expect(mesh.nFacets).toBe(2 * (nx + ny));
  });
  it("defaults to the 'right' diagonal", () => {
    const plain = make('triangles');
    expect(Array.from(plain.cells)).toEqual(Array.from(make('triangles', 'right').cells));
  });
});

describe.each(variants)('rectangleMesh %s geometry', (_name, mesh) => {
  it('cells are counter-clockwise and their areas sum to the rectangle area', () => {
    // Exact integral: area of [1,4]×[−1,1] is 3 · 2 = 6 (common practice, no source).
    const areas = cellAreas(mesh);
    for (const area of areas) expect(area).toBeGreaterThan(0);
    expect(areas.reduce((s, v) => s + v, 0)).toBeCloseTo(6, 12);
    // All cells of a uniform split have the same area: dx dy / (cells per square).
    const perSquare = mesh.nCells / (nx * ny);
    for (const area of areas) expect(area).toBeCloseTo((dx * dy) / perSquare, 13);
  });

  it('boundary length per tag equals the side length, and facets lie on their side', () => {
    // Side lengths of the rectangle (common practice, no source).
    expect(taggedLength(mesh, 'left')).toBeCloseTo(2, 13);
    expect(taggedLength(mesh, 'right')).toBeCloseTo(2, 13);
    expect(taggedLength(mesh, 'bottom')).toBeCloseTo(3, 13);
    expect(taggedLength(mesh, 'top')).toBeCloseTo(3, 13);
    const onSide: Record<string, (p: number[]) => boolean> = {
      left: (p) => p[0] === x[0],
      right: (p) => p[0] === x[1],
      bottom: (p) => p[1] === y[0],
      top: (p) => p[1] === y[1],
    };
    for (let f = 0; f < mesh.nFacets; f++) {
      const test = onSide[mesh.tagNames[mesh.facetTags[f]!]!]!;
      expect(test(point(mesh, mesh.facets[2 * f]!)) && test(point(mesh, mesh.facets[2 * f + 1]!))).toBe(true);
    }
  });

  it('is conforming, and boundary facets run counter-clockwise (domain on the left) as one closed loop', () => {
    expect(conformityProblems(mesh)).toEqual([]);
    for (let f = 0; f < mesh.nFacets; f++) {
      const next = (f + 1) % mesh.nFacets;
      expect(mesh.facets[2 * f + 1]).toBe(mesh.facets[2 * next]);
    }
    // The loop encloses positive area only if it is counter-clockwise (shoelace sign; common practice, no source).
    const loop = [];
    for (let f = 0; f < mesh.nFacets; f++) loop.push(point(mesh, mesh.facets[2 * f]!));
    let twice = 0;
    for (let k = 0; k < loop.length; k++) {
      const p = loop[k]!;
      const q = loop[(k + 1) % loop.length]!;
      twice += p[0]! * q[1]! - q[0]! * p[1]!;
    }
    expect(twice / 2).toBeCloseTo(6, 12);
  });

  it('grid vertex i + j(nx+1) sits at (x0 + i dx, y0 + j dy), corners exactly', () => {
    for (let j = 0; j <= ny; j++) {
      for (let i = 0; i <= nx; i++) {
        const [px, py] = point(mesh, i + j * (nx + 1));
        expect(px).toBeCloseTo(x[0] + i * dx, 14);
        expect(py).toBeCloseTo(y[0] + j * dy, 14);
      }
    }
    expect(point(mesh, nx + ny * (nx + 1))).toEqual([x[1], y[1]]);
  });

  it('h is the largest cell diameter and passes checkMesh', () => {
    let largest = 0;
    for (let c = 0; c < mesh.nCells; c++) largest = Math.max(largest, bruteDiameter(mesh, c));
    expect(mesh.h).toBeCloseTo(largest, 14);
    expect(() => checkMesh(mesh)).not.toThrow();
  });
});

describe('rectangleMesh diameters and patterns', () => {
  it('h = sqrt(dx² + dy²) for the two-triangle splits and quadrilaterals', () => {
    // Longest edge of a right triangle with legs dx, dy is its hypotenuse (Pythagoras; common practice, no source).
    for (const [name, mesh] of variants) {
      if (name === 'triangles/crossed') continue;
      expect(mesh.h).toBeCloseTo(Math.hypot(dx, dy), 14);
    }
  });
  it("'crossed': h = max(dx, dy), since half a diagonal is never longer than the longer side", () => {
    // Triangle (corner, corner, centre) has sides dx (or dy) and two half-diagonals (common practice, no source).
    expect(make('triangles', 'crossed').h).toBeCloseTo(Math.max(dx, dy, Math.hypot(dx, dy) / 2), 14);
  });

  it("'right' cuts every square lower-left to upper-right, 'left' the other way, 'alternating' in a checkerboard", () => {
    const row = nx + 1;
    const hasEdge = (mesh: Mesh, a: number, b: number) => edgeUses(mesh).has(`${Math.min(a, b)}-${Math.max(a, b)}`);
    const right = make('triangles', 'right');
    const left = make('triangles', 'left');
    const alternating = make('triangles', 'alternating');
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const v00 = i + j * row;
        const rising = [v00, v00 + row + 1] as const;
        const falling = [v00 + 1, v00 + row] as const;
        expect(hasEdge(right, ...rising) && !hasEdge(right, ...falling)).toBe(true);
        expect(hasEdge(left, ...falling) && !hasEdge(left, ...rising)).toBe(true);
        const evenSquare = (i + j) % 2 === 0;
        expect(hasEdge(alternating, ...(evenSquare ? rising : falling))).toBe(true);
        expect(hasEdge(alternating, ...(evenSquare ? falling : rising))).toBe(false);
      }
    }
  });

  it('row-major numbering keeps every cell within an index band of nx + 2', () => {
    // Row-major grid numbering gives the 5-point-stencil-like band nx + 1 (+1 for the diagonal) (common practice, no source).
    for (const [name, mesh] of variants) {
      if (name === 'triangles/crossed') continue;
      let band = 0;
      for (let c = 0; c < mesh.nCells; c++) {
        const vs = Array.from(mesh.cells.subarray(c * mesh.verticesPerCell, (c + 1) * mesh.verticesPerCell));
        band = Math.max(band, Math.max(...vs) - Math.min(...vs));
      }
      expect(band).toBeLessThanOrEqual(nx + 2);
      expect(band).toBeGreaterThanOrEqual(nx + 1);
    }
  });

  it("'crossed' centre vertices follow the grid vertices and sit at the square centres", () => {
    const mesh = make('triangles', 'crossed');
    const nGrid = (nx + 1) * (ny + 1);
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const [px, py] = point(mesh, nGrid + i + j * nx);
        expect(px).toBeCloseTo(x[0] + (i + 0.5) * dx, 14);
        expect(py).toBeCloseTo(y[0] + (j + 0.5) * dy, 14);
      }
    }
  });
});

describe('rectangleMesh input errors', () => {
  it('names the bad field', () => {
    expect(() => rectangleMesh({ x: [1, 0], y, nx, ny, cells: 'triangles' })).toThrow(/rectangle x/);
    expect(() => rectangleMesh({ x, y, nx: 0, ny, cells: 'triangles' })).toThrow(/nx must be a positive integer/);
    expect(() => rectangleMesh({ x, y, nx, ny, cells: 'hexagons' as 'triangles' })).toThrow(/cells must be/);
    expect(() => rectangleMesh({ x, y, nx, ny, cells: 'triangles', diagonal: 'up' as Diagonal })).toThrow(
      /'right', 'left', 'alternating', 'crossed'/,
    );
    expect(() => rectangleMesh({ x, y, nx, ny, cells: 'quadrilaterals', diagonal: 'left' })).toThrow(RungsInputError);
  });
});
