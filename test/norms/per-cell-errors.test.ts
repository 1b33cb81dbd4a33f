import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { interpolateVector, vectorLagrangeField } from '../../src/fem/field/vector-field.ts';
import { errorNormsOf, type ErrorOptions, type PerCellErrors } from '../../src/norms/errors.ts';
import { fieldErrors, type FieldErrorOptions } from '../../src/norms/field-errors.ts';
import type { DiscreteField, ExactField, ExactSolution } from '../../src/norms/types.ts';
import { manufacture } from '../../src/equation/index.ts';
import { RungsInputError } from '../../src/errors.ts';

// Error densities per cell (opts.perCell): the totals must keep their bits when they are asked for, the cells must
// add up to the totals, and each cell's value must be the integral over that cell.

const perCellFor = (mesh: Mesh): PerCellErrors => ({ L2: new Float64Array(mesh.nCells).fill(NaN), H1semi: new Float64Array(mesh.nCells).fill(NaN) });

/** Σ a in cell order. */
const sum = (a: Float64Array) => { let s = 0; for (let i = 0; i < a.length; i++) s += a[i]; return s; };

/** The interpolant of u on `mesh` in P_degree, and a copy nudged node by node (a stand-in for a discrete solution
 *  whose error is not the interpolation error). */
function scalarFields(mesh: Mesh, degree: number, u: ExactSolution['u'], n: number): DiscreteField[] {
  const sp = lagrangeSpace(mesh, degree);
  const ih = interpolate(sp, u);
  const out = [lagrangeField(sp, ih.map((v, i) => v + 1e-3 * Math.sin(3 * i)))];
  if (n > 1) out.push(lagrangeField(sp, ih));
  if (n > 2) out.push(lagrangeField(sp, ih.map((v, i) => v - 2e-3 * Math.cos(i))));
  return out;
}

/** Object.is on every number of two lists of norm records (bit equality, NaN equal to NaN). */
function sameBits(a: object[], b: object[]): string[] {
  const diffs: string[] = [];
  a.forEach((r, i) => {
    for (const [key, v] of Object.entries(r)) {
      const w = (b[i] as Record<string, unknown>)[key];
      if (!Object.is(v, w)) diffs.push(`field ${i} ${key}: ${String(v)} vs ${String(w)}`);
    }
  });
  return diffs;
}

const square = (cells: 'triangles' | 'quadrilaterals', n: number) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells });
const cube = (cells: 'tetrahedra' | 'hexahedra', n: number) => boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: n, ny: n, nz: n, cells });

