import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { interpolateVector, vectorLagrangeField } from '../../src/fem/field/vector-field.ts';
import { errorNormsOf } from '../../src/norms/errors.ts';
import { exactFieldNorms, fieldErrors } from '../../src/norms/field-errors.ts';
import type { DiscreteField, ExactField, ExactSolution } from '../../src/norms/types.ts';
import { RungsInputError } from '../../src/errors.ts';
import { boxMesh } from '../../src/mesh/box.ts';

/** The unit cube in 2 × 2 × 2 boxes, each cut into six Kuhn tetrahedra. */
const kuhnCube = () => boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 2, ny: 2, nz: 2, cells: 'tetrahedra' });

/** An exact field from plain functions (u and its Jacobian rows ∂u_i/∂x_d, written by hand). */
function field(nc: number, u: (x: number, y: number, z: number) => number[], g: (x: number, y: number, z: number) => number[][]): ExactField {
  return {
    components: nc,
    value(x, y, z, out) { const v = u(x, y, z); for (let i = 0; i < nc; i++) out[i] = v[i]; },
    grad(x, y, z, out) {
      const r = g(x, y, z), dim = r[0].length;
      for (let i = 0; i < nc; i++) for (let d = 0; d < dim; d++) out[i * dim + d] = r[i][d];
    },
  };
}

/** The zero field of a vector Lagrange space (so it has nodes) with nc components. */
function zeroOf(mesh: Mesh, degree: number, nc: number): DiscreteField {
  const sp = lagrangeSpace(mesh, degree);
  return vectorLagrangeField(sp, nc, new Float64Array(sp.nDofs * nc));
}

