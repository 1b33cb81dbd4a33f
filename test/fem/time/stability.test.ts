import { describe, expect, it } from 'vitest';
import { intervalMesh } from '../../../src/mesh/interval.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { singleField } from '../../../src/fem/space/space.ts';
import { solveHeat, type HeatProblem } from '../../../src/fem/time/heat.ts';
import type { TimeMethodName } from '../../../src/fem/time/methods.ts';

// The stability functions of the steppers, measured on solveHeat itself: y' = λy is the heat equation with one free
// unknown. P2 on [0, 1] as a single cell with u = 0 at both ends leaves only the midpoint dof, whose basis function
// is the bubble φ = 4x(1 − x). By exact integrals (by hand): M = ∫ 16x²(1 − x)² dx = 16·B(3, 3) = 16/30 = 8/15 and
// K = ∫ (4 − 8x)² dx = 16/3, so M u' = −K u is u' = λu with λ = −K/M = −10. The mass rule (degree 4) and the
// stiffness rule (degree 2) integrate both exactly. With f = 0 and boundary data 0 one step of Δt maps u0 to
// R(z) u0, z = λΔt.
const LAMBDA = -10;
function bubbleProblem(): { p: HeatProblem; mid: number } {
  const mesh = intervalMesh(0, 1, 1);
  const space = singleField('u', lagrangeSpace(mesh, 2));
  const X = space.fields[0].space.scalar.dofCoords;
  let mid = -1;
  for (let i = 0; i < X.length; i++) if (X[i] === 0.5) mid = i;
  const zero = (_x: number, _y: number, _z: number, _t: number, out: Float64Array): void => { out[0] = 0; };
  return {
    mid,
    p: {
      space,
      k: (_x, _y, _z, out) => { out[0] = 1; },
      f: zero, g: zero, gDot: zero,
      u0: (x, _y, _z, out) => { out[0] = 4 * x * (1 - x); },
      dirichletTags: mesh.tagNames,
      degrees: { stiffness: 2, mass: 4, load: 4 },
    },
  };
}

/** One solveHeat run of `steps` steps of Δt = z/λ from u0 = 1 at the midpoint: the midpoint value at every level. */
function levels(method: TimeMethodName, z: number, steps: number): number[] {
  const { p, mid } = bubbleProblem();
  const dt = z / LAMBDA;
  const run = solveHeat(p, method, steps * dt, steps, { keepHistory: true });
  return run.history!.map((u) => u[mid]);
}

// Closed forms of the stability functions (Hairer & Wanner 1996, Solving ODEs II, §IV.3; formula numbers from
// memory): implicit Euler R(z) = 1/(1 − z); the trapezoidal rule (Crank–Nicolson) R(z) = (1 + z/2)/(1 − z/2); a
// Runge–Kutta method (A, b) has R(z) = det(I − zA + z𝟙bᵀ) / det(I − zA).
const backwardEuler = (z: number): number => 1 / (1 - z);
const crankNicolson = (z: number): number => (1 + z / 2) / (1 - z / 2);
const det3 = (m: number[][]): number =>
  m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);

// Alexander's three-stage SDIRK written out here from the published formulas (Alexander 1977, SIAM J. Numer. Anal.
// 14, §3; from memory), not taken from methods.ts: γ the root in (0.4, 0.5) of 6γ³ − 18γ² + 9γ − 1 (bisection),
// τ = (1 + γ)/2, b1 = −(6γ² − 16γ + 1)/4, b2 = (6γ² − 20γ + 5)/4, b3 = γ, and the last row of A is bᵀ.
const G = (() => {
  let lo = 0.4, hi = 0.5;
  const c = (g: number): number => 6 * g ** 3 - 18 * g ** 2 + 9 * g - 1;
  for (let i = 0; i < 200; i++) { const m = (lo + hi) / 2; if (c(lo) * c(m) <= 0) hi = m; else lo = m; }
  return (lo + hi) / 2;
})();
const TAU = (1 + G) / 2;
const B = [-(6 * G * G - 16 * G + 1) / 4, (6 * G * G - 20 * G + 5) / 4, G];
const A = [[G, 0, 0], [TAU - G, G, 0], B];
/** R(z) from the determinant formula, with the 3×3 determinants expanded by hand. */
const dirkByDeterminant = (z: number): number => {
  const num = A.map((row, i) => row.map((a, j) => (i === j ? 1 : 0) - z * a + z * B[j]));
  const den = A.map((row, i) => row.map((a, j) => (i === j ? 1 : 0) - z * a));
  return det3(num) / det3(den);
};
// The same function by another road: an SDIRK with R = P(z)/(1 − γz)³ and order 3 has R(z) − e^z = O(z⁴) (order of
// a Runge–Kutta method and its stability function: Hairer & Wanner 1996, §IV.3, from memory), so P is e^z (1 − γz)³
// cut after z³ (by hand): 1 + (1 − 3γ)z + (1/2 − 3γ + 3γ²)z² + (1/6 − 3γ/2 + 3γ² − γ³)z³. The z³ coefficient is
// −(6γ³ − 18γ² + 9γ − 1)/6: it vanishes for Alexander's γ, so R(z) → 0 as z → −∞ (L-stability).
const P = [1, 1 - 3 * G, 0.5 - 3 * G + 3 * G * G, 1 / 6 - (3 * G) / 2 + 3 * G * G - G ** 3];
const dirkByTaylor = (z: number): number => (P[0] + P[1] * z + P[2] * z * z + P[3] * z ** 3) / (1 - G * z) ** 3;

