import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { intervalMesh } from '../../../src/mesh/interval.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { singleField } from '../../../src/fem/space/space.ts';
import { solveHeat, type HeatProblem } from '../../../src/fem/time/heat.ts';
import { alexander3, TIME_ORDER, type TimeMethodName } from '../../../src/fem/time/methods.ts';

// u = sin(πx) sin(πy) e^(−t) + x t² + y cos(t) solves u_t − Δu = f with f = u_t − Δu computed by hand:
// u_t = −sin(πx)sin(πy)e^(−t) + 2xt − y sin(t), Δu = −2π² sin(πx)sin(πy)e^(−t); Dirichlet data depend on t.
const S = (x: number, y: number) => Math.sin(Math.PI * x) * Math.sin(Math.PI * y);
const exact = (x: number, y: number, t: number) => S(x, y) * Math.exp(-t) + x * t * t + y * Math.cos(t);
const source = (x: number, y: number, t: number) => -S(x, y) * Math.exp(-t) + 2 * x * t - y * Math.sin(t) + 2 * Math.PI ** 2 * S(x, y) * Math.exp(-t);

function problem(n: number, k: number): HeatProblem {
  const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' });
  return {
    space: singleField('u', lagrangeSpace(mesh, k)),
    k: (_x, _y, _z, out) => { out[0] = 1; },
    f: (x, y, _z, t, out) => { out[0] = source(x, y, t); },
    g: (x, y, _z, t, out) => { out[0] = exact(x, y, t); },
    u0: (x, y, _z, out) => { out[0] = exact(x, y, 0); },
    // ∂g/∂t = −sin(πx)sin(πy)e^(−t) + 2xt − y sin(t) (by hand).
    gDot: (x, y, _z, t, out) => { out[0] = -S(x, y) * Math.exp(-t) + 2 * x * t - y * Math.sin(t); },
    dirichletTags: mesh.tagNames,
    degrees: { stiffness: 2 * k, mass: 2 * k, load: 2 * k + 3 },
  };
}
// The 2D reference: the same mesh's ODE advanced with 512 DIRK steps (its error, below 1e-9, is far under the
// errors compared), computed once for the tests that need it.
let reference2d: Float64Array | null = null;
const reference = (p: HeatProblem) => (reference2d ??= solveHeat(p, 'dirk3', 1, 512).u);
const maxDiff = (a: Float64Array, b: Float64Array) => { let m = 0; for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i])); return m; };

describe('time steppers over one set-up matrix', () => {
  it('Alexander\'s DIRK satisfies the order conditions of order 3 and is stiffly accurate (Hairer & Wanner 1996, §IV.6; exact arithmetic up to round-off)', () => {
    const { a, c, gamma } = alexander3();
    const b = a[a.length - 1];
    const sum = (f: (i: number) => number) => b.reduce((s, _v, i) => s + f(i), 0);
    expect(sum((i) => b[i])).toBeCloseTo(1, 14);
    expect(sum((i) => b[i] * c[i])).toBeCloseTo(1 / 2, 14);
    expect(sum((i) => b[i] * c[i] ** 2)).toBeCloseTo(1 / 3, 14);
    expect(sum((i) => b[i] * a[i].reduce((s, aij, j) => s + aij * c[j], 0))).toBeCloseTo(1 / 6, 14);
    // Row sums give c (stage times), the last row is b (stiffly accurate), γ is the L-stable root.
    expect(a.map((row) => row.reduce((s, v) => s + v, 0)).map((v, i) => v - c[i]).every((d) => Math.abs(d) < 1e-14)).toBe(true);
    expect(6 * gamma ** 3 - 18 * gamma ** 2 + 9 * gamma - 1).toBeCloseTo(0, 13);
  });

  // Temporal order alone: errors against the same space discretization advanced with many more steps (the ODE
  // M U' + K U = F(t) of the mesh), so the spatial error drops out; orders from Hairer & Wanner 1996.
  it.each(['backward-euler', 'crank-nicolson', 'bdf2'] as TimeMethodName[])('%s converges at its order in Δt, with moving boundary data', (method) => {
    const p = problem(6, 2);
    const errs = [8, 16, 32].map((s) => maxDiff(solveHeat(p, method, 1, s).u, reference(p)));
    const rates = errs.slice(1).map((e, i) => Math.log2(errs[i] / e));
    expect(Math.abs(rates[rates.length - 1] - TIME_ORDER[method]), `errors ${errs.map((e) => e.toExponential(2))}`).toBeLessThan(0.2);
  });

  it('the DIRK reaches order 3 where the problem is not stiff (one P2 bubble on an interval: λ = K/M = 10)', () => {
    // Classical order of a Runge–Kutta method holds once Δt·λ is small (Hairer & Wanner 1996, §IV.15: in the stiff
    // regime methods of stage order 1 show reduced orders). Here Δt·λ ≤ 0.3. u = sin(πx) cos(t) with Dirichlet data
    // 0 at both ends; f = sin(πx)(π² cos t − sin t) (by hand).
    const mesh = intervalMesh(0, 1, 1);
    const p: HeatProblem = {
      space: singleField('u', lagrangeSpace(mesh, 2)),
      k: (_x, _y, _z, out) => { out[0] = 1; },
      f: (x, _y, _z, t, out) => { out[0] = Math.sin(Math.PI * x) * (Math.PI ** 2 * Math.cos(t) - Math.sin(t)); },
      g: (_x, _y, _z, _t, out) => { out[0] = 0; },
      gDot: (_x, _y, _z, _t, out) => { out[0] = 0; },
      u0: (x, _y, _z, out) => { out[0] = Math.sin(Math.PI * x); },
      dirichletTags: mesh.tagNames,
      degrees: { stiffness: 2, mass: 4, load: 9 },
    };
    const reference = solveHeat(p, 'dirk3', 1, 4096).u;
    const errs = [32, 64, 128].map((s) => maxDiff(solveHeat(p, 'dirk3', 1, s).u, reference));
    expect(Math.abs(Math.log2(errs[1] / errs[2]) - 3), `errors ${errs.map((e) => e.toExponential(2))}`).toBeLessThan(0.1);
  });

  it('the DIRK falls to about order 2 when the boundary data move: order reduction, which a time study must show, not hide', () => {
    // Stiff order reduction of Runge–Kutta methods with low stage order on initial–boundary value problems with
    // time-dependent boundary data (Ostermann & Roche 1992; Carpenter, Gottlieb, Abarbanel & Don 1995, SIAM J. Sci.
    // Comput. 16; both from memory): between 2 and 2.6 here, in the stiff regime of a 2D mesh.
    const p = problem(6, 2);
    const errs = [4, 8, 16].map((s) => maxDiff(solveHeat(p, 'dirk3', 1, s).u, reference(p)));
    const r = Math.log2(errs[1] / errs[2]);
    expect(r, `errors ${errs.map((e) => e.toExponential(2))}`).toBeGreaterThan(1.8);
    expect(r).toBeLessThan(2.6);
  });

  it('sets its matrix up once per run: one solve per step (per stage for the DIRK)', () => {
    const p = problem(4, 1);
    expect(solveHeat(p, 'crank-nicolson', 1, 10).solves).toBe(10);
    expect(solveHeat(p, 'dirk3', 1, 10).solves).toBe(30);
  });
});
