import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolateVector, vectorLagrangeField } from '../../src/fem/field/vector-field.ts';
import { mapReferencePoint } from '../../src/fem/geometry/map.ts';
import { RungsInputError } from '../../src/errors.ts';
import { boxMesh } from '../../src/mesh/box.ts';

/** The unit cube in 2 × 2 × 2 boxes, each cut into six Kuhn tetrahedra. */
const kuhnCube = () => boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 2, ny: 2, nz: 2, cells: 'tetrahedra' });

/** A polynomial vector field with its Jacobian rows (grad[i][d] = ∂u_i/∂x_d), both written by hand. */
interface Poly {
  nc: number;
  u: (x: number, y: number, z: number) => number[];
  g: (x: number, y: number, z: number) => number[][];
}

// Three reference points inside each reference cell (triangle and quadrilateral; tetrahedron and hexahedron).
const REF2 = new Float64Array([0.1, 0.2, 0.6, 0.3, 0.25, 0.05]);
const REF3 = new Float64Array([0.1, 0.2, 0.3, 0.5, 0.15, 0.05, 0.2, 0.2, 0.2]);

const square = (cells: 'triangles' | 'quadrilaterals') => rectangleMesh({ x: [0, 2], y: [0, 1], nx: 4, ny: 3, cells });
const bent = () => perturbMesh(square('quadrilaterals'), { fraction: 0.3, seed: 7 });
const box = () => boxMesh({ x: [0, 1], y: [0, 2], z: [0, 1], nx: 2, ny: 3, nz: 2, cells: 'hexahedra' });
const bentBox = () => perturbMesh(box(), { fraction: 0.2, seed: 9 });

// Linear, quadratic and bilinear fields (u and its Jacobian by hand).
const P1_2: Poly = { nc: 2, u: (x, y) => [0.3 - 2 * x + 5 * y, 1 + x - y], g: () => [[-2, 5], [1, -1]] };
const P2_2: Poly = {
  nc: 2,
  u: (x, y) => [x * y - y * y + x, x * x - 3 * y + 0.5],
  g: (x, y) => [[y + 1, x - 2 * y], [2 * x, -3]],
};
const P2_3: Poly = {
  nc: 3,
  u: (x, y) => [x * x, x * y - 1, y * y + x],
  g: (x, y) => [[2 * x, 0], [y, x], [1, 2 * y]],
};
const Q1_2: Poly = { nc: 2, u: (x, y) => [x * y + 1, 2 * x - x * y], g: (x, y) => [[y, x], [2 - y, -x]] };
const P1_1: Poly = { nc: 1, u: (x, y) => [4 * x - y], g: () => [[4, -1]] };
const P1_3D: Poly = {
  nc: 3,
  u: (x, y, z) => [1 + x - z, 2 * y + z, x + y + 3 * z],
  g: () => [[1, 0, -1], [0, 2, 1], [1, 1, 3]],
};
const P2_3D: Poly = {
  nc: 3,
  u: (x, y, z) => [x * y, y * z - x, z * z + x * x],
  g: (x, y, z) => [[y, x, 0], [-1, z, y], [2 * x, 0, 2 * z]],
};

const Q1_3D: Poly = {
  nc: 3,
  u: (x, y, z) => [x * y * z, 1 - y * z, x + x * z],
  g: (x, y, z) => [[y * z, x * z, x * y], [0, -z, -y], [1 + z, 0, x]],
};

