import { describe, expect, it } from 'vitest';
import { analyseRegions, DENSITY_NOTE_FACTOR, POINT_SHARE, REGION_ORDER_MARGIN, type RegionLevel } from '../../src/analysis/regions.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boundaryStrips, regionErrors, type BoundaryStrips } from '../../src/mesh/regions.ts';
import type { Mesh } from '../../src/mesh/types.ts';

// Synthetic ladders: per-cell errors ∫_K e² = ρ(K, h) |K| from a closed form for the density ρ, on quadrilateral
// meshes of the unit square (n = 8 … 64). A region whose density is c h^{2q} has RMS sqrt(c) h^q, hence order q
// exactly (common practice, no source). h is the mesh's own (the cell diagonal √2 / n).

type Density = (cell: number, h: number, strips: BoundaryStrips, mesh: Mesh) => number;
const LEFT = 0, RIGHT = 1, TOP = 3;

/** Whether cell c is in the whole strip along tag t. */
const inStrip = (s: BoundaryStrips, t: number, c: number) => s.strips[t]!.cells.includes(c);

function ladder(l2: Density, h1: Density = l2, ns = [8, 16, 32, 64]): RegionLevel[] {
  return ns.map((n) => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'quadrilaterals' });
    const strips = boundaryStrips(mesh);
    const area = 1 / (n * n);
    const e2 = Float64Array.from({ length: mesh.nCells }, (_, c) => l2(c, mesh.h, strips, mesh) * area);
    const g2 = Float64Array.from({ length: mesh.nCells }, (_, c) => h1(c, mesh.h, strips, mesh) * area);
    return { h: mesh.h, regions: regionErrors(mesh, strips, e2, g2) };
  });
}

describe('analyseRegions: a loss in one place', () => {
  // e² density h^4 in the interior, h^2 in the cells along 'top' (corner cells included).
  const topFlaw: Density = (c, h, s) => (inStrip(s, TOP, c) ? h ** 2 : h ** 4);

  it("density h² along 'top', h⁴ elsewhere: orders 1 and 2, and 'top' named", () => {
    const a = analyseRegions(ladder(topFlaw), 'L2', 2);
    expect(a.interior.order).toBeCloseTo(2, 10);
    expect(a.strips.find((s) => s.tags[0] === 'top')!.order).toBeCloseTo(1, 10);
    // 'left' shares its top corner with 'top': its own cells (the strip without corners) keep order 2.
    expect(a.strips.find((s) => s.tags[0] === 'left')!.order).toBeCloseTo(2, 10);
    expect(a.pattern).toBe('localised');
    expect(a.places).toEqual(['top']);
    expect(a.reason).toBe("order 1.0 in the strip along 'top', 2.0 in the interior: the data on 'top' is the likely cause");
  });

  it('the chosen norm is the one judged: the same ladder with a uniform gradient error', () => {
    const a = analyseRegions(ladder(topFlaw, (_c, h) => h ** 2), 'H1semi', 1);
    expect(a.pattern).toBe('uniform');
    expect(a.reason).toBe('the order is the same in every region (1.0)');
  });

  it('two strips at one order are named together; different orders one by one', () => {
    const both = analyseRegions(ladder((c, h, s) => (inStrip(s, TOP, c) || inStrip(s, LEFT, c) ? h ** 2 : h ** 4)), 'L2', 2);
    expect(both.reason).toBe("order 1.0 in the strips along 'left' and 'top', 2.0 in the interior: the data on 'left' and 'top' is the likely cause");
    expect(both.places).toEqual(['left', 'top']);
    // h^3 density along 'left' (order 1.5; the shared corner carries 'top's h^2, outside left's own cells).
    const mixed = analyseRegions(ladder((c, h, s) => (inStrip(s, TOP, c) ? h ** 2 : inStrip(s, LEFT, c) ? h ** 3 : h ** 4)), 'L2', 2);
    expect(mixed.reason).toBe(
      "order 1.0 in the strip along 'top', 1.5 in the strip along 'left', 2.0 in the interior: the data on 'top' and 'left' is the likely cause");
  });

  it('a corner alone: the meet of two sound strips is named', () => {
    // The top-left square (cell n(n − 1)) holds an O(1) error; every other cell h^4.
    const a = analyseRegions(ladder((c, h, _s, m) => (c === Math.sqrt(m.nCells) * (Math.sqrt(m.nCells) - 1) ? 1 : h ** 4)), 'L2', 2);
    expect(a.strips.every((s) => !s.low)).toBe(true);
    expect(a.reason).toBe("order 0.0 where 'left' meets 'top', 2.0 in the interior: the data where 'left' meets 'top' is the likely cause");
    expect(a.places).toEqual(['left', 'top']);
  });

  it('an interior below the expected order is said too', () => {
    const a = analyseRegions(ladder((c, h, s) => (inStrip(s, TOP, c) ? h ** 2 : h ** 3)), 'L2', 2);
    expect(a.reason).toBe(
      "order 1.0 in the strip along 'top', 1.5 in the interior: the data on 'top' is the likely cause; the interior, too, is below the expected order 2");
  });

  it(`a gap of at most REGION_ORDER_MARGIN (${REGION_ORDER_MARGIN}) is not a difference`, () => {
    // Order 1.8 along 'top' (density h^3.6) against 2 in the interior: a gap of 0.2.
    const a = analyseRegions(ladder((c, h, s) => (inStrip(s, TOP, c) ? h ** 3.6 : h ** 4)), 'L2', 2);
    expect(a.pattern).toBe('uniform');
  });
});

