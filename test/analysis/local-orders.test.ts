import { describe, expect, it } from 'vitest';
import { weightedQuantile } from 'simple-statistics';
import { localOrders, LOCAL_ORDER_ROUND_OFF, stableOrder, summarizeLocalOrders, weightedQuantiles } from '../../src/analysis/local-orders.ts';
import { mulberry32 } from '../../src/mesh/random.ts';
import { RungsInputError } from '../../src/errors.ts';
import { parentCells } from '../../src/mesh/nesting.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';

// Synthetic per-cell errors from a closed form: a cell K of size h with error density C_K h^p has
// ∫_K e² = C_K² h^{2p} |K|, and its children (size h / r, same density constant) together C_K² (h/r)^{2p} |K|, so
// ln(e_K / e_children) / ln r = p exactly (common practice, no source).

/** n coarse squares of side h in a row, each split into r × r children numbered r² K + k. */
function ladder(n: number, r: number, h: number, p: number, constant: (K: number) => number) {
  const coarse = new Float64Array(n), fine = new Float64Array(n * r * r), parents = new Int32Array(n * r * r);
  for (let K = 0; K < n; K++) {
    const C = constant(K);
    coarse[K] = C * C * h ** (2 * p) * h * h;
    for (let k = 0; k < r * r; k++) {
      fine[r * r * K + k] = C * C * (h / r) ** (2 * p) * (h / r) ** 2;
      parents[r * r * K + k] = K;
    }
  }
  return { coarse, fine, parents };
}

describe('localOrders', () => {
  it.each([[2, 2], [1.5, 2], [3, 3], [0.5, 2]])('density C_K h^%s with ratio %s gives that order in every cell', (p, r) => {
    const { coarse, fine, parents } = ladder(10, r, 0.1, p, (K) => 1 + 0.3 * K);
    const orders = localOrders(coarse, fine, parents, r);
    let worst = 0;
    for (const q of orders) worst = Math.max(worst, Math.abs(q - p));
    expect(worst).toBeLessThan(1e-12);
  });

  it("on a nested pair of meshes found by parentCells ('crossed' triangles, 4 to 8)", () => {
    // Each triangle of an n × n 'crossed' mesh of the unit square has area 1 / (4 n²); density h^{2p}, h = 1/n.
    const p = 2;
    const perCell = (n: number, cells: number) => new Float64Array(cells).fill((1 / n) ** (2 * p) / (4 * n * n));
    const coarse = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 4, ny: 4, cells: 'triangles', diagonal: 'crossed' });
    const fine = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 8, cells: 'triangles', diagonal: 'crossed' });
    const { parent } = parentCells(coarse, fine);
    const orders = localOrders(perCell(4, coarse.nCells), perCell(8, fine.nCells), parent, 2);
    expect(Math.max(...Array.from(orders, (q) => Math.abs(q - p)))).toBeLessThan(1e-12);
  });

  it('children listed in any order, with a parent of −1 skipped', () => {
    const { coarse, fine, parents } = ladder(3, 2, 0.25, 2, () => 1);
    const perm = [5, 0, 11, 2, 7, 9, 1, 3, 10, 4, 6, 8];
    const shuffled = Float64Array.from(perm, (i) => fine[i]!);
    const shuffledParents = Int32Array.from(perm, (i) => parents[i]!);
    const withStray = localOrders(Float64Array.from(coarse), Float64Array.of(...shuffled, 1), Int32Array.of(...shuffledParents, -1), 2);
    expect(Array.from(withStray).map((q) => Math.round(q * 1e12) / 1e12)).toEqual([2, 2, 2]);
  });

  it('NaN where an error is at round-off or a cell has no children', () => {
    const { coarse, fine, parents } = ladder(4, 2, 0.5, 1, () => 1);
    coarse[1] = coarse[0]! * 1e-20; // e 1e-10 of the largest: below LOCAL_ORDER_ROUND_OFF
    for (let k = 8; k < 12; k++) fine[k] = 0; // coarse cell 2: children exactly right
    parents.fill(0, 12, 16); // coarse cell 3 loses its children to cell 0
    const orders = localOrders(coarse, fine, parents, 2);
    expect(Number.isNaN(orders[1]!)).toBe(true);
    expect(Number.isNaN(orders[2]!)).toBe(true);
    expect(Number.isNaN(orders[3]!)).toBe(true);
    // Cell 0 now has 8 children: e_children = sqrt(2) × its own at half size: ln(2 / sqrt(2)) / ln 2 = 1/2.
    expect(orders[0]).toBeCloseTo(0.5, 12);
    expect(LOCAL_ORDER_ROUND_OFF).toBeGreaterThan(1e-10); // the premise of cell 1's case above
  });

  it('a threshold of the caller\'s own', () => {
    const { coarse, fine, parents } = ladder(2, 2, 0.5, 2, (K) => (K === 0 ? 1 : 1e-3));
    expect(Number.isNaN(localOrders(coarse, fine, parents, 2, 1e-2)[1]!)).toBe(true);
    expect(localOrders(coarse, fine, parents, 2, 1e-4)[1]).toBeCloseTo(2, 12);
  });

  it('refuses a ratio ≤ 1, mismatched lengths and parents out of range', () => {
    const { coarse, fine, parents } = ladder(2, 2, 0.5, 2, () => 1);
    expect(() => localOrders(coarse, fine, parents, 1)).toThrow(RungsInputError);
    expect(() => localOrders(coarse, fine, parents.subarray(1), 2)).toThrow(/parents/);
    expect(() => localOrders(coarse, fine, Int32Array.from(parents, () => 5), 2)).toThrow(/not a coarse cell/);
    expect(() => localOrders(coarse, fine, parents, 2, 1)).toThrow(/threshold/);
  });
});