describe('the vector Lagrange field', () => {
  // A Lagrange space of degree k holds every polynomial of degree ≤ k (Q_k on quadrilaterals; on bilinearly mapped
  // quadrilaterals Q1 still holds P1 and Q2 holds P2), so the nodal interpolant of one is the polynomial itself, with
  // its gradient, at any point of any cell (Ciarlet 1978, The Finite Element Method for Elliptic Problems, §2.2;
  // componentwise for vector fields; on trilinear hexahedra likewise Q1 ⊇ P1, Q2 ⊇ P2). Cases cover the affine 2D
  // path (triangles, P1 with its one gradient per cell), the per-point path (bent quadrilaterals and hexahedra),
  // tetrahedra, and component counts other than the dimension.
  const cases: { name: string; mesh: () => Mesh; degree: number; poly: Poly }[] = [
    { name: 'P1 triangles, 2 components', mesh: () => square('triangles'), degree: 1, poly: P1_2 },
    { name: 'P2 triangles, 2 components', mesh: () => square('triangles'), degree: 2, poly: P2_2 },
    { name: 'P2 triangles, 3 components', mesh: () => square('triangles'), degree: 2, poly: P2_3 },
    { name: 'P1 triangles, 1 component', mesh: () => square('triangles'), degree: 1, poly: P1_1 },
    { name: 'Q1 rectangles, bilinear', mesh: () => square('quadrilaterals'), degree: 1, poly: Q1_2 },
    { name: 'Q1 bent quadrilaterals, linear', mesh: bent, degree: 1, poly: P1_2 },
    { name: 'Q2 bent quadrilaterals, quadratic', mesh: bent, degree: 2, poly: P2_2 },
    { name: 'P1 tetrahedra', mesh: () => kuhnCube(), degree: 1, poly: P1_3D },
    { name: 'P2 tetrahedra', mesh: () => kuhnCube(), degree: 2, poly: P2_3D },
    { name: 'Q1 boxes, trilinear', mesh: box, degree: 1, poly: Q1_3D },
    { name: 'Q1 bent hexahedra, linear', mesh: bentBox, degree: 1, poly: P1_3D },
    { name: 'Q2 bent hexahedra, quadratic', mesh: bentBox, degree: 2, poly: P2_3D },
  ];
  for (const { name, mesh: make, degree, poly } of cases) {
    it(`reproduces a polynomial of its degree with its gradient: ${name}`, () => {
      const mesh = make();
      const dim = mesh.dim, nc = poly.nc;
      const ref = dim === 3 ? REF3 : REF2;
      const sp = lagrangeSpace(mesh, degree);
      const coeffs = interpolateVector(sp, nc, (x, y, z, out) => { poly.u(x, y, z).forEach((v, i) => { out[i] = v; }); });
      const field = vectorLagrangeField(sp, nc, coeffs);
      expect(field.components).toBe(nc);
      expect(field.nDofs).toBe(sp.nDofs * nc);
      const values = new Float64Array(3 * nc), grads = new Float64Array(3 * nc * dim), x = new Float64Array(3);
      let worst = 0;
      for (let c = 0; c < mesh.nCells; c++) {
        field.evaluate(c, ref, 3, values, grads);
        for (let p = 0; p < 3; p++) {
          mapReferencePoint(mesh, c, ref, p * dim, x);
          const u = poly.u(x[0], x[1], x[2]), g = poly.g(x[0], x[1], x[2]);
          for (let i = 0; i < nc; i++) {
            worst = Math.max(worst, Math.abs(values[p * nc + i] - u[i]));
            for (let d = 0; d < dim; d++) worst = Math.max(worst, Math.abs(grads[(p * nc + i) * dim + d] - g[i][d]));
          }
        }
      }
      // Round-off on values and derivatives of size O(1)-O(10) (common practice, no source).
      expect(worst).toBeLessThan(1e-11);
    });
  }

  it('reads component i at scalar dof g from coeffs[g·components + i] and reports the nodes node-major', () => {
    // Lagrange basis functions are 1 at their own node and 0 at the others (Ciarlet 1978, §2.2): the field with only
    // coefficient g·2 + 1 set is (0, φ_g), which is (0, 1) at node g.
    const mesh = square('triangles');
    const sp = lagrangeSpace(mesh, 2);
    const nc = 2;
    const c = 5, local = 4; // an edge dof of cell 5
    const g = sp.cellDofs[c * sp.element.nDofs + local];
    const coeffs = new Float64Array(sp.nDofs * nc);
    coeffs[g * nc + 1] = 1;
    const field = vectorLagrangeField(sp, nc, coeffs);
    const node = sp.element.nodes.slice(local * 2, local * 2 + 2);
    const v = new Float64Array(2), gr = new Float64Array(4);
    field.evaluate(c, node, 1, v, gr);
    expect(Math.abs(v[0])).toBeLessThan(1e-14);
    expect(Math.abs(v[1] - 1)).toBeLessThan(1e-14);
    expect(field.nodes?.values).toBe(coeffs);
    expect(field.nodes?.coords.length).toBe(sp.nDofs * 2);
  });

  it('refuses coefficients of the wrong length and a bad component count', () => {
    const sp = lagrangeSpace(square('triangles'), 1);
    expect(() => vectorLagrangeField(sp, 2, new Float64Array(sp.nDofs))).toThrow(RungsInputError);
    expect(() => vectorLagrangeField(sp, 0, new Float64Array(0))).toThrow(RungsInputError);
    expect(() => interpolateVector(sp, 1.5, () => {})).toThrow(RungsInputError);
  });
});