const Z = [-0.01, -0.1, -0.5, -1, -3, -10, -30, -100, -1000];
/** Absolute tolerance on R(z) u0 with u0 = 1: the one-unknown solves and the element integrals carry a few
 *  round-offs each (common practice, no source). */
const TOL = 1e-14;

describe('stability functions of the heat steppers, measured through solveHeat on y\' = λy', () => {
  it('the bubble problem is y\' = −10 y: one backward Euler step of Δt = 0.1 gives 1/(1 + 1) (exact integrals above)', () => {
    expect(levels('backward-euler', -1, 1)[1]).toBeCloseTo(0.5, 14);
  });

  it.each([
    ['backward-euler', backwardEuler],
    ['crank-nicolson', crankNicolson],
  ] as const)('%s: one step gives R(z) u0 for z from −0.01 to −1000, and |R| ≤ 1 (A-stability)', (method, R) => {
    const bad: string[] = [];
    for (const z of Z) {
      const [u0, u1] = levels(method, z, 1);
      if (u0 !== 1) bad.push(`u0 = ${u0}`);
      if (!(Math.abs(u1 - R(z)) <= TOL)) bad.push(`z = ${z}: ${u1} vs ${R(z)}`);
      if (!(Math.abs(u1) <= 1)) bad.push(`z = ${z}: |R| = ${Math.abs(u1)} > 1`);
    }
    expect(bad).toEqual([]);
  });

  it('the two closed forms of the SDIRK\'s stability function agree, and its z³ coefficient vanishes (L-stability)', () => {
    const bad: string[] = [];
    for (const z of [...Z, -1e4, -1e6, 0.3, 1]) {
      const a = dirkByDeterminant(z), b = dirkByTaylor(z);
      if (!(Math.abs(a - b) <= 1e-13 * Math.max(1, Math.abs(b)))) bad.push(`z = ${z}: ${a} vs ${b}`);
    }
    if (!(Math.abs(P[3]) < 1e-15)) bad.push(`z³ coefficient ${P[3]}`);
    // Stiff decay without the z³ term: R(z) ≈ −P2/(γ³ z) for large |z| (by hand).
    if (!(Math.abs(dirkByDeterminant(-1e6) + P[2] / (G ** 3 * -1e6)) < 1e-10)) bad.push(`R(−1e6) = ${dirkByDeterminant(-1e6)}`);
    expect(bad).toEqual([]);
  });

  it('dirk3: one step gives R(z) u0 of Alexander\'s SDIRK, |R| ≤ 1, and R(z) → 0 for z → −∞ (L-stable)', () => {
    const bad: string[] = [];
    for (const z of Z) {
      const [, u1] = levels('dirk3', z, 1);
      const R = dirkByDeterminant(z);
      if (!(Math.abs(u1 - R) <= TOL)) bad.push(`z = ${z}: ${u1} vs ${R}`);
      if (!(Math.abs(u1) <= 1)) bad.push(`z = ${z}: |R| = ${Math.abs(u1)} > 1`);
    }
    // L-stability seen on the solver: at z = −1e6 the step leaves |R| ≈ 3e-6, where Crank–Nicolson (A- but not
    // L-stable: its R tends to −1) leaves almost the whole amplitude with the sign flipped.
    const stiff = levels('dirk3', -1e6, 1)[1];
    if (!(Math.abs(stiff - dirkByDeterminant(-1e6)) <= TOL && Math.abs(stiff) < 1e-5)) bad.push(`R(−1e6) = ${stiff}`);
    const cn = levels('crank-nicolson', -1e6, 1)[1];
    if (!(Math.abs(cn - crankNicolson(-1e6)) <= TOL && cn < -0.99)) bad.push(`Crank–Nicolson R(−1e6) = ${cn}`);
    expect(bad).toEqual([]);
  });

  it('bdf2 from its Crank–Nicolson start: u1 = R_CN(z) u0, then u_{n+1} = ((4/3) u_n − (1/3) u_{n−1})/(1 − 2z/3)', () => {
    // BDF2 (3/2 y_{n+1} − 2 y_n + 1/2 y_{n−1} = Δt f_{n+1}; Hairer, Nørsett & Wanner 1993, Solving ODEs I, §III.1,
    // from memory) on y' = λy, solved for y_{n+1}; the start by one Crank–Nicolson step is solveHeat's documented one.
    // BDF2 is A-stable (Hairer & Wanner 1996, §V.1, from memory): the levels stay within |u0| here.
    const bad: string[] = [];
    for (const z of Z) {
      const u = levels('bdf2', z, 3);
      const ref = [1, crankNicolson(z)];
      for (let n = 1; n < 3; n++) ref.push(((4 / 3) * ref[n] - (1 / 3) * ref[n - 1]) / (1 - (2 * z) / 3));
      for (let n = 0; n <= 3; n++) {
        if (!(Math.abs(u[n] - ref[n]) <= TOL)) bad.push(`z = ${z}, level ${n}: ${u[n]} vs ${ref[n]}`);
        if (!(Math.abs(u[n]) <= 1)) bad.push(`z = ${z}, level ${n}: |u| = ${Math.abs(u[n])} > 1`);
      }
    }
    expect(bad).toEqual([]);
  });
});