describe('errorNormsOf with perCell', () => {
  const u2 = manufacture({ dim: 2, u: 'exp(x) * sin(2*y) + x*y' });
  const u3 = manufacture({ dim: 3, u: 'sin(x + 2*y) * cos(z) + x*z' });
  const u1 = manufacture({ dim: 1, u: 'sin(3*x) + x^2' });
  const k = (x: number, y: number) => 1 + x * y, c = (x: number) => 2 + x;
  // Every path of errorNormsOf: the unrolled 2D affine path (one or two fields), the unrolled 3D affine path, and the
  // general loop (more than two fields, bilinear and trilinear cells, intervals).
  const cases: { name: string; mesh: () => Mesh; degree: number; u: ExactSolution; nf: number; opts?: ErrorOptions }[] = [
    { name: '2D P1 triangles, one field', mesh: () => square('triangles', 9), degree: 1, u: u2, nf: 1 },
    { name: '2D P1 triangles, solution and interpolant, k and c', mesh: () => square('triangles', 9), degree: 1, u: u2, nf: 2, opts: { k, c } },
    { name: '2D P2 perturbed triangles, solution and interpolant', mesh: () => perturbMesh(square('triangles', 6), { fraction: 0.3, seed: 3 }), degree: 2, u: u2, nf: 2 },
    { name: '2D P2 triangles, three fields (general loop)', mesh: () => square('triangles', 5), degree: 2, u: u2, nf: 3, opts: { k } },
    { name: '2D Q1 perturbed quadrilaterals (general loop)', mesh: () => perturbMesh(square('quadrilaterals', 6), { fraction: 0.3, seed: 5 }), degree: 1, u: u2, nf: 2 },
    { name: '3D P1 Kuhn tetrahedra, solution and interpolant', mesh: () => cube('tetrahedra', 3), degree: 1, u: u3, nf: 2, opts: { k, c } },
    { name: '3D P2 Kuhn tetrahedra, one field', mesh: () => cube('tetrahedra', 2), degree: 2, u: u3, nf: 1 },
    { name: '3D Q1 hexahedra (general loop)', mesh: () => cube('hexahedra', 2), degree: 1, u: u3, nf: 2 },
    { name: '1D P3 interval (general loop)', mesh: () => intervalMesh(0, 2, 7), degree: 3, u: u1, nf: 2 },
  ];
  for (const { name, mesh: make, degree, u, nf, opts = {} } of cases) {
    it(`${name}: the totals keep their bits and the cells add up to them`, () => {
      const mesh = make();
      const fields = scalarFields(mesh, degree, u.u, nf);
      const plain = errorNormsOf(fields, u, opts);
      const perCell = perCellFor(mesh);
      const withCells = errorNormsOf(fields, u, { ...opts, perCell });
      // The totals are summed in the same order with the same operands with or without perCell (the per-cell sums
      // are extra locals), so equal bits are required, not closeness (common practice, no source).
      expect(sameBits(plain, withCells)).toEqual([]);
      // Σ_K ∫_K |e|² = ∫_Ω |e|² (additivity of the integral over a partition, common practice, no source); the two
      // sides are summed in different orders, so they agree to round-off only: relative 1e-12.
      expect(perCell.L2.every((v) => Number.isFinite(v) && v >= 0)).toBe(true);
      expect(perCell.H1semi.every((v) => Number.isFinite(v) && v >= 0)).toBe(true);
      expect(Math.abs(sum(perCell.L2) / plain[0].L2 ** 2 - 1)).toBeLessThan(1e-12);
      expect(Math.abs(sum(perCell.H1semi) / plain[0].H1semi ** 2 - 1)).toBeLessThan(1e-12);
    });
  }

  // u = x, u_h = 0, so e = x and ∇e = (1, 0). On the unit square cut by its diagonal from (0,0) to (1,1) into
  // T1 = (0,0),(1,0),(1,1) and T2 = (0,0),(1,1),(0,1) (exact integrals, by hand): ∫_T1 x² = ∫₀¹ x · x² dx = 1/4,
  // ∫_T2 x² = ∫₀¹ (1 − x) x² dx = 1/12 (together ∫_[0,1]² x² = 1/3); ∫_T |∇e|² = |T| = 1/2 each.
  const xField: ExactSolution = { u: (x) => x, grad: (_x, _y, _z, out) => { out[0] = 1; out[1] = 0; out[2] = 0; } };
  it('u = x on the unit square in two triangles: ∫_K x² per triangle by hand', () => {
    const mesh = square('triangles', 1);
    expect(mesh.nCells).toBe(2);
    const perCell = perCellFor(mesh);
    errorNormsOf([zeroOn(mesh)], xField, { perCell });
    const got: string[] = [];
    for (let cell = 0; cell < 2; cell++) {
      // The triangle with its centroid at x = 2/3 is T1, the one at x = 1/3 is T2.
      const expected = centroidX(mesh, cell) > 0.5 ? 1 / 4 : 1 / 12;
      if (Math.abs(perCell.L2[cell] - expected) > 1e-15) got.push(`L2 cell ${cell}: ${perCell.L2[cell]} vs ${expected}`);
      if (Math.abs(perCell.H1semi[cell] - 0.5) > 1e-15) got.push(`H1 cell ${cell}: ${perCell.H1semi[cell]} vs 0.5`);
    }
    expect(got).toEqual([]);
  });

  // On any simplex K in n dimensions with vertices v_0..v_n, ∫_K λ_i λ_j = |K| (1 + δ_ij) / ((n + 1)(n + 2))
  // (integral of barycentric monomials, exact, by hand), so ∫_K x² = |K| / ((n + 1)(n + 2)) (Σ x_i² + (Σ x_i)²) with
  // x_i the vertices' x coordinates (x = Σ x_i λ_i).
  it('u = x on 4 × 4 squares in triangles and on Kuhn tetrahedra: ∫_K x² per simplex in closed form', () => {
    for (const mesh of [perturbMesh(square('triangles', 4), { fraction: 0.3, seed: 2 }), cube('tetrahedra', 2)]) {
      const perCell = perCellFor(mesh);
      errorNormsOf([zeroOn(mesh)], xField, { perCell });
      const bad: string[] = [];
      for (let cell = 0; cell < mesh.nCells; cell++) {
        const { volume, xs } = simplex(mesh, cell);
        const n = mesh.dim;
        const s1 = xs.reduce((a, b) => a + b, 0), s2 = xs.reduce((a, b) => a + b * b, 0);
        const l2 = volume / ((n + 1) * (n + 2)) * (s2 + s1 * s1);
        if (Math.abs(perCell.L2[cell] - l2) > 1e-14 * Math.max(l2, 1e-3)) bad.push(`${mesh.cellKind} ${cell} L2 ${perCell.L2[cell]} vs ${l2}`);
        if (Math.abs(perCell.H1semi[cell] - volume) > 1e-14) bad.push(`${mesh.cellKind} ${cell} H1 ${perCell.H1semi[cell]} vs ${volume}`);
      }
      expect(bad).toEqual([]);
    }
  });

  it('refuses perCell with a cell stride and arrays of the wrong length', () => {
    const mesh = square('triangles', 4);
    const fields = scalarFields(mesh, 1, u2.u, 1);
    expect(() => errorNormsOf(fields, u2, { cellStride: 3, perCell: perCellFor(mesh) })).toThrow(RungsInputError);
    expect(() => errorNormsOf(fields, u2, { cellStride: 3, perCell: perCellFor(mesh) })).toThrow(/cellStride = 3/);
    expect(() => errorNormsOf(fields, u2, { perCell: { L2: new Float64Array(3), H1semi: new Float64Array(mesh.nCells) } }))
      .toThrow(/perCell\.L2 must be a Float64Array of length nCells = 32, got a Float64Array of length 3/);
  });
});

