import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { derive, nonlinearDiffusion } from '../../../src/equation/index.ts';
import { compileBundle, dataBundle } from '../../../src/equation/bundle.ts';
import { solveNonlinearDiffusion } from '../../../src/fem/discretizations/nonlinear-diffusion.ts';
import { lagrangeField } from '../../../src/fem/field/lagrange-field.ts';
import { errorNorms } from '../../../src/norms/errors.ts';
import { manufacture } from '../../../src/equation/index.ts';

// Manufactured solution of −∇·((1 + u²)∇u) + u³ = f, tile-like data on the unit square; the source comes from the
// symbolic derivation of the nonlinear preset, the solver knows κ(u) = 1 + u², κ' = 2u, r = u³, r' = 3u².
const U = 'sin(pi*x)*cos(0.5*y) + 0.5*x*y';
const derived = derive({ dim: 2, pde: nonlinearDiffusion({ conductivity: '1 + u^2', reaction: 'u^3' }), exact: { u: U }, time: false });
const data = compileBundle(dataBundle('newton', derived)).functions;
const args = new Float64Array(4);
const source = (x: number, y: number, z: number, out: Float64Array) => { args[0] = x; args[1] = y; args[2] = z; args[3] = 0; data.get('source_balance')!.evaluate(args, out); };
const exact = manufacture({ dim: 2, u: U });

function run(n: number, k: number) {
  const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles', diagonal: 'alternating' });
  const sol = solveNonlinearDiffusion({
    mesh, degree: k,
    conductivity: (u, _x, _y, _z, out) => { out[0] = 1 + u * u; out[1] = 2 * u; },
    reaction: (u, _x, _y, _z, out) => { out[0] = u * u * u; out[1] = 3 * u * u; },
    source,
    dirichlet: { tags: ['left', 'right', 'bottom', 'top'], value: (x, y, z, out) => { out[0] = exact.u(x, y, z); } },
  });
  const e = errorNorms(lagrangeField(sol.space.fields[0].space.scalar, sol.coefficients), exact);
  return { h: mesh.h, e, sol };
}

describe('Newton for nonlinear diffusion', () => {
  it('converges quadratically: each update is at most a constant times the square of the one before', () => {
    // Newton's method converges quadratically near a solution with a Lipschitz Jacobian (Kelley 1995, Iterative
    // Methods for Linear and Nonlinear Equations, Thm 5.1.1, from memory): e_{k+1} ≤ C e_k². Checked while the
    // updates are above round-off: log e_{k+1} / log e_k ≥ 1.7 once e_k < 1e-1.
    const { sol } = run(16, 2);
    const u = sol.steps.map((s) => s.update);
    const ratios: number[] = [];
    for (let i = 0; i + 1 < u.length; i++) if (u[i] < 1e-1 && u[i + 1] > 1e-12) ratios.push(Math.log(u[i + 1]) / Math.log(u[i]));
    expect(ratios.length).toBeGreaterThan(0);
    expect(Math.min(...ratios)).toBeGreaterThan(1.7);
    expect(sol.steps.length).toBeLessThan(10);
  });

  it.each([1, 2])('gives L2 order k+1 and H1-seminorm order k with P%i (Brenner & Scott 2008 Thm 5.4.8; nonlinear case: Xu 1996, SIAM J. Numer. Anal. 33, from memory)', (k) => {
    const ns = k === 1 ? [8, 16, 32] : [4, 8, 16];
    const r = ns.map((n) => run(n, k));
    const rate = (a: number, b: number, ha: number, hb: number) => Math.log(a / b) / Math.log(ha / hb);
    const l2 = rate(r[1].e.L2, r[2].e.L2, r[1].h, r[2].h);
    const h1 = rate(r[1].e.H1semi, r[2].e.H1semi, r[1].h, r[2].h);
    expect(Math.abs(l2 - (k + 1))).toBeLessThan(0.15);
    expect(Math.abs(h1 - k)).toBeLessThan(0.15);
  });
});