describe('analyseRegions: no one place', () => {
  it('the same density everywhere: the uniform reason, with the loss when below the expected order', () => {
    const uniform = (_c: number, h: number) => h ** 4;
    expect(analyseRegions(ladder(uniform), 'L2', 2).reason).toBe('the order is the same in every region (2.0)');
    const below = analyseRegions(ladder(uniform), 'L2', 3);
    expect(below.pattern).toBe('uniform');
    expect(below.reason).toBe('the order is the same in every region (2.0): the loss is not tied to one part of the boundary');
  });

  it(`a loss spread everywhere but densest along 'top' (16 × the density, 4 × the RMS ≥ ${DENSITY_NOTE_FACTOR})`, () => {
    const a = analyseRegions(ladder((c, h, s) => (inStrip(s, TOP, c) ? 16 * h ** 2 : h ** 2)), 'L2', 2);
    expect(a.reason).toBe(
      "the order is the same in every region (1.0): the loss is not tied to one part of the boundary; " +
        "on the finest level the error is densest in the strip along 'top' (4.0 times the interior's RMS)");
  });

  it('strips faster than the interior: those that are not are named when the order is below the expected one', () => {
    // The error vanishes towards 'left' and 'right' (density h^6 there), h^2 elsewhere.
    const density: Density = (c, h, s) => (inStrip(s, LEFT, c) || inStrip(s, RIGHT, c) ? h ** 6 : h ** 2);
    const a = analyseRegions(ladder(density), 'L2', 2);
    expect(a.pattern).toBe('faster-strips');
    expect(a.places).toEqual(['bottom', 'top']);
    expect(a.reason).toBe(
      "order 1.0 in the interior and the strips along 'bottom' and 'top', faster along 'left' (3.0) and 'right' (3.0): " +
        "the error is held down along 'left' and 'right' only, so the data on 'bottom' and 'top' is the likely cause");
    const onOrder = analyseRegions(ladder(density), 'L2', 1);
    expect(onOrder.places).toEqual([]);
    expect(onOrder.reason).toBe("no boundary strip converges more slowly than the interior (1.0); faster along 'left' (3.0) and 'right' (3.0)");
  });

  it('every strip faster than the interior: the loss comes from inside', () => {
    // Density h^2 in the interior, h^4 in every strip (corners included).
    const a = analyseRegions(ladder((c, h, s) => (s.interior.cells.includes(c) ? h ** 2 : h ** 4)), 'L2', 2);
    expect(a.pattern).toBe('faster-strips');
    expect(a.places).toEqual([]);
    expect(a.reason).toMatch(/^every boundary strip converges faster than the interior \(1\.0; 'left' \(2\.0\), 'right' \(2\.0\), 'bottom' \(2\.0\) and 'top' \(2\.0\)\): .*the loss comes from inside the domain/);
  });
});