const unitSquare = (cells: 'triangles' | 'quadrilaterals', n = 4) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells });
const unitCube = (n = 2) => boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: n, ny: n, nz: n, cells: 'hexahedra' });
const bentCube = () => perturbMesh(unitCube(3), { fraction: 0.2, seed: 4 });
const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('fieldErrors of the zero field are closed-form integrals of u', () => {
  // u = (xy, x² − y) on [0,1]², μ = 1 + x, λ = 2. Integrals by hand (Fubini, monomials ∫₀¹ xⁿ = 1/(n+1)):
  //   ‖u‖² = ∫x²y² + ∫(x² − y)² = 1/9 + (1/5 − 1/3 + 1/3) = 14/45
  //   |u|²_H1 = ∫(y² + x²) + ∫(4x² + 1) = 2/3 + 7/3 = 3
  //   ∇·u = y − 1: ∫(y − 1)² = 1/3
  //   ε(u) = [[y, 3x/2], [3x/2, −1]], ε:ε = y² + 1 + 9x²/2; ∫(1 + x) ε:ε = 17/6 + (1/6 + 1/2 + 9/8) = 37/8
  //   energy² = 2 · 37/8 + 2 · 1/3 = 119/12
  //   means ū = (1/4, 1/3 − 1/2 = −1/6): ‖u − ū‖² = (1/9 − 1/16) + (1/5 − 1/36) = 53/240
  //   largest |u_i| over grid nodes: 1 (at the corners (1,1) and (1,0)).
  const u2 = field(2, (x, y) => [x * y, x * x - y], (x, y) => [[y, x], [2 * x, -1]]);
  const elasticity = { lambda: () => 2, mu: (x: number) => 1 + x };
  const meshes: [string, () => Mesh][] = [
    ['triangles', () => unitSquare('triangles')],
    ['rectangles', () => unitSquare('quadrilaterals')],
    // Bilinear cells: the pulled-back integrands are still polynomials the default rule integrates exactly
    // (per-variable degree ≤ 5 against a rule exact to 6).
    ['bent quadrilaterals', () => perturbMesh(unitSquare('quadrilaterals'), { fraction: 0.3, seed: 11 })],
  ];
  for (const [name, make] of meshes) {
    it(`on the unit square, ${name}`, () => {
      const mesh = make();
      const [e] = fieldErrors([zeroOf(mesh, 1, 2)], u2, { divergence: true, elasticity });
      // Exact quadrature: only round-off remains (common practice, no source).
      expect(rel(e.L2, Math.sqrt(14 / 45))).toBeLessThan(1e-12);
      expect(rel(e.H1semi, Math.sqrt(3))).toBeLessThan(1e-12);
      expect(rel(e.H1, Math.sqrt(14 / 45 + 3))).toBeLessThan(1e-12);
      expect(rel(e.div!, Math.sqrt(1 / 3))).toBeLessThan(1e-12);
      expect(rel(e.energy!, Math.sqrt(119 / 12))).toBeLessThan(1e-12);
      expect(e.maxNodal).toBe(1);
      const [m] = fieldErrors([zeroOf(mesh, 1, 2)], u2, { meanFree: true });
      expect(rel(m.L2, Math.sqrt(53 / 240))).toBeLessThan(1e-12);
      expect(rel(m.H1, Math.sqrt(53 / 240 + 3))).toBeLessThan(1e-12);
      expect(m.div).toBeUndefined();
    });
  }

  it('of a scalar field with mean removed: u = x² − y, ‖u − ū‖² = 1/5 − 1/36 = 31/180 (by hand)', () => {
    const mesh = unitSquare('triangles', 3);
    const u = field(1, (x, y) => [x * x - y], (x) => [[2 * x, -1]]);
    const [m] = fieldErrors([zeroOf(mesh, 2, 1)], u, { meanFree: true });
    expect(rel(m.L2, Math.sqrt(31 / 180))).toBeLessThan(1e-12);
    // ū = 1/3 − 1/2 = −1/6; u ranges over [−1, 1] with the extremes at the nodes (0,1) and (1,0), so the largest
    // |u − ū| at a node is 1 + 1/6 = 7/6 (by hand).
    expect(rel(m.maxNodal, 7 / 6)).toBeLessThan(1e-14);
  });

  // u = (xy, yz, zx) on [0,1]³, μ = 1 + z, λ = 1. By hand:
  //   ‖u‖² = 3 · 1/9 = 1/3;  |u|²_H1 = 3 · 2/3 = 2;  ∇·u = x + y + z: ∫(x+y+z)² = 3/3 + 6/4 = 5/2
  //   ε:ε = x² + y² + z² + (x² + y² + z²)/2 = 3/2 (x² + y² + z²); ∫(1 + z) ε:ε = 3/2 (1 + 1/6 + 1/6 + 1/4) = 19/8
  //   energy² = 2 · 19/8 + 5/2 = 29/4;  ‖u − ū‖² = 3 (1/9 − 1/16) = 7/48;  largest |u_i| at nodes: 1.
  const u3 = field(3, (x, y, z) => [x * y, y * z, z * x], (x, y, z) => [[y, x, 0], [0, z, y], [z, 0, x]]);
  const cubes: [string, () => Mesh][] = [
    ['tetrahedra', () => kuhnCube()],
    ['hexahedra', () => unitCube()],
    // Trilinear cells: pulled back, the integrands have per-variable degree ≤ 6, which the default rule
    // (Gauss, exact to 6 per variable) integrates exactly.
    ['bent hexahedra', bentCube],
  ];
  for (const [name, make] of cubes) {
    it(`on the unit cube, ${name}`, () => {
      const mesh = make();
      const [e] = fieldErrors([zeroOf(mesh, 1, 3)], u3, { divergence: true, elasticity: { lambda: () => 1, mu: (_x, _y, z) => 1 + z } });
      expect(rel(e.L2, Math.sqrt(1 / 3))).toBeLessThan(1e-12);
      expect(rel(e.H1semi, Math.SQRT2)).toBeLessThan(1e-12);
      expect(rel(e.div!, Math.sqrt(5 / 2))).toBeLessThan(1e-12);
      expect(rel(e.energy!, Math.sqrt(29 / 4))).toBeLessThan(1e-12);
      expect(e.maxNodal).toBe(1);
      const [m] = fieldErrors([zeroOf(mesh, 1, 3)], u3, { meanFree: true });
      expect(rel(m.L2, Math.sqrt(7 / 48))).toBeLessThan(1e-12);
    });
  }

  it('of a trigonometric field: u = (sin πx sin πy, cos πx), ‖u‖² = 1/4 + 1/2, |u|²_H1 = π²/2 + π²/2 (by hand)', () => {
    // ∫∫ sin²πx sin²πy = 1/4; ∫ cos²πx = 1/2; |∇u₁|² integrates to 2 · π²/4, |∇u₂|² = π² sin²πx to π²/2.
    // Not a polynomial, so the rule is not exact in general: a looser 1e-9 on 16 × 16 cells with a rule of degree 8.
    const mesh = unitSquare('triangles', 16);
    const P = Math.PI;
    const u = field(2, (x, y) => [Math.sin(P * x) * Math.sin(P * y), Math.cos(P * x)],
      (x, y) => [[P * Math.cos(P * x) * Math.sin(P * y), P * Math.sin(P * x) * Math.cos(P * y)], [-P * Math.sin(P * x), 0]]);
    const e = exactFieldNorms(mesh, u, { degree: 8 });
    expect(rel(e.L2, Math.sqrt(3 / 4))).toBeLessThan(1e-9);
    expect(rel(e.H1semi, P)).toBeLessThan(1e-9);
  });
});

