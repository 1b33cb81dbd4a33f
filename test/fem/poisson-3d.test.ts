import { describe, expect, it } from 'vitest';
import { boxMesh } from '../../src/mesh/box.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import { solveLagrange } from '../../src/fem/discretizations/lagrange.ts';
import { errorNorms } from '../../src/norms/errors.ts';
import type { ExactSolution } from '../../src/norms/types.ts';

// −Δu = f on the unit cube with u = e^x sin(y + 1/2) cos(z/2) and Dirichlet data u on all six sides. By hand:
// u_xx = u, u_yy = −u, u_zz = −u/4, so f = −Δu = u/4; ∇u = (u, e^x cos(y + 1/2) cos(z/2), −e^x sin(y + 1/2) sin(z/2)/2).
const u = (x: number, y: number, z: number) => Math.exp(x) * Math.sin(y + 0.5) * Math.cos(z / 2);
const exact = {
  u,
  grad: (x: number, y: number, z: number, out: Float64Array) => {
    const e = Math.exp(x);
    out[0] = e * Math.sin(y + 0.5) * Math.cos(z / 2);
    out[1] = e * Math.cos(y + 0.5) * Math.cos(z / 2);
    out[2] = -0.5 * e * Math.sin(y + 0.5) * Math.sin(z / 2);
  },
} as unknown as ExactSolution;
const f = (x: number, y: number, z: number) => u(x, y, z) / 4;

// Hexahedra: quadrature degrees per variable as src/fem/assemble/degrees.ts takes them for quadrilaterals (the
// multilinear map adds one per variable): stiffness 2(k − 1) + 2, load k + (k + 2) + 1 for a non-polynomial f.
const cases = [
  { name: 'P1 tetrahedra', cells: 'tetrahedra' as const, k: 1, ns: [2, 4, 8] },
  { name: 'P2 tetrahedra', cells: 'tetrahedra' as const, k: 2, ns: [2, 4, 8] },
  { name: 'P3 tetrahedra', cells: 'tetrahedra' as const, k: 3, ns: [2, 4] },
  { name: 'Q1 hexahedra', cells: 'hexahedra' as const, k: 1, ns: [2, 4, 8] },
  { name: 'Q2 hexahedra', cells: 'hexahedra' as const, k: 2, ns: [2, 4, 8] },
  // Interior vertices moved by up to 0.2 × the local edge: genuinely trilinear hexahedra with curved faces, and
  // tetrahedra that are no longer Kuhn's.
  { name: 'Q1 perturbed hexahedra', cells: 'hexahedra' as const, k: 1, ns: [4, 8, 16], perturb: true },
  { name: 'Q2 perturbed hexahedra', cells: 'hexahedra' as const, k: 2, ns: [4, 8], perturb: true },
  { name: 'P2 perturbed tetrahedra', cells: 'tetrahedra' as const, k: 2, ns: [4, 8], perturb: true },
];

// For a smooth solution, ||u − u_h||_L2 = O(h^(k+1)) and |u − u_h|_H1 = O(h^k) for degree-k Lagrange elements on
// shape-regular meshes (Ciarlet 1978, Thm 3.2.2 and §3.2; Brenner & Scott 2008, Thm 4.4.20 with the Aubin–Nitsche
// argument of §5.4). The observed order between the two finest levels must be within ±0.25 of it (common practice).
// The order is taken against h = 1/n, the ladder's own mesh size: a perturbed mesh's largest diameter jitters with
// the random moves, and any fixed multiple of 1/n gives the same order.
describe.each(cases)('Poisson on the unit cube, $name', ({ cells, k, ns, perturb }) => {
  it(`converges with L2 order ${k + 1} and H1-seminorm order ${k}`, () => {
    const levels = ns.map((n) => {
      const grid = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: n, ny: n, nz: n, cells });
      const mesh = perturb ? perturbMesh(grid, { fraction: 0.2, seed: 4 }) : grid;
      const sol = solveLagrange({
        mesh, degree: k,
        coefficients: { f, hints: { f: null } },
        boundary: { dirichlet: { tags: mesh.tagNames, value: u } },
        quadrature: cells === 'hexahedra' ? { stiffness: 2 * k, load: 2 * k + 3 } : undefined,
        solver: { relTol: 1e-12 },
      });
      return { h: 1 / n, ...errorNorms(sol.field, exact) };
    });
    const [a, b] = levels.slice(-2) as [typeof levels[0], typeof levels[0]];
    const order = (ea: number, eb: number) => Math.log(ea / eb) / Math.log(a.h / b.h);
    expect(Math.abs(order(a.L2, b.L2) - (k + 1))).toBeLessThan(0.25);
    expect(Math.abs(order(a.H1semi, b.H1semi) - k)).toBeLessThan(0.25);
  });
});
