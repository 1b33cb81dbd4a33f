import { describe, expect, it } from 'vitest';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { errorNorms, exactNorms } from '../../src/norms/errors.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import type { ExactSolution } from '../../src/norms/types.ts';
import { kuhnCubeMesh } from './cube-mesh.ts';

const rate = (e1: number, e2: number) => Math.log(e1 / e2) / Math.log(2);

// u = exp(x + 2y − z), ∇u = (1, 2, −1) u: smooth, not a polynomial, so no interpolant reproduces it.
const smooth: ExactSolution = {
  u: (x, y, z) => Math.exp(x + 2 * y - z),
  grad: (x, y, z, g) => { const e = Math.exp(x + 2 * y - z); g[0] = e; g[1] = 2 * e; g[2] = -e; },
};

describe('tetrahedral meshes of the unit cube (Kuhn subdivision)', () => {
  it('has 6 n^3 cells of total volume 1 and 12 n^2 outward boundary faces (divergence theorem)', () => {
    const n = 3;
    const mesh = kuhnCubeMesh(n);
    expect(mesh.nCells).toBe(6 * n ** 3);
    expect(mesh.nFacets).toBe(12 * n ** 2);
    // ∮ x·n dS = ∫ div x dV = 3 |Ω| = 3; a flat face contributes centroid · (area normal) exactly, since x is linear.
    let flux = 0, area = 0;
    const X = mesh.coords;
    for (let f = 0; f < mesh.nFacets; f++) {
      const [a, b, c] = [mesh.facets[3 * f]!, mesh.facets[3 * f + 1]!, mesh.facets[3 * f + 2]!];
      const u = [0, 1, 2].map((d) => X[3 * b + d]! - X[3 * a + d]!), v = [0, 1, 2].map((d) => X[3 * c + d]! - X[3 * a + d]!);
      const N = [u[1]! * v[2]! - u[2]! * v[1]!, u[2]! * v[0]! - u[0]! * v[2]!, u[0]! * v[1]! - u[1]! * v[0]!].map((t) => t / 2);
      const centroid = [0, 1, 2].map((d) => (X[3 * a + d]! + X[3 * b + d]! + X[3 * c + d]!) / 3);
      flux += N[0]! * centroid[0]! + N[1]! * centroid[1]! + N[2]! * centroid[2]!;
      area += Math.hypot(N[0]!, N[1]!, N[2]!);
    }
    expect(flux).toBeCloseTo(3, 12);
    expect(area).toBeCloseTo(6, 12);
  });

  it('integrates exact polynomial integrals: ∫1 = 1, ∫(xyz)² = 1/27, ∫|∇(xyz)|² = 1/3 (exact integrals)', () => {
    const mesh = kuhnCubeMesh(2);
    const one = exactNorms(mesh, { u: () => 1, grad: (_x, _y, _z, g) => g.fill(0) }, { degree: 2 });
    expect(one.L2).toBeCloseTo(1, 13);
    const xyz = exactNorms(mesh, {
      u: (x, y, z) => x * y * z,
      grad: (x, y, z, g) => { g[0] = y * z; g[1] = x * z; g[2] = x * y; },
    }, { degree: 6 });
    // ∫ x²y²z² = (1/3)^3; ∫ (y²z² + x²z² + x²y²) = 3 · (1/3)^2.
    expect(xyz.L2 ** 2).toBeCloseTo(1 / 27, 13);
    expect(xyz.H1semi ** 2).toBeCloseTo(1 / 3, 13);
  });

  // Interpolation error of degree-k Lagrange elements: ||u − I_h u||_L2 = O(h^(k+1)), |u − I_h u|_H1 = O(h^k)
  // (Ciarlet 1978, The Finite Element Method for Elliptic Problems, Theorem 3.1.6; theorem number from memory).
  it.each([
    { degree: 1, l2: 2, h1: 1 },
    { degree: 2, l2: 3, h1: 2 },
  ])('P$degree interpolants converge at rates $l2 (L2) and $h1 (H1 seminorm)', ({ degree, l2, h1 }) => {
    const errs = [2, 4, 8].map((n) => {
      const space = lagrangeSpace(kuhnCubeMesh(n), degree);
      return errorNorms(lagrangeField(space, interpolate(space, smooth.u)), smooth);
    });
    expect(Math.abs(rate(errs[1]!.L2, errs[2]!.L2) - l2)).toBeLessThan(0.1);
    expect(Math.abs(rate(errs[1]!.H1semi, errs[2]!.H1semi) - h1)).toBeLessThan(0.1);
    expect(rate(errs[0]!.L2, errs[1]!.L2)).toBeGreaterThan(l2 - 0.3);
  });

  it('reproduces polynomials of its degree exactly (common practice, no source)', () => {
    const q: ExactSolution = {
      u: (x, y, z) => 1 + x - 2 * y + 3 * z + x * y - y * z + 2 * z * z,
      grad: (x, y, z, g) => { g[0] = 1 + y; g[1] = -2 + x - z; g[2] = 3 - y + 4 * z; },
    };
    const space = lagrangeSpace(kuhnCubeMesh(2), 2);
    const e = errorNorms(lagrangeField(space, interpolate(space, q.u)), q);
    expect(e.L2).toBeLessThan(1e-13);
    expect(e.H1semi).toBeLessThan(1e-12);
  });
});