describe('summarizeLocalOrders', () => {
  it('weighted quantiles: the smallest order whose cumulative measure reaches q of the covered measure (worked by hand)', () => {
    // Orders 1, 2, 3 on cells of equal measure and one cell without an order: covered 3/4; median at cumulative 1.5
    // of 3 → the second cell (2); 5% → the first (1); 95% at 2.85 → the third (3). Against 2 ± 0.1: one third below,
    // one third above.
    const s = summarizeLocalOrders(Float64Array.of(3, 1, Number.NaN, 2), Float64Array.of(1, 1, 1, 1), 2, 0.1)!;
    expect(s).toEqual({ covered: 0.75, p05: 1, median: 2, p95: 3, below: 1 / 3, above: 1 / 3, expected: 2, tolerance: 0.1 });
    // Weights, not counts: a cell of measure 3 with order 1 beside one of measure 1 with order 2 puts the median at 1.
    expect(summarizeLocalOrders(Float64Array.of(2, 1), Float64Array.of(1, 3), null, 0.1)).toMatchObject({ median: 1, below: null, above: null });
  });

  it('a strip of order 1 along the top of a mesh of order 2 (1/8 of the area): the shares are the strip\'s area', () => {
    // 'crossed' triangles on the unit square, 8 → 16 per side; cells whose centroid lies above y = 7/8 carry
    // density h^1, the others h^2, so their local orders are exactly 1 and 2 (closed form as in `ladder` above).
    const coarse = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 8, ny: 8, cells: 'triangles', diagonal: 'crossed' });
    const fine = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 16, ny: 16, cells: 'triangles', diagonal: 'crossed' });
    const measures = (m: typeof coarse) => {
      const a = new Float64Array(m.nCells);
      for (let c = 0; c < m.nCells; c++) a[c] = 1 / m.nCells;
      return a;
    };
    const top = (m: typeof coarse, c: number) => {
      let y = 0;
      for (let k = 0; k < 3; k++) y += m.coords[2 * m.cells[3 * c + k]! + 1]! / 3;
      return y > 7 / 8;
    };
    const perCell = (m: typeof coarse, h: number) => {
      const a = new Float64Array(m.nCells);
      for (let c = 0; c < m.nCells; c++) a[c] = h ** (top(m, c) ? 2 : 4) / m.nCells;
      return a;
    };
    const nest = parentCells(coarse, fine);
    expect(nest.nested).toBe(true);
    const orders = localOrders(perCell(coarse, 1 / 8), perCell(fine, 1 / 16), nest.parent, 2);
    const s = summarizeLocalOrders(orders, measures(coarse), 2, 0.1)!;
    expect(s.covered).toBe(1);
    expect(s.median).toBeCloseTo(2, 12);
    expect(s.p05).toBeCloseTo(1, 12);
    expect(s.below).toBeCloseTo(1 / 8, 12);
    expect(s.above).toBe(0);
  });

  it('null when no cell has an order; refuses measures of another length', () => {
    expect(summarizeLocalOrders(Float64Array.of(Number.NaN), Float64Array.of(1), 2, 0.1)).toBeNull();
    expect(() => summarizeLocalOrders(Float64Array.of(1, 2), Float64Array.of(1), 2, 0.1)).toThrow(RungsInputError);
  });
});

