import { describe, expect, it } from 'vitest';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { solveAndMeasure } from './helpers.ts';

describe('1D P1 Galerkin is nodally exact', () => {
  // For −u″ = f in 1D the P1 Galerkin solution interpolates u at the nodes when the load is integrated exactly
  // (the Green's function of a node lies in V_h; Strang & Fix 1973, An Analysis of the Finite Element Method, §1.2).
  it('matches u at every node to round-off for a polynomial load integrated exactly', () => {
    // u = x^5 − x^2 gives f = −20x^3 + 2, a cubic: the default load rule (degree ≥ 4) integrates f φ exactly.
    const { sol, ms } = solveAndMeasure(intervalMesh(0, 1, 7), 1, 'x^5 - x^2 + 0.3');
    const X = sol.space.dofCoords;
    for (let i = 0; i < X.length; i++) expect(Math.abs(sol.coefficients[i] - ms.u(X[i], 0, 0))).toBeLessThan(1e-13);
  });
});

describe('patch test: polynomials of the element degree are reproduced on perturbed meshes', () => {
  // A consistent conforming method reproduces any exact solution in V_h (Strang & Fix 1973, §4.2, the patch test).
  const tri = (n: number) => perturbMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }), { fraction: 0.3, seed: 11 });
  const quad = (n: number) => perturbMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'quadrilaterals' }), { fraction: 0.2, seed: 12 });
  const cases = [
    { name: 'P1', mesh: tri(5), k: 1, u: '1 + 2*x - 3*y' },
    { name: 'P2', mesh: tri(4), k: 2, u: '1 + x - y + x*y + 2*x^2 - y^2' },
    { name: 'P3', mesh: tri(3), k: 3, u: 'x^3 - 2*x^2*y + y^3 + x*y - 1' },
    // A bilinear map of a perturbed quadrilateral keeps affine functions in Q1∘F⁻¹ (Ciarlet 1978, §4.3).
    { name: 'Q1 (affine u)', mesh: quad(4), k: 1, u: '2 - x + 0.5*y' },
    { name: 'P1 interval', mesh: intervalMesh(0, 2, 5), k: 1, u: '3*x - 1' },
    { name: 'P3 interval', mesh: intervalMesh(0, 2, 3), k: 3, u: 'x^3 - x + 2' },
  ];
  it.each(cases)('$name', ({ mesh, k, u }) => {
    const e = solveAndMeasure(mesh, k, u, { k: '1 + x*x', neumann: mesh.dim === 2 ? ['top'] : ['right'] });
    expect(e.L2).toBeLessThan(1e-11);
    expect(e.H1semi).toBeLessThan(1e-10);
  });
});