describe('fieldErrors with perCell', () => {
  const vec2: ExactField = {
    components: 2,
    value(x, y, _z, out) { out[0] = Math.sin(x + y); out[1] = x * Math.exp(y); },
    grad(x, y, _z, out) { const cs = Math.cos(x + y); out[0] = cs; out[1] = cs; out[2] = Math.exp(y); out[3] = x * Math.exp(y); },
  };
  const vec3: ExactField = {
    components: 3,
    value(x, y, z, out) { out[0] = x * y; out[1] = Math.sin(z); out[2] = y * z + x; },
    grad(x, y, z, out) { out.fill(0, 0, 9); out[0] = y; out[1] = x; out[5] = Math.cos(z); out[6] = 1; out[7] = z; out[8] = y; },
  };
  const scalar: ExactField = {
    components: 1,
    value(x, y, _z, out) { out[0] = Math.cos(2 * x) * y + 3; },
    grad(x, y, _z, out) { out[0] = -2 * Math.sin(2 * x) * y; out[1] = Math.cos(2 * x); },
  };
  const elasticity = { lambda: () => 2, mu: (x: number) => 1 + x };
  function vectorFields(mesh: Mesh, degree: number, u: ExactField): DiscreteField[] {
    const sp = lagrangeSpace(mesh, degree), nc = u.components;
    const buf = new Float64Array(Math.max(nc, 3));
    const ih = interpolateVector(sp, nc, (x, y, z, out) => { u.value(x, y, z, buf); for (let i = 0; i < nc; i++) out[i] = buf[i]; });
    return [vectorLagrangeField(sp, nc, ih.map((v, i) => v + 1e-3 * Math.sin(5 * i))), vectorLagrangeField(sp, nc, ih)];
  }
  const cases: { name: string; mesh: () => Mesh; degree: number; u: ExactField; opts: FieldErrorOptions }[] = [
    { name: 'vector P2 on triangles, divergence and elastic energy', mesh: () => square('triangles', 6), degree: 2, u: vec2, opts: { divergence: true, elasticity } },
    { name: 'vector P1 on Kuhn tetrahedra', mesh: () => cube('tetrahedra', 3), degree: 1, u: vec3, opts: { divergence: true } },
    { name: 'vector Q1 on perturbed quadrilaterals', mesh: () => perturbMesh(square('quadrilaterals', 5), { fraction: 0.3, seed: 8 }), degree: 1, u: vec2, opts: {} },
    { name: 'scalar P1 on triangles (a field of one component)', mesh: () => square('triangles', 8), degree: 1, u: scalar, opts: {} },
  ];
  for (const { name, mesh: make, degree, u, opts } of cases) {
    it(`${name}: the totals keep their bits and the cells add up to them`, () => {
      const mesh = make();
      const fields = vectorFields(mesh, degree, u);
      const plain = fieldErrors(fields, u, opts);
      const perCell = perCellFor(mesh);
      const withCells = fieldErrors(fields, u, { ...opts, perCell });
      expect(sameBits(plain, withCells)).toEqual([]); // same operations in the same order (common practice, no source)
      // The cells' sums are the very numbers added to the totals, in cell order: additivity of the integral
      // (common practice, no source), relative 1e-12 (here it holds with equal bits as well).
      expect(Math.abs(sum(perCell.L2) / plain[0].L2 ** 2 - 1)).toBeLessThan(1e-12);
      expect(Math.abs(sum(perCell.H1semi) / plain[0].H1semi ** 2 - 1)).toBeLessThan(1e-12);
    });
  }

  it('mean-free: the cells hold ∫_K (e − ē)² of the second pass, and add up to the total', () => {
    const mesh = square('triangles', 6);
    const fields = vectorFields(mesh, 2, scalar);
    const plain = fieldErrors(fields, scalar, { meanFree: true });
    const perCell = perCellFor(mesh);
    const withCells = fieldErrors(fields, scalar, { meanFree: true, perCell });
    expect(sameBits(plain, withCells)).toEqual([]);
    // Σ_K ∫_K (e − ē)² = ∫_Ω (e − ē)²: the total subtracts (Σ w (e − ē))²/|Ω| as well, zero in exact arithmetic
    // (Chan, Golub & LeVeque 1983, two-pass algorithm), so the two agree to round-off.
    expect(Math.abs(sum(perCell.L2) / plain[0].L2 ** 2 - 1)).toBeLessThan(1e-12);
    expect(Math.abs(sum(perCell.H1semi) / plain[0].H1semi ** 2 - 1)).toBeLessThan(1e-12);
  });

  // u = (x, 0), u_h = 0 on the unit square in two triangles: the same hand integrals as the scalar case
  // (∫_T1 x² = 1/4, ∫_T2 x² = 1/12, ∫_T |∇e|² = |T| = 1/2; exact integrals, by hand). Mean-free, ē = (1/2, 0) and
  // ∫_T (x − 1/2)² = 1/24 on both (T1: ∫₀¹ x (x − 1/2)² dx = 1/4 − 1/3 + 1/8 = 1/24; T2: ∫₀¹ (1 − x)(x − 1/2)² dx
  // = 1/12 − 1/24 = 1/24; exact integrals, by hand).
  it('u = (x, 0) on two triangles, plain and mean-free: per-cell integrals by hand', () => {
    const mesh = square('triangles', 1);
    const u: ExactField = {
      components: 2,
      value(x, _y, _z, out) { out[0] = x; out[1] = 0; },
      grad(_x, _y, _z, out) { out[0] = 1; out[1] = 0; out[2] = 0; out[3] = 0; },
    };
    const zero = vectorLagrangeField(lagrangeSpace(mesh, 1), 2, new Float64Array(8));
    const plain = perCellFor(mesh), centred = perCellFor(mesh);
    fieldErrors([zero], u, { perCell: plain });
    fieldErrors([zero], u, { perCell: centred, meanFree: true });
    const bad: string[] = [];
    for (let cell = 0; cell < 2; cell++) {
      const expected = centroidX(mesh, cell) > 0.5 ? 1 / 4 : 1 / 12;
      if (Math.abs(plain.L2[cell] - expected) > 1e-15) bad.push(`L2 ${cell}: ${plain.L2[cell]} vs ${expected}`);
      if (Math.abs(centred.L2[cell] - 1 / 24) > 1e-15) bad.push(`mean-free L2 ${cell}: ${centred.L2[cell]} vs 1/24`);
      for (const p of [plain, centred]) if (Math.abs(p.H1semi[cell] - 0.5) > 1e-15) bad.push(`H1 ${cell}: ${p.H1semi[cell]} vs 0.5`);
    }
    expect(bad).toEqual([]);
  });

  it('refuses perCell with a cell stride', () => {
    const mesh = square('triangles', 4);
    expect(() => fieldErrors(vectorFields(mesh, 1, vec2), vec2, { cellStride: 2, perCell: perCellFor(mesh) }))
      .toThrow(/fieldErrors: opts\.perCell cannot be combined with cellStride = 2/);
  });
});