describe('fieldErrors of an interpolant of a polynomial of the space degree vanish', () => {
  // The Lagrange space holds the polynomial, so I_h u = u and every norm of u − I_h u is 0 (Ciarlet 1978, §2.2;
  // on bilinear quadrilaterals and trilinear hexahedra Q2 still holds P2: x ↦ x_i x_j is a product of two
  // (bi/tri)linear maps). Measured against the norm of u itself, to round-off.
  const cases: { name: string; mesh: () => Mesh; degree: number; u: ExactField }[] = [
    { name: 'P1 triangles', mesh: () => unitSquare('triangles'), degree: 1, u: field(2, (x, y) => [1 + 2 * x - 3 * y, 0.5 - x + 4 * y], () => [[2, -3], [-1, 4]]) },
    { name: 'P2 triangles', mesh: () => unitSquare('triangles'), degree: 2, u: field(2, (x, y) => [x * x - x * y + y, 2 * y * y + x * y - x], (x, y) => [[2 * x - y, 1 - x], [y - 1, 4 * y + x]]) },
    { name: 'Q1 rectangles', mesh: () => unitSquare('quadrilaterals'), degree: 1, u: field(2, (x, y) => [x * y + 1, x - 2 * x * y], (x, y) => [[y, x], [1 - 2 * y, -2 * x]]) },
    { name: 'Q2 bent quadrilaterals', mesh: () => perturbMesh(unitSquare('quadrilaterals'), { fraction: 0.3, seed: 3 }), degree: 2, u: field(2, (x, y) => [x * x - x * y + y, 2 * y * y + x * y - x], (x, y) => [[2 * x - y, 1 - x], [y - 1, 4 * y + x]]) },
    { name: 'P1 tetrahedra', mesh: () => kuhnCube(), degree: 1, u: field(3, (x, y, z) => [1 + x - z, 2 * y + z, x + y + 3 * z], () => [[1, 0, -1], [0, 2, 1], [1, 1, 3]]) },
    { name: 'P2 tetrahedra', mesh: () => kuhnCube(), degree: 2, u: field(3, (x, y, z) => [x * y, y * z - x, z * z + x * x], (x, y, z) => [[y, x, 0], [-1, z, y], [2 * x, 0, 2 * z]]) },
    { name: 'Q1 hexahedra (trilinear field on boxes)', mesh: () => unitCube(), degree: 1, u: field(3, (x, y, z) => [x * y * z, 1 - y * z, x + x * z], (x, y, z) => [[y * z, x * z, x * y], [0, -z, -y], [1 + z, 0, x]]) },
    { name: 'Q2 bent hexahedra', mesh: bentCube, degree: 2, u: field(3, (x, y, z) => [x * y, y * z - x, z * z + x * x], (x, y, z) => [[y, x, 0], [-1, z, y], [2 * x, 0, 2 * z]]) },
  ];
  for (const { name, mesh: make, degree, u } of cases) {
    it(name, () => {
      const mesh = make();
      const nc = u.components;
      const sp = lagrangeSpace(mesh, degree);
      const ih = vectorLagrangeField(sp, nc, interpolateVector(sp, nc, u.value));
      const elasticity = { lambda: () => 3, mu: (x: number) => 1 + x };
      const opts = { divergence: true, elasticity };
      const [e] = fieldErrors([ih], u, opts);
      const [m] = fieldErrors([ih], u, { meanFree: true });
      const s = exactFieldNorms(mesh, u, { ...opts, degree: 2 * degree + 4 });
      const sm = exactFieldNorms(mesh, u, { meanFree: true, degree: 2 * degree + 4 });
      expect(e.L2 / s.L2).toBeLessThan(1e-12);
      expect(e.H1semi / s.H1semi).toBeLessThan(1e-12);
      expect(e.H1 / s.H1).toBeLessThan(1e-12);
      expect(e.div! / s.div!).toBeLessThan(1e-12);
      expect(e.energy! / s.energy!).toBeLessThan(1e-12);
      expect(m.L2 / sm.L2).toBeLessThan(1e-12);
      expect(e.maxNodal).toBeLessThan(1e-14);
    });
  }
});