describe('stableOrder', () => {
  it("is the order of JavaScript's stable sort (ECMAScript 2019, Array.prototype.sort) by value, -0 equal to +0", () => {
    const random = mulberry32(7);
    const specials = [0, -0, 5e-324, -5e-324, Number.MAX_VALUE, -Number.MAX_VALUE, 1, -1, 2 ** -1074 * 3];
    const bad: number[] = [];
    for (const n of [1, 2, 17, 1000, 70_000]) {
      const values = Float64Array.from({ length: n }, (_, i) => (i % 7 === 0 ? specials[Math.floor(random() * specials.length)]!
        : i % 3 === 0 ? Math.floor(random() * 9) - 4 : (random() - 0.5) * 10 ** Math.floor(random() * 40 - 20)));
      const expected = Array.from({ length: n }, (_, i) => i).sort((a, b) => (values[a]! < values[b]! ? -1 : values[a]! > values[b]! ? 1 : 0));
      const got = stableOrder(values);
      if (expected.some((v, k) => got[k] !== v)) bad.push(n);
    }
    expect(bad).toEqual([]);
  });
});

describe('weightedQuantiles', () => {
  it('gives the bits of simple-statistics\' weightedQuantile (the reference definition) on 2,000 seeded cases with ties, -0 and zero weights', () => {
    const random = mulberry32(20261203);
    const ps = [0, 0.05, 0.25, 0.5, 0.75, 0.95, 1];
    const mismatches: string[] = [];
    for (let t = 0; t < 2000; t++) {
      const n = 1 + Math.floor(random() * 60);
      // Few distinct values (many ties) in half the cases; signed zeros and zero weights now and then.
      const distinct = t % 2 === 0 ? 1 + Math.floor(random() * 5) : 0;
      const values = Float64Array.from({ length: n }, () => {
        const v = distinct ? Math.floor(random() * distinct) * 0.37 - 0.74 : (random() - 0.5) * 10 ** Math.floor(random() * 6 - 3);
        return v === 0 && random() < 0.5 ? -0 : v;
      });
      const weights = Float64Array.from({ length: n }, () => (random() < 0.1 ? 0 : random() * 10 ** Math.floor(random() * 4 - 2)));
      if (!weights.some((w) => w > 0)) weights[0] = 1;
      const ours = weightedQuantiles(values, weights, ps);
      const theirs = weightedQuantile(Array.from(values), Array.from(weights), ps) as number[];
      if (ours.some((v, i) => !Object.is(v, theirs[i]))) mismatches.push(`case ${t}: ${ours} vs ${theirs}`);
    }
    expect(mismatches.slice(0, 5)).toEqual([]);
  });

  it('refuses empty input, lengths that differ, negative weights, non-finite values and p outside [0, 1]', () => {
    expect(() => weightedQuantiles(new Float64Array(0), new Float64Array(0), [0.5])).toThrow(RungsInputError);
    expect(() => weightedQuantiles(Float64Array.of(1), Float64Array.of(1, 2), [0.5])).toThrow(/as many weights as values/);
    expect(() => weightedQuantiles(Float64Array.of(1), Float64Array.of(-1), [0.5])).toThrow(/non-negative/);
    expect(() => weightedQuantiles(Float64Array.of(Number.NaN), Float64Array.of(1), [0.5])).toThrow(/finite/);
    expect(() => weightedQuantiles(Float64Array.of(1), Float64Array.of(0), [0.5])).toThrow(/positive weight/);
    expect(() => weightedQuantiles(Float64Array.of(1), Float64Array.of(1), [1.5])).toThrow(/\[0, 1\]/);
  });
});
