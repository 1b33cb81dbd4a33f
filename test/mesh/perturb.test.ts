import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { lShapeMesh } from '../../src/mesh/lshape.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { checkMesh } from '../../src/mesh/quality.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { bruteDiameter, cellAreas, conformityProblems, distance, point } from './geometry-helpers.ts';

// dx = 1/8, dy = 1/6: every interior vertex has a grid edge of length min(dx, dy) = 1/8 and none shorter.
const base = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 6, cells: 'triangles' });
const localH = 1 / 8;

function boundaryVertices(mesh: Mesh): Set<number> {
  return new Set(Array.from(mesh.facets));
}

describe('perturbMesh', () => {
  const fraction = 0.3;
  const moved = perturbMesh(base, { fraction, seed: 7 });
  const onBoundary = boundaryVertices(base);

  it('keeps boundary vertices and moves each interior vertex by at most fraction × local h', () => {
    let interior = 0;
    for (let v = 0; v < base.nVertices; v++) {
      const shift = distance(point(base, v), point(moved, v));
      if (onBoundary.has(v)) {
        expect(shift).toBe(0);
      } else {
        interior++;
        expect(shift).toBeGreaterThan(0);
        expect(shift).toBeLessThanOrEqual(fraction * localH * (1 + 1e-12));
      }
    }
    expect(interior).toBe(7 * 5);
  });

  it('uses a good part of the allowed displacement (draws are spread over the disc)', () => {
    let largest = 0;
    for (let v = 0; v < base.nVertices; v++) largest = Math.max(largest, distance(point(base, v), point(moved, v)));
    // With 35 uniform draws in a disc, P(all within 0.6 R) = 0.36^35 ≈ 3e-16 (common practice, no source).
    expect(largest).toBeGreaterThan(0.6 * fraction * localH);
  });

  it('keeps the domain: cells stay counter-clockwise and their areas still sum to 1', () => {
    // Exact integral: area of the unit square; the boundary does not move (common practice, no source).
    const areas = cellAreas(moved);
    for (const area of areas) expect(area).toBeGreaterThan(0);
    expect(areas.reduce((s, a) => s + a, 0)).toBeCloseTo(1, 13);
    expect(conformityProblems(moved)).toEqual([]);
    expect(() => checkMesh(moved)).not.toThrow();
  });

  it('recomputes h as the new largest cell diameter', () => {
    let largest = 0;
    for (let c = 0; c < moved.nCells; c++) largest = Math.max(largest, bruteDiameter(moved, c));
    expect(moved.h).toBeCloseTo(largest, 14);
    expect(moved.h).not.toBe(base.h);
  });

  it('is reproducible with the same seed and different with another; the input is untouched', () => {
    const again = perturbMesh(base, { fraction, seed: 7 });
    const other = perturbMesh(base, { fraction, seed: 8 });
    expect(Array.from(again.coords)).toEqual(Array.from(moved.coords));
    expect(Array.from(other.coords)).not.toEqual(Array.from(moved.coords));
    expect(Array.from(base.coords)).toEqual(Array.from(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 6, cells: 'triangles' }).coords));
    expect(moved.cells).not.toBe(base.cells);
  });

  it('stays valid below the proven bound 1/(2√2) ≈ 0.354 (square cells, all splits; thin two-triangle cells)', () => {
    // Bound derived in perturb.ts from the smallest altitude of a right isosceles triangle (common practice, no source).
    const meshes = [
      ...(['right', 'left', 'alternating', 'crossed'] as const).map((d) =>
        rectangleMesh({ x: [0, 1], y: [0, 1], nx: 6, ny: 6, cells: 'triangles', diagonal: d }),
      ),
      rectangleMesh({ x: [0, 1], y: [0, 1], nx: 6, ny: 6, cells: 'quadrilaterals' }),
      rectangleMesh({ x: [0, 4], y: [0, 1], nx: 4, ny: 8, cells: 'triangles' }),
      lShapeMesh(3, 'crossed'),
    ];
    for (const mesh of meshes) {
      for (let seed = 0; seed < 15; seed++) {
        expect(() => checkMesh(perturbMesh(mesh, { fraction: 0.35, seed }))).not.toThrow();
      }
    }
  });

  it("'crossed' with unequal sides stays valid below its smaller documented bound", () => {
    // dx = 1, dy = 1/8: bound (dy/2) / (d/2 + dy) ≈ 0.0994 from perturb.ts (derivation there; common practice, no source).
    const thin = rectangleMesh({ x: [0, 4], y: [0, 0.5], nx: 4, ny: 4, cells: 'triangles', diagonal: 'crossed' });
    const d = Math.hypot(1, 1 / 8);
    const bound = 1 / 16 / (d / 2 + 1 / 8);
    expect(bound).toBeCloseTo(0.0994, 4);
    for (let seed = 0; seed < 30; seed++) {
      expect(() => checkMesh(perturbMesh(thin, { fraction: 0.99 * bound, seed }))).not.toThrow();
    }
  });

  it('throws naming the cell when a large fraction inverts one', () => {
    // 'crossed' on 1 × 0.1 rectangles: centres may move 0.49 × 0.5, five times the 0.05 altitude of the thin triangles.
    const thin = rectangleMesh({ x: [0, 4], y: [0, 0.4], nx: 4, ny: 4, cells: 'triangles', diagonal: 'crossed' });
    expect(() => perturbMesh(thin, { fraction: 0.49, seed: 3 })).toThrow(/cell \d+ (inverted|degenerate)/);
  });

  it('perturbs 1D meshes along the line and keeps the order of the vertices', () => {
    const line = intervalMesh(0, 2, 10);
    const shaken = perturbMesh(line, { fraction: 0.45, seed: 11 });
    expect(shaken.coords[0]).toBe(0);
    expect(shaken.coords[10]).toBe(2);
    for (let v = 1; v < 10; v++) {
      expect(Math.abs(shaken.coords[v]! - line.coords[v]!)).toBeLessThanOrEqual(0.45 * 0.2 * (1 + 1e-12));
      expect(shaken.coords[v]!).toBeGreaterThan(shaken.coords[v - 1]!);
    }
    expect(() => checkMesh(shaken)).not.toThrow();
  });

  it('rejects a fraction outside [0, 0.5) and a non-integer seed', () => {
    expect(() => perturbMesh(base, { fraction: 0.5, seed: 1 })).toThrow(RungsInputError);
    expect(() => perturbMesh(base, { fraction: -0.1, seed: 1 })).toThrow(/fraction/);
    expect(() => perturbMesh(base, { fraction: 0.2, seed: 1.5 })).toThrow(/seed/);
  });
});