describe('fieldErrors: exact facts of divergence and strain', () => {
  it('a divergence-free u gives div = 0 for the zero field, with L2 > 0', () => {
    // u = (x², −2xy): ∇·u = 2x − 2x = 0 identically (by hand).
    const u = field(2, (x, y) => [x * x, -2 * x * y], (x, y) => [[2 * x, 0], [-2 * y, -2 * x]]);
    const [e] = fieldErrors([zeroOf(unitSquare('triangles'), 1, 2)], u, { divergence: true });
    expect(e.div!).toBeLessThan(1e-14 * e.H1semi);
    expect(e.L2).toBeGreaterThan(0.1);
  });

  it('a rigid-body motion has zero energy norm but not zero H1 seminorm (2D and 3D)', () => {
    // u = (−y, x): ∇u = [[0, −1], [1, 0]] is skew, so ε(u) = 0 and ∇·u = 0; |∇u|² = 2 on the unit square, so
    // |u|_H1 = √2 (by hand). In 3D u = (−y, x − z, y): ∇u skew with four entries ±1, |u|_H1 = 2 on the unit cube.
    const mu = (x: number) => 1 + x, lambda = () => 2;
    const r2 = field(2, (x, y) => [-y, x], () => [[0, -1], [1, 0]]);
    const [e2] = fieldErrors([zeroOf(unitSquare('quadrilaterals'), 1, 2)], r2, { elasticity: { lambda, mu }, divergence: true });
    expect(e2.energy!).toBeLessThan(1e-14);
    expect(e2.div!).toBeLessThan(1e-14);
    expect(rel(e2.H1semi, Math.SQRT2)).toBeLessThan(1e-12);
    const r3 = field(3, (x, y, z) => [-y, x - z, y], () => [[0, -1, 0], [1, 0, -1], [0, 1, 0]]);
    for (const mesh of [kuhnCube(), bentCube()]) {
      const [e3] = fieldErrors([zeroOf(mesh, 1, 3)], r3, { elasticity: { lambda, mu } });
      expect(e3.energy!).toBeLessThan(1e-14);
      expect(rel(e3.H1semi, 2)).toBeLessThan(1e-12);
    }
  });
});

describe('fieldErrors: mean-free fields', () => {
  // A scalar field that is not in the space (so the error is not zero): u = exp(x) sin(2y) + 0.3 on P1 triangles.
  const mesh = unitSquare('triangles', 16);
  const sp = lagrangeSpace(mesh, 1);
  const uf = (x: number, y: number) => Math.exp(x) * Math.sin(2 * y) + 0.3;
  const shifted = (c: number): ExactField => field(1, (x, y) => [uf(x, y) + c], (x, y) => [[Math.exp(x) * Math.sin(2 * y), 2 * Math.exp(x) * Math.cos(2 * y)]]);
  const ihPlus = (c: number) => { const v = interpolate(sp, uf); for (let i = 0; i < v.length; i++) v[i] += c; return lagrangeField(sp, v); };
  const base = fieldErrors([ihPlus(0)], shifted(0), { meanFree: true })[0];

  it('adding a constant to both u and u_h leaves the mean-free L2 unchanged', () => {
    // (u + C − mean(u + C)) − (u_h + C − mean(u_h + C)) = (u − ū) − (u_h − ū_h) exactly (by hand); only the round-off
    // of adding C to values of size 1 remains.
    const both = fieldErrors([ihPlus(3.7)], shifted(3.7), { meanFree: true })[0];
    expect(rel(both.L2, base.L2)).toBeLessThan(1e-9);
    expect(rel(both.H1semi, base.H1semi)).toBeLessThan(1e-12);
    expect(Math.abs(both.maxNodal - base.maxNodal)).toBeLessThan(1e-9 * base.maxNodal + 1e-14);
  });

  it('adding a constant to u_h only leaves it unchanged, even a constant 10⁹ times the error', () => {
    // The constant moves ū_h by the same amount (by hand). The plain L2 changes (the offset is all it sees).
    for (const c of [2.5, -0.75]) {
      const only = fieldErrors([ihPlus(c)], shifted(0), { meanFree: true })[0];
      expect(rel(only.L2, base.L2)).toBeLessThan(1e-9);
    }
    // With an offset of 1e6 against an error of about 1e-3, ∫e² − |Ω|ē² would keep no correct digit (its terms are
    // 1e12 with round-off near 1e-4); the two sweeps keep only the rounding of e = u − u_h itself at each point,
    // 1e6 · 1.1e-16 ≈ 1e-10 against an error of 1e-3: relative 1e-7 at worst (by hand).
    const big = fieldErrors([ihPlus(1e6)], shifted(0), { meanFree: true })[0];
    const plain = fieldErrors([ihPlus(1e6)], shifted(0))[0];
    expect(base.L2).toBeLessThan(1e-2);
    expect(plain.L2).toBeGreaterThan(1e5);
    expect(rel(big.L2, base.L2)).toBeLessThan(1e-6);
  });
});