/** A field of degree 1 that is zero everywhere (values and gradients). */
function zeroOn(mesh: Mesh): DiscreteField {
  return { mesh, nDofs: 0, degree: 1, evaluate(_c, _p, n, v, g) { v.fill(0, 0, n); g.fill(0); } };
}

function centroidX(mesh: Mesh, cell: number): number {
  let s = 0;
  for (let i = 0; i < mesh.verticesPerCell; i++) s += mesh.coords[mesh.cells[cell * mesh.verticesPerCell + i] * mesh.dim];
  return s / mesh.verticesPerCell;
}

/** Volume (|det| / n!) and vertex x coordinates of a simplex. */
function simplex(mesh: Mesh, cell: number): { volume: number; xs: number[] } {
  const { dim, coords, cells, verticesPerCell: vpc } = mesh;
  const p = (i: number, d: number) => coords[cells[cell * vpc + i] * dim + d];
  const e = (i: number, d: number) => p(i, d) - p(0, d);
  const xs = Array.from({ length: vpc }, (_, i) => p(i, 0));
  if (dim === 2) return { volume: Math.abs(e(1, 0) * e(2, 1) - e(1, 1) * e(2, 0)) / 2, xs };
  const det = e(1, 0) * (e(2, 1) * e(3, 2) - e(2, 2) * e(3, 1)) - e(1, 1) * (e(2, 0) * e(3, 2) - e(2, 2) * e(3, 0)) + e(1, 2) * (e(2, 0) * e(3, 1) - e(2, 1) * e(3, 0));
  return { volume: Math.abs(det) / 6, xs };
}