describe('temporal order against the manufactured solution itself (no computed reference)', () => {
  // u = x(2 − x) cos t + x sin 2t lies in P2 at every t, so the Galerkin ODE M U' + K U = F(t) (P2 on 4 cells, load,
  // mass and stiffness integrated exactly) has the nodal values of u as its exact solution: the error at the nodes
  // is the time error alone, measured against the formula. f = u_t − u_xx = −x(2 − x) sin t + 2x cos 2t + 2 cos t,
  // g = u at x = 0 and 1 (moving: cos t + sin 2t at x = 1), ∂g/∂t = −x(2 − x) sin t + 2x cos 2t (all by hand).
  // heat-steppers.test.ts measures the orders against a run of the code itself with many steps, in 2D; here the
  // reference is exact. Orders written here, not read from methods.ts: Hairer & Wanner 1996 (backward Euler 1,
  // Crank–Nicolson 2, BDF2 2) and Alexander 1977 (order 3). The problem is only mildly stiff (Δt·|λ_max| ≤ 25 at 32
  // steps: the largest eigenvalue of M⁻¹K on these 7 free unknowns is about 795), and the DIRK keeps its order 3.
  const ORDER: Record<TimeMethodName, number> = { 'backward-euler': 1, 'crank-nicolson': 2, bdf2: 2, dirk3: 3 };
  const exact = (x: number, t: number): number => x * (2 - x) * Math.cos(t) + x * Math.sin(2 * t);
  const mesh = intervalMesh(0, 1, 4);
  const p: HeatProblem = {
    space: singleField('u', lagrangeSpace(mesh, 2)),
    k: (_x, _y, _z, out) => { out[0] = 1; },
    f: (x, _y, _z, t, out) => { out[0] = -x * (2 - x) * Math.sin(t) + 2 * x * Math.cos(2 * t) + 2 * Math.cos(t); },
    g: (x, _y, _z, t, out) => { out[0] = exact(x, t); },
    gDot: (x, _y, _z, t, out) => { out[0] = -x * (2 - x) * Math.sin(t) + 2 * x * Math.cos(2 * t); },
    u0: (x, _y, _z, out) => { out[0] = exact(x, 0); },
    dirichletTags: mesh.tagNames,
    degrees: { stiffness: 2, mass: 4, load: 4 },
  };
  const X = p.space.fields[0].space.scalar.dofCoords;
  const error = (method: TimeMethodName, steps: number): number => {
    const u = solveHeat(p, method, 1, steps).u;
    let e = 0;
    for (let i = 0; i < u.length; i++) e = Math.max(e, Math.abs(u[i] - exact(X[i], 1)));
    return e;
  };

  it.each(['backward-euler', 'crank-nicolson', 'bdf2', 'dirk3'] as TimeMethodName[])('%s converges at its order in Δt to the exact solution', (method) => {
    const errs = [32, 64, 128].map((s) => error(method, s));
    const rate = Math.log2(errs[1] / errs[2]);
    expect(Math.abs(rate - ORDER[method]), `errors ${errs.map((e) => e.toExponential(2))}, last rate ${rate.toFixed(3)}`).toBeLessThan(0.1);
  });
});