describe('fieldErrors agrees with errors.ts on scalar fields', () => {
  // Same integrals, same rule: the results may differ only in the order of summation, so to round-off
  // (relative 1e-12; common practice, no source).
  const ue = (x: number, y: number, z: number) => Math.exp(x) * Math.sin(3 * y) + z * x;
  const scalar: ExactSolution = {
    u: ue,
    grad(x, y, z, out) { out[0] = Math.exp(x) * Math.sin(3 * y) + z; out[1] = 3 * Math.exp(x) * Math.cos(3 * y); out[2] = x; },
  };
  const asField: ExactField = {
    components: 1,
    value(x, y, z, out) { out[0] = ue(x, y, z); },
    grad(x, y, z, out) { scalar.grad(x, y, z, out); },
  };
  const cases: [string, () => Mesh, number][] = [
    ['P2 triangles', () => unitSquare('triangles', 6), 2],
    ['Q1 bent quadrilaterals', () => perturbMesh(unitSquare('quadrilaterals', 6), { fraction: 0.3, seed: 5 }), 1],
    ['P2 tetrahedra', () => kuhnCube(), 2],
    ['Q1 bent hexahedra', bentCube, 1],
  ];
  for (const [name, make, degree] of cases) {
    it(name, () => {
      const mesh = make();
      const sp = lagrangeSpace(mesh, degree);
      // Two fields, as a level measures them: here the interpolant and a perturbed copy of it.
      const ih = interpolate(sp, ue);
      const other = ih.map((v, i) => v + 0.01 * Math.sin(i));
      const fields = [lagrangeField(sp, ih), lagrangeField(sp, other)];
      const ref = errorNormsOf(fields, scalar);
      const got = fieldErrors(fields, asField);
      // The vector field with one component is the same function.
      const viaVector = fieldErrors([vectorLagrangeField(sp, 1, ih)], asField)[0];
      // The interpolant's largest nodal error is 0 in both (then the difference is checked instead).
      const gap = (a: number, b: number) => (b === 0 ? Math.abs(a) : rel(a, b));
      for (let f = 0; f < 2; f++) {
        for (const k of ['L2', 'H1semi', 'H1', 'maxNodal'] as const) expect(gap(got[f][k], ref[f][k])).toBeLessThan(1e-12);
      }
      for (const k of ['L2', 'H1semi', 'H1', 'maxNodal'] as const) expect(gap(viaVector[k], ref[0][k])).toBeLessThan(1e-12);
    });
  }
});

describe('fieldErrors with a cell stride', () => {
  it('scales the sampled cells up to the whole domain', () => {
    // u = (1, 2) and the zero field on equal-area cells: every cell contributes 5 · |cell|, so any sample scaled by
    // nCells / sampled gives ‖u‖² = 5 |Ω| exactly (by hand).
    const mesh = unitSquare('triangles', 10);
    const u = field(2, () => [1, 2], () => [[0, 0], [0, 0]]);
    for (const stride of [1, 3, 7]) {
      const [e] = fieldErrors([zeroOf(mesh, 1, 2)], u, { cellStride: stride });
      expect(rel(e.L2, Math.sqrt(5))).toBeLessThan(1e-12);
    }
  });
});

describe('fieldErrors refuses inconsistent input', () => {
  const mesh = unitSquare('triangles', 2);
  const u2 = field(2, () => [0, 0], () => [[0, 0], [0, 0]]);
  const u3 = field(3, () => [0, 0, 0], () => [[0, 0], [0, 0], [0, 0]]);
  it('names the mistake', () => {
    expect(() => fieldErrors([], u2)).toThrow(RungsInputError);
    expect(() => fieldErrors([zeroOf(mesh, 1, 3)], u2)).toThrow(/3 component\(s\) but the exact field has 2/);
    expect(() => fieldErrors([zeroOf(mesh, 1, 3)], u3, { divergence: true })).toThrow(/divergence needs a field with as many components/);
    expect(() => fieldErrors([zeroOf(mesh, 1, 3)], u3, { elasticity: { lambda: () => 1, mu: () => 1 } })).toThrow(RungsInputError);
    expect(() => fieldErrors([zeroOf(mesh, 1, 2), zeroOf(unitSquare('triangles', 2), 1, 2)], u2)).toThrow(/another mesh/);
  });
});