describe('analyseRegions: what is left out', () => {
  it('levels from floorFrom on are not fitted', () => {
    const levels = ladder((c, h, s) => (inStrip(s, TOP, c) ? h ** 2 : h ** 4));
    // Replace the finest level by a flat floor: every region's error as on level 2.
    const floored = [...levels.slice(0, 3), { ...levels[2]!, h: levels[3]!.h }];
    const a = analyseRegions(floored, 'L2', 2, { floorFrom: 3 });
    expect(a.interior.fit!.levels).toEqual([0, 1, 2]);
    expect(a.reason).toBe("order 1.0 in the strip along 'top', 2.0 in the interior: the data on 'top' is the likely cause");
  });

  it('one level, or an interior with no cells, cannot be compared', () => {
    const single = analyseRegions(ladder((_c, h) => h ** 4, undefined, [8]), 'L2', 2);
    expect(single.pattern).toBe('inconclusive');
    expect(single.interior.order).toBeNull();
    // 2 × 2 squares have no interior cell; 3 × 3 one: a single level with an interior.
    const coarse = analyseRegions(ladder((_c, h) => h ** 4, undefined, [2, 3]), 'L2', 2);
    expect(coarse.interior.rms[0]).toBeNull();
    expect(coarse.interior.order).toBeNull();
    expect(coarse.reason).toMatch(/^the interior has fewer than two levels/);
  });

  it('rates between levels and the density ratio are kept per region', () => {
    const a = analyseRegions(ladder((c, h, s) => (inStrip(s, TOP, c) ? 4 * h ** 2 : h ** 4)), 'L2', 2);
    const top = a.strips.find((s) => s.tags[0] === 'top')!;
    expect(top.rates[0]).toBeNull();
    for (const r of top.rates.slice(1)) expect(r).toBeCloseTo(1, 10);
    // On n = 64: RMS 2h against h^2, h = √2 / 64.
    expect(top.densityRatio).toBeCloseTo(2 / (Math.SQRT2 / 64), 8);
  });
});

describe('analyseRegions: a slow strip that owes its order to one point', () => {
  // Density h^(1/2) in the two cells of the 'left' column that touch the vertex (0, 1/2), h^4 everywhere else: the
  // strip's RMS is sqrt(2 h^(5/2) / h) ∝ h^(3/4) against order 2 in the interior, and those two cells hold nearly all
  // of the strip's error on every level (closed form, as the ladders above).
  const atMid = (mesh: Mesh, c: number) => {
    const { cells, coords } = mesh;
    for (let k = 0; k < 4; k++) { const v = cells[4 * c + k]!; if (coords[2 * v] === 0 && coords[2 * v + 1] === 0.5) return true; }
    return false;
  };
  const levels = ladder((c, h, _s, mesh) => (atMid(mesh, c) ? h ** 0.5 : h ** 4));

  it('without a word on the exact solution the strip is named, as for a data error', () => {
    const a = analyseRegions(levels, 'L2', 2);
    expect(a.pattern).toBe('localised');
    expect(a.places).toEqual(['left']);
    const left = a.strips.find((s) => s.tags[0] === 'left')!;
    expect(left.point).toBe(true);
    expect(left.peak!.at).toEqual([0, 0.5]);
    expect(left.peak!.share).toBeGreaterThan(0.99);
  });

  it('where the exact solution is singular at that point, the point is named instead of the data', () => {
    const seen: number[][] = [];
    const a = analyseRegions(levels, 'L2', 2, { singularAt: (at) => { seen.push(at); return at[0] === 0 && at[1] === 0.5; } });
    expect(seen).toEqual([[0, 0.5]]);
    expect(a.pattern).toBe('point');
    expect(a.places).toEqual([]);
    expect(a.reason).toMatch(/^order 0\.8 in the strip along 'left' \(2\.0 in the interior\), with 100% of its error in the cells around \(0, 0\.5\), where the exact solution is not smooth .*: the singularity at \(0, 0\.5\), not the data on 'left', is the likely cause/);
  });

  it(`an error spread along a strip keeps no point: its share around one vertex halves with h (under ${POINT_SHARE} from n = 16 on)`, () => {
    const a = analyseRegions(ladder((c, h, s) => (inStrip(s, TOP, c) ? h ** 2 : h ** 4)), 'L2', 2, { singularAt: () => true });
    expect(a.strips.find((s) => s.tags[0] === 'top')!.point).toBe(false);
    expect(a.pattern).toBe('localised');
  });
});
