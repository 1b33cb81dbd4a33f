import { describe, expect, it } from 'vitest';
import { derive, type DerivedProblem } from '../../src/equation/derive.ts';
import { compileBundle, dataBundle } from '../../src/equation/bundle.ts';
import { diffusionConvectionReaction, linearElasticity, nonlinearDiffusion, stokes } from '../../src/equation/presets.ts';
import { manufacture } from '../../src/equation/manufactured.ts';
import type { PdeDeclaration } from '../../src/equation/types.ts';
import { centralDerivative6, SIXTH_ORDER_STEP } from '../../src/exact/finite-difference.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

// Demo setting: temperatures and displacements in ceramic tiles and kiln rods (invented data). Every expected value
// below is written by hand in plain TypeScript from a derivation in the comment beside it; nothing rungs computed
// earlier is asserted.

type Dim = 1 | 2 | 3;
type Vec = number[];
const { sin, cos, exp, PI } = Math;

/** Seeded points in [lo, hi]^dim (time, when asked, in [0, 2]). */
function points(n: number, seed: number, dim: Dim, lo = -1, hi = 1.5, withTime = false): Vec[] {
  const random = mulberry32(seed);
  return Array.from({ length: n }, () => {
    const p = Array.from({ length: dim }, () => lo + (hi - lo) * random());
    if (withTime) p.push(2 * random());
    return p;
  });
}

/** A seeded unit normal in dim dimensions. */
function unitNormals(n: number, seed: number, dim: Dim): Vec[] {
  const random = mulberry32(seed);
  return Array.from({ length: n }, () => {
    let v: Vec;
    let norm: number;
    do {
      v = Array.from({ length: dim }, () => 2 * random() - 1);
      norm = Math.hypot(...v);
    } while (norm < 0.1);
    return v.map((c) => c / norm);
  });
}

/** The bundle of a derived problem compiled, called by name: point args [x, y, z, t], normal args appended. */
function compiled(problem: DerivedProblem) {
  const data = compileBundle(dataBundle('kiln-tile', problem));
  return {
    names: [...data.functions.keys()],
    call(name: string, p: Vec, t = 0, n?: Vec): Vec {
      const f = data.functions.get(name);
      if (!f) throw new Error(`no function ${name}; have ${[...data.functions.keys()].join(', ')}`);
      const args = new Float64Array(f.args.length);
      const dim = problem.dim;
      for (let i = 0; i < dim; i++) args[i] = p[i];
      if (f.args.length >= 4) args[3] = t;
      if (n) for (let i = 0; i < dim; i++) args[4 + i] = n[i];
      const out = new Float64Array(f.outputs);
      f.evaluate(args, out);
      return [...out];
    },
  };
}

/** Compare pairs [label, got, want] within tol·max(|want|, scale), scale = the largest |want| of the set (so values
 *  that pass near zero are judged against the size of the function). Returns the failures, asserted once. */
function mismatches(pairs: Array<[string, number, number]>, tol: number): string[] {
  let scale = 0;
  for (const [, , want] of pairs) if (Number.isFinite(want)) scale = Math.max(scale, Math.abs(want));
  const bad: string[] = [];
  for (const [label, got, want] of pairs) {
    if (!(Math.abs(got - want) <= tol * Math.max(Math.abs(want), scale))) bad.push(`${label}: got ${got}, want ${want}`);
  }
  if (pairs.length === 0) bad.push('no pairs compared');
  return bad;
}

// ---------------------------------------------------------------------------------------------------------------
// Exact fields written out with their derivatives by hand (calculus; every entry derived in the comments).

/** A vector field with its first and second derivatives: du[i][j] = ∂u_i/∂x_j, d2u[i][j][k] = ∂²u_i/∂x_j∂x_k. */
interface HandVector {
  formulas: string[];
  u(p: Vec): Vec;
  du(p: Vec): Vec[];
  d2u(p: Vec): Vec[][];
}

/** A scalar with its gradient. */
interface HandScalar {
  formula: string;
  f(p: Vec): number;
  grad(p: Vec): Vec;
}

// 2D displacement of a tile:  u1 = sin(2x)cos(y) + x²y,  u2 = x y³ + cos(x).
//   ∂u1/∂x = 2cos(2x)cos(y) + 2xy          ∂u1/∂y = −sin(2x)sin(y) + x²
//   ∂²u1/∂x² = −4sin(2x)cos(y) + 2y         ∂²u1/∂x∂y = −2cos(2x)sin(y) + 2x     ∂²u1/∂y² = −sin(2x)cos(y)
//   ∂u2/∂x = y³ − sin(x)                   ∂u2/∂y = 3xy²
//   ∂²u2/∂x² = −cos(x)                      ∂²u2/∂x∂y = 3y²                       ∂²u2/∂y² = 6xy
const TILE_2D: HandVector = {
  formulas: ['sin(2*x)*cos(y) + x^2*y', 'x*y^3 + cos(x)'],
  u: ([x, y]) => [sin(2 * x) * cos(y) + x * x * y, x * y ** 3 + cos(x)],
  du: ([x, y]) => [
    [2 * cos(2 * x) * cos(y) + 2 * x * y, -sin(2 * x) * sin(y) + x * x],
    [y ** 3 - sin(x), 3 * x * y * y],
  ],
  d2u: ([x, y]) => {
    const u1xy = -2 * cos(2 * x) * sin(y) + 2 * x;
    return [
      [[-4 * sin(2 * x) * cos(y) + 2 * y, u1xy], [u1xy, -sin(2 * x) * cos(y)]],
      [[-cos(x), 3 * y * y], [3 * y * y, 6 * x * y]],
    ];
  },
};

// 3D displacement of a kiln rod:  u1 = sin(x) y z,  u2 = x² z + cos(y),  u3 = e^(−x) y + z³.
//   ∇u1 = (cos(x) y z, sin(x) z, sin(x) y);   ∂²u1: xx = −sin(x) y z, xy = cos(x) z, xz = cos(x) y, yy = 0, yz = sin(x), zz = 0
//   ∇u2 = (2xz, −sin(y), x²);                 ∂²u2: xx = 2z, xy = 0, xz = 2x, yy = −cos(y), yz = 0, zz = 0
//   ∇u3 = (−e^(−x) y, e^(−x), 3z²);           ∂²u3: xx = e^(−x) y, xy = −e^(−x), xz = 0, yy = 0, yz = 0, zz = 6z
const ROD_3D: HandVector = {
  formulas: ['sin(x)*y*z', 'x^2*z + cos(y)', 'exp(-x)*y + z^3'],
  u: ([x, y, z]) => [sin(x) * y * z, x * x * z + cos(y), exp(-x) * y + z ** 3],
  du: ([x, y, z]) => [
    [cos(x) * y * z, sin(x) * z, sin(x) * y],
    [2 * x * z, -sin(y), x * x],
    [-exp(-x) * y, exp(-x), 3 * z * z],
  ],
  d2u: ([x, y, z]) => [
    [[-sin(x) * y * z, cos(x) * z, cos(x) * y], [cos(x) * z, 0, sin(x)], [cos(x) * y, sin(x), 0]],
    [[2 * z, 0, 2 * x], [0, -cos(y), 0], [2 * x, 0, 0]],
    [[exp(-x) * y, -exp(-x), 0], [-exp(-x), 0, 0], [0, 0, 6 * z]],
  ],
};

const constant = (value: number, dim: Dim): HandScalar => ({
  formula: String(value), f: () => value, grad: () => Array.from({ length: dim }, () => 0),
});

/** Stress of linear elasticity, σ = 2μ ε(u) + λ tr ε(u) I with ε(u) = (∇u + ∇uᵀ)/2 (Gurtin 1981, "An Introduction to
 *  Continuum Mechanics", eq. (22.3); Timoshenko & Goodier 1970, §3): σ_ij = μ(u_i,j + u_j,i) + λ δ_ij ∇·u. */
function handStress(du: Vec[], lambda: number, mu: number): Vec[] {
  const dim = du.length;
  let theta = 0;
  for (let i = 0; i < dim; i++) theta += du[i][i];
  return du.map((row, i) => row.map((_, j) => mu * (du[i][j] + du[j][i]) + (i === j ? lambda * theta : 0)));
}

/** −∇·σ(u) by the product rule, derived by hand:
 *    ∂_j σ_ij = μ_,j (u_i,j + u_j,i) + μ (u_i,jj + u_j,ij) + δ_ij (λ_,j θ + λ θ_,j),   θ = ∇·u, θ_,i = Σ_j u_j,ji,
 *  so (∇·σ)_i = Σ_j μ_,j (u_i,j + u_j,i) + μ (Δu_i + θ_,i) + λ_,i θ + λ θ_,i. */
function handElasticSource(u: HandVector, lambda: HandScalar, mu: HandScalar, p: Vec): Vec {
  const du = u.du(p);
  const d2 = u.d2u(p);
  const dim = du.length;
  const m = mu.f(p);
  const l = lambda.f(p);
  const dm = mu.grad(p);
  const dl = lambda.grad(p);
  let theta = 0;
  for (let i = 0; i < dim; i++) theta += du[i][i];
  const dtheta = (i: number) => {
    let s = 0;
    for (let j = 0; j < dim; j++) s += d2[j][j][i];
    return s;
  };
  return du.map((_, i) => {
    let s = 0;
    for (let j = 0; j < dim; j++) s += dm[j] * (du[i][j] + du[j][i]) + m * d2[i][j][j];
    s += m * dtheta(i) + dl[i] * theta + l * dtheta(i);
    return -s;
  });
}

/** −∇·F by sixth-order central differences of a hand-computed flux F (rows F_i, columns the directions). */
function numericalMinusDivergence(flux: (p: Vec) => Vec[], p: Vec): Vec {
  const dim = p.length;
  const rows = flux(p).length;
  return Array.from({ length: rows }, (_, i) => {
    let s = 0;
    for (let j = 0; j < dim; j++) {
      s += centralDerivative6((xj) => {
        const q = [...p];
        q[j] = xj;
        return flux(q)[i][j];
      }, p[j], SIXTH_ORDER_STEP);
    }
    return -s;
  });
}

// ---------------------------------------------------------------------------------------------------------------

describe('linear elasticity preset: −∇·σ(u) = f, traction σn', () => {
  it('2D, constant Lamé λ = 1.5, μ = 0.75: f = −μΔu − (λ+μ)∇(∇·u), component by component', () => {
    // From the table of TILE_2D: Δu1 = −5 sin(2x)cos(y) + 2y, Δu2 = −cos(x) + 6xy,
    // ∇·u = 2cos(2x)cos(y) + 2xy + 3xy², ∂x(∇·u) = −4 sin(2x)cos(y) + 2y + 3y², ∂y(∇·u) = −2cos(2x)sin(y) + 2x + 6xy.
    // With constant λ, μ: ∇·σ = μΔu + (λ+μ)∇(∇·u) (Timoshenko & Goodier 1970, Navier's equations, §85).
    const [lambda, mu] = [1.5, 0.75];
    const problem = derive({ dim: 2, pde: linearElasticity({ lambda, mu }), exact: { u: TILE_2D.formulas } });
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    for (const p of points(200, 11, 2)) {
      const [x, y] = p;
      const f1 = -mu * (-5 * sin(2 * x) * cos(y) + 2 * y) - (lambda + mu) * (-4 * sin(2 * x) * cos(y) + 2 * y + 3 * y * y);
      const f2 = -mu * (-cos(x) + 6 * x * y) - (lambda + mu) * (-2 * cos(2 * x) * sin(y) + 2 * x + 6 * x * y);
      const got = data.call('source_momentum', p);
      pairs.push([`f1 at ${p}`, got[0], f1], [`f2 at ${p}`, got[1], f2]);
    }
    expect(mismatches(pairs, 1e-12)).toEqual([]);
  });

  it('3D, constant Lamé λ = 2, μ = 1.25: f = −μΔu − (λ+μ)∇(∇·u)', () => {
    // From the table of ROD_3D: Δu1 = −sin(x) y z, Δu2 = 2z − cos(y), Δu3 = e^(−x) y + 6z;
    // ∇·u = cos(x) y z − sin(y) + 3z², ∇(∇·u) = (−sin(x) y z, cos(x) z − cos(y), cos(x) y + 6z).
    const [lambda, mu] = [2, 1.25];
    const problem = derive({ dim: 3, pde: linearElasticity({ lambda, mu }), exact: { u: ROD_3D.formulas } });
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    for (const p of points(200, 12, 3)) {
      const [x, y, z] = p;
      const want = [
        -mu * (-sin(x) * y * z) - (lambda + mu) * (-sin(x) * y * z),
        -mu * (2 * z - cos(y)) - (lambda + mu) * (cos(x) * z - cos(y)),
        -mu * (exp(-x) * y + 6 * z) - (lambda + mu) * (cos(x) * y + 6 * z),
      ];
      const got = data.call('source_momentum', p);
      for (let i = 0; i < 3; i++) pairs.push([`f${i + 1} at ${p}`, got[i], want[i]]);
    }
    expect(mismatches(pairs, 1e-12)).toEqual([]);
  });

  const VARIABLE_CASES: Array<{ name: string; dim: Dim; u: HandVector; lambda: HandScalar; mu: HandScalar }> = [
    {
      name: '2D, μ = 1 + xy, λ = 2 + sin(x)', dim: 2, u: TILE_2D,
      // ∇μ = (y, x), ∇λ = (cos(x), 0).
      mu: { formula: '1 + x*y', f: ([x, y]) => 1 + x * y, grad: ([x, y]) => [y, x] },
      lambda: { formula: '2 + sin(x)', f: ([x]) => 2 + sin(x), grad: ([x]) => [cos(x), 0] },
    },
    {
      name: '3D, μ = 1 + x² + yz, λ = 3 + cos(y)', dim: 3, u: ROD_3D,
      // ∇μ = (2x, z, y), ∇λ = (0, −sin(y), 0).
      mu: { formula: '1 + x^2 + y*z', f: ([x, y, z]) => 1 + x * x + y * z, grad: ([x, y, z]) => [2 * x, z, y] },
      lambda: { formula: '3 + cos(y)', f: ([, y]) => 3 + cos(y), grad: ([, y]) => [0, -sin(y), 0] },
    },
    {
      name: '3D, constant λ = 2, μ = 1.25 through the product-rule route', dim: 3, u: ROD_3D,
      mu: constant(1.25, 3), lambda: constant(2, 3),
    },
  ];

  it.each(VARIABLE_CASES)('$name: source against the product rule, traction σn against σ_ij n_j, ∇u against the table', ({ dim, u, lambda, mu }) => {
    const problem = derive({ dim, pde: linearElasticity({ lambda: lambda.formula, mu: mu.formula }), exact: { u: u.formulas } });
    const data = compiled(problem);
    const sources: Array<[string, number, number]> = [];
    const tractions: Array<[string, number, number]> = [];
    const gradients: Array<[string, number, number]> = [];
    const normals = unitNormals(200, 22, dim);
    points(200, 21, dim).forEach((p, k) => {
      const want = handElasticSource(u, lambda, mu, p);
      const got = data.call('source_momentum', p);
      for (let i = 0; i < dim; i++) sources.push([`f${i + 1} at ${p}`, got[i], want[i]]);
      // Traction t_i = σ_ij n_j (Gurtin 1981, Cauchy's theorem, §14).
      const n = normals[k];
      const sigma = handStress(u.du(p), lambda.f(p), mu.f(p));
      const traction = data.call('flux_momentum', p, 0, n);
      for (let i = 0; i < dim; i++) {
        let ti = 0;
        for (let j = 0; j < dim; j++) ti += sigma[i][j] * n[j];
        tractions.push([`t${i + 1} at ${p}, n = ${n}`, traction[i], ti]);
      }
      // grad_u is row-major: out[i*dim + j] = ∂u_i/∂x_j (src/equation/bundle.ts contract).
      const g = data.call('grad_u', p);
      const du = u.du(p);
      for (let i = 0; i < dim; i++) for (let j = 0; j < dim; j++) gradients.push([`du${i + 1}/dx${j + 1} at ${p}`, g[i * dim + j], du[i][j]]);
    });
    expect(mismatches(sources, 1e-12)).toEqual([]);
    expect(mismatches(tractions, 1e-12)).toEqual([]);
    expect(mismatches(gradients, 1e-12)).toEqual([]);
  });

  it.each(VARIABLE_CASES)('$name: derived source against sixth-order central differences of the hand-computed stress', ({ dim, u, lambda, mu }) => {
    // −∇·σ approximated by Fornberg's (1988) sixth-order stencil applied to σ(u) computed in plain code: the truncation
    // error is O(h⁶) with h = eps^(1/7) ≈ 6e-3, so agreement to ~1e-7 relative is expected (common practice, no source).
    const problem = derive({ dim, pde: linearElasticity({ lambda: lambda.formula, mu: mu.formula }), exact: { u: u.formulas } });
    const data = compiled(problem);
    const stress = (p: Vec) => handStress(u.du(p), lambda.f(p), mu.f(p));
    const pairs: Array<[string, number, number]> = [];
    for (const p of points(200, 31, dim)) {
      const numerical = numericalMinusDivergence(stress, p);
      const got = data.call('source_momentum', p);
      for (let i = 0; i < dim; i++) pairs.push([`f${i + 1} at ${p}`, got[i], numerical[i]]);
    }
    expect(mismatches(pairs, 1e-7)).toEqual([]);
  });

  it('declares one vector field, one vector equation, coefficients λ and μ and no time', () => {
    const problem = derive({ dim: 2, pde: linearElasticity({ lambda: 1, mu: '1 + x*y' }), exact: { u: TILE_2D.formulas } });
    expect(problem.fields.map((f) => [f.name, f.kind])).toEqual([['u', 'vector']]);
    expect(problem.equations.map((e) => [e.name, e.rank, e.field])).toEqual([['momentum', 1, 'u']]);
    expect([...problem.coefficients.keys()].sort()).toEqual(['lambda', 'mu']);
    expect(problem.hasTime).toBe(false);
    // coef_mu evaluates the formula given (1 + xy at (0.5, −2) is 0).
    expect(compiled(problem).call('coef_mu', [0.5, -2])).toEqual([0]);
  });
});

// ---------------------------------------------------------------------------------------------------------------

// Stokes flow of a glaze (Girault & Raviart 1986, "Finite Element Methods for Navier–Stokes Equations", ch. I, eq. (2.1)):
// −νΔu + ∇p = f, ∇·u = g; in conservation form −∇·(ν∇u − pI) + 0 = f, natural data (ν∇u − pI)n.

// 2D divergence-free velocity from the stream function ψ = x²y³ + sin(x)cos(y): u = (∂ψ/∂y, −∂ψ/∂x)
//   u1 = 3x²y² − sin(x)sin(y),  u2 = −2xy³ − cos(x)cos(y)
//   ∂u1/∂x = 6xy² − cos(x)sin(y),  ∂u1/∂y = 6x²y − sin(x)cos(y)
//   ∂u2/∂x = −2y³ + sin(x)cos(y),  ∂u2/∂y = −6xy² + cos(x)sin(y)       (∇·u = 0 term by term)
//   Δu1 = (6y² + sin(x)sin(y)) + (6x² + sin(x)sin(y)) = 6x² + 6y² + 2 sin(x)sin(y)
//   Δu2 = cos(x)cos(y) + (−12xy + cos(x)cos(y)) = −12xy + 2 cos(x)cos(y)
// Pressure p = sin(x) y + x², ∇p = (cos(x) y + 2x, sin(x)).
const GLAZE_U = ['3*x^2*y^2 - sin(x)*sin(y)', '-2*x*y^3 - cos(x)*cos(y)'];
const GLAZE_P = 'sin(x)*y + x^2';
const glazeDu = ([x, y]: Vec): Vec[] => [
  [6 * x * y * y - cos(x) * sin(y), 6 * x * x * y - sin(x) * cos(y)],
  [-2 * y ** 3 + sin(x) * cos(y), -6 * x * y * y + cos(x) * sin(y)],
];

// 3D divergence-free velocity: u1 = sin(x)cos(y) z, u2 = −cos(x)sin(y) z, u3 = x²y + e^y
//   ∇u1 = (cos(x)cos(y) z, −sin(x)sin(y) z, sin(x)cos(y)),  Δu1 = −2 sin(x)cos(y) z
//   ∇u2 = (sin(x)sin(y) z, −cos(x)cos(y) z, −cos(x)sin(y)), Δu2 = 2 cos(x)sin(y) z
//   ∇u3 = (2xy, x² + e^y, 0),                               Δu3 = 2y + e^y
//   ∇·u = cos(x)cos(y)z − cos(x)cos(y)z + 0 = 0
// Pressure p = xyz + cos(z), ∇p = (yz, xz, xy − sin(z)).
const KILN_U = ['sin(x)*cos(y)*z', '-cos(x)*sin(y)*z', 'x^2*y + exp(y)'];
const KILN_P = 'x*y*z + cos(z)';
const kilnDu = ([x, y, z]: Vec): Vec[] => [
  [cos(x) * cos(y) * z, -sin(x) * sin(y) * z, sin(x) * cos(y)],
  [sin(x) * sin(y) * z, -cos(x) * cos(y) * z, -cos(x) * sin(y)],
  [2 * x * y, x * x + exp(y), 0],
];

/** (ν∇u − pI)n, component i: ν Σ_j u_i,j n_j − p n_i (Girault & Raviart 1986, natural boundary condition). */
function stokesNatural(du: Vec[], p: number, nu: number, n: Vec): Vec {
  return du.map((row, i) => {
    let s = 0;
    for (let j = 0; j < row.length; j++) s += nu * row[j] * n[j];
    return s - p * n[i];
  });
}

describe('Stokes preset: momentum −νΔu + ∇p, mass ∇·u, natural data (ν∇u − pI)n', () => {
  it('2D, ν = 0.5, divergence-free u: momentum by hand, mass source zero, natural data', () => {
    const nu = 0.5;
    const problem = derive({ dim: 2, pde: stokes({ nu }), exact: { u: GLAZE_U, p: GLAZE_P } });
    const data = compiled(problem);
    const momentum: Array<[string, number, number]> = [];
    const natural: Array<[string, number, number]> = [];
    const massFailures: string[] = [];
    const normals = unitNormals(200, 42, 2);
    points(200, 41, 2).forEach((pt, k) => {
      const [x, y] = pt;
      const f1 = -nu * (6 * x * x + 6 * y * y + 2 * sin(x) * sin(y)) + cos(x) * y + 2 * x;
      const f2 = -nu * (-12 * x * y + 2 * cos(x) * cos(y)) + sin(x);
      const got = data.call('source_momentum', pt);
      momentum.push([`f1 at ${pt}`, got[0], f1], [`f2 at ${pt}`, got[1], f2]);
      // Mass source ∇·u = 0: the terms cancel exactly in exact arithmetic, so in floating point the value may only
      // differ from 0 by the round-off of its largest term, |6xy²| + |cos(x)sin(y)| (common practice, no source).
      const [g] = data.call('source_mass', pt);
      const size = 6 * Math.abs(x * y * y) + Math.abs(cos(x) * sin(y)) + 1;
      if (!(Math.abs(g) <= 1e-14 * size)) massFailures.push(`mass at ${pt}: ${g}`);
      const n = normals[k];
      const want = stokesNatural(glazeDu(pt), sin(x) * y + x * x, nu, n);
      const gotN = data.call('flux_momentum', pt, 0, n);
      natural.push([`g1 at ${pt}`, gotN[0], want[0]], [`g2 at ${pt}`, gotN[1], want[1]]);
    });
    expect(mismatches(momentum, 1e-12)).toEqual([]);
    expect(mismatches(natural, 1e-12)).toEqual([]);
    expect(massFailures).toEqual([]);
    expect(problem.equations.map((e) => [e.name, e.rank, e.field])).toEqual([['momentum', 1, 'u'], ['mass', 0, 'p']]);
    expect(problem.equations[1].normalFlux).toBeNull(); // the mass equation has no flux, hence no natural data
    expect(data.names).not.toContain('flux_mass');
    expect(problem.meanFree).toEqual(['p']);
  });

  it('3D, ν = 2, divergence-free u: momentum by hand, mass source zero, natural data', () => {
    const nu = 2;
    const problem = derive({ dim: 3, pde: stokes({ nu }), exact: { u: KILN_U, p: KILN_P } });
    const data = compiled(problem);
    const momentum: Array<[string, number, number]> = [];
    const natural: Array<[string, number, number]> = [];
    const massFailures: string[] = [];
    const normals = unitNormals(200, 52, 3);
    points(200, 51, 3).forEach((pt, k) => {
      const [x, y, z] = pt;
      const want = [
        -nu * (-2 * sin(x) * cos(y) * z) + y * z,
        -nu * (2 * cos(x) * sin(y) * z) + x * z,
        -nu * (2 * y + exp(y)) + x * y - sin(z),
      ];
      const got = data.call('source_momentum', pt);
      for (let i = 0; i < 3; i++) momentum.push([`f${i + 1} at ${pt}`, got[i], want[i]]);
      const [g] = data.call('source_mass', pt);
      const size = Math.abs(cos(x) * cos(y) * z) + 1;
      if (!(Math.abs(g) <= 1e-14 * size)) massFailures.push(`mass at ${pt}: ${g}`);
      const n = normals[k];
      const wantN = stokesNatural(kilnDu(pt), x * y * z + cos(z), nu, n);
      const gotN = data.call('flux_momentum', pt, 0, n);
      for (let i = 0; i < 3; i++) natural.push([`g${i + 1} at ${pt}`, gotN[i], wantN[i]]);
    });
    expect(mismatches(momentum, 1e-12)).toEqual([]);
    expect(mismatches(natural, 1e-12)).toEqual([]);
    expect(massFailures).toEqual([]);
  });

  it('2D, variable ν = 1 + x and a velocity that is not divergence-free: momentum −∇·(ν∇u) + ∇p, mass ∇·u', () => {
    // u1 = x²y: ∇u1 = (2xy, x²), Δu1 = 2y.   u2 = sin(xy): ∇u2 = (y cos(xy), x cos(xy)), Δu2 = −(x² + y²) sin(xy).
    // p = x − y: ∇p = (1, −1).   ν = 1 + x: ∇ν = (1, 0).
    // −∇·(ν∇u_i) = −νΔu_i − ∇ν·∇u_i (product rule):
    //   f1 = −(1 + x)·2y − 2xy + 1,   f2 = (1 + x)(x² + y²) sin(xy) − y cos(xy) − 1.
    // Mass: ∇·u = 2xy + x cos(xy).
    const problem = derive({ dim: 2, pde: stokes({ nu: '1 + x', meanFree: false }), exact: { u: ['x^2*y', 'sin(x*y)'], p: 'x - y' } });
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    const mass: Array<[string, number, number]> = [];
    const natural: Array<[string, number, number]> = [];
    const normals = unitNormals(200, 62, 2);
    points(200, 61, 2).forEach((pt, k) => {
      const [x, y] = pt;
      const got = data.call('source_momentum', pt);
      pairs.push([`f1 at ${pt}`, got[0], -(1 + x) * 2 * y - 2 * x * y + 1]);
      pairs.push([`f2 at ${pt}`, got[1], (1 + x) * (x * x + y * y) * sin(x * y) - y * cos(x * y) - 1]);
      mass.push([`g at ${pt}`, data.call('source_mass', pt)[0], 2 * x * y + x * cos(x * y)]);
      const n = normals[k];
      const du = [[2 * x * y, x * x], [y * cos(x * y), x * cos(x * y)]];
      const want = stokesNatural(du, x - y, 1 + x, n);
      const gotN = data.call('flux_momentum', pt, 0, n);
      natural.push([`n1 at ${pt}`, gotN[0], want[0]], [`n2 at ${pt}`, gotN[1], want[1]]);
    });
    expect(mismatches(pairs, 1e-12)).toEqual([]);
    expect(mismatches(mass, 1e-12)).toEqual([]);
    expect(mismatches(natural, 1e-12)).toEqual([]);
    expect(problem.meanFree).toEqual([]); // meanFree: false (an outflow boundary fixes the pressure)
  });
});

// ---------------------------------------------------------------------------------------------------------------

describe('nonlinear diffusion preset: −∇·((1 + u²)∇u) + u³ = f', () => {
  // ∇·((1 + u²)∇u) = (1 + u²)Δu + ∇(1 + u²)·∇u = (1 + u²)Δu + 2u|∇u|² (product and chain rules, by hand), so
  // f = −(1 + u²)Δu − 2u|∇u|² + u³.
  const CASES: Array<{ dim: Dim; u: string; hand: (p: Vec) => { u: number; grad: Vec; lap: number } }> = [
    // u = sin(x) + xy²: ∇u = (cos(x) + y², 2xy), Δu = −sin(x) + 2x.
    { dim: 2, u: 'sin(x) + x*y^2', hand: ([x, y]) => ({ u: sin(x) + x * y * y, grad: [cos(x) + y * y, 2 * x * y], lap: -sin(x) + 2 * x }) },
    // u = xy + e^z: ∇u = (y, x, e^z), Δu = e^z.
    { dim: 3, u: 'x*y + exp(z)', hand: ([x, y, z]) => ({ u: x * y + exp(z), grad: [y, x, exp(z)], lap: exp(z) }) },
    // u = cos(2x): u' = −2 sin(2x), u'' = −4 cos(2x).
    { dim: 1, u: 'cos(2*x)', hand: ([x]) => ({ u: cos(2 * x), grad: [-2 * sin(2 * x)], lap: -4 * cos(2 * x) }) },
  ];
  it.each(CASES)('$dim D, u = $u', ({ dim, u, hand }) => {
    const problem = derive({ dim, pde: nonlinearDiffusion({ conductivity: '1 + u^2', reaction: 'u^3' }), exact: { u } });
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    const fluxes: Array<[string, number, number]> = [];
    const normals = unitNormals(200, 72, dim);
    points(200, 71, dim).forEach((p, k) => {
      const h = hand(p);
      const g2 = h.grad.reduce((s, g) => s + g * g, 0);
      pairs.push([`f at ${p}`, data.call('source_balance', p)[0], -(1 + h.u * h.u) * h.lap - 2 * h.u * g2 + h.u ** 3]);
      // Natural data (1 + u²)∇u·n.
      const n = normals[k];
      const gn = h.grad.reduce((s, g, i) => s + g * n[i], 0);
      fluxes.push([`flux at ${p}`, data.call('flux_balance', p, 0, n)[0], (1 + h.u * h.u) * gn]);
    });
    expect(mismatches(pairs, 1e-12)).toEqual([]);
    expect(mismatches(fluxes, 1e-12)).toEqual([]);
  });
});

// ---------------------------------------------------------------------------------------------------------------

describe('diffusion–convection–reaction preset: −∇·(k∇u) + b·∇u + cu = f', () => {
  // −∇·(k∇u) = −kΔu − ∇k·∇u (product rule), so f = −kΔu − ∇k·∇u + b·∇u + cu.
  interface Case {
    name: string; dim: Dim; u: string; k: string; b: string[]; c: string;
    hand: (p: Vec) => { u: number; grad: Vec; lap: number; k: number; dk: Vec; b: Vec; c: number };
  }
  const CASES: Case[] = [
    {
      // u = sin(3x) + x²: u' = 3cos(3x) + 2x, u'' = −9 sin(3x) + 2.  k = 1 + x², k' = 2x.
      name: '1D rod', dim: 1, u: 'sin(3*x) + x^2', k: '1 + x^2', b: ['2'], c: 'x',
      hand: ([x]) => ({ u: sin(3 * x) + x * x, grad: [3 * cos(3 * x) + 2 * x], lap: -9 * sin(3 * x) + 2, k: 1 + x * x, dk: [2 * x], b: [2], c: x }),
    },
    {
      // u = eˣ sin(2y) + x²y: ∇u = (eˣ sin(2y) + 2xy, 2eˣ cos(2y) + x²), Δu = eˣ sin(2y) − 4eˣ sin(2y) + 2y = −3eˣ sin(2y) + 2y.
      // k = 2 + xy, ∇k = (y, x).
      name: '2D tile', dim: 2, u: 'exp(x)*sin(2*y) + x^2*y', k: '2 + x*y', b: ['y', '-x'], c: '3',
      hand: ([x, y]) => ({
        u: exp(x) * sin(2 * y) + x * x * y,
        grad: [exp(x) * sin(2 * y) + 2 * x * y, 2 * exp(x) * cos(2 * y) + x * x],
        lap: -3 * exp(x) * sin(2 * y) + 2 * y,
        k: 2 + x * y, dk: [y, x], b: [y, -x], c: 3,
      }),
    },
    {
      // u = xyz + sin(z): ∇u = (yz, xz, xy + cos(z)), Δu = −sin(z).  k = eˣ, ∇k = (eˣ, 0, 0).
      name: '3D kiln block', dim: 3, u: 'x*y*z + sin(z)', k: 'exp(x)', b: ['1', '0', 'z'], c: 'y^2',
      hand: ([x, y, z]) => ({
        u: x * y * z + sin(z), grad: [y * z, x * z, x * y + cos(z)], lap: -sin(z),
        k: exp(x), dk: [exp(x), 0, 0], b: [1, 0, z], c: y * y,
      }),
    },
  ];

  it.each(CASES)('$name: source and k∇u·n against hand formulas; manufacture() gives the derive() route', ({ dim, u, k, b, c, hand }) => {
    const problem = derive({ dim, pde: diffusionConvectionReaction({ k, b, c }), exact: { u }, time: false });
    const data = compiled(problem);
    const solution = manufacture({ dim, u, k, b, c });
    const pairs: Array<[string, number, number]> = [];
    const fluxes: Array<[string, number, number]> = [];
    const routes: string[] = [];
    const normals = unitNormals(200, 82, dim);
    points(200, 81, dim).forEach((p, idx) => {
      const h = hand(p);
      let want = -h.k * h.lap + h.c * h.u;
      for (let i = 0; i < dim; i++) want += -h.dk[i] * h.grad[i] + h.b[i] * h.grad[i];
      const got = data.call('source_balance', p)[0];
      pairs.push([`f at ${p}`, got, want]);
      const n = normals[idx];
      fluxes.push([`k∇u·n at ${p}`, data.call('flux_balance', p, 0, n)[0], h.k * h.grad.reduce((s, g, i) => s + g * n[i], 0)]);
      // The same equation through manufacture(): the same derivation, so the same bits (common practice, no source).
      const [x, y, z] = [p[0], p[1] ?? 0, p[2] ?? 0];
      const viaManufacture = solution.f(x, y, z);
      if (!Object.is(viaManufacture, got)) routes.push(`at ${p}: manufacture ${viaManufacture}, derive ${got}`);
      const fluxViaManufacture = solution.flux(x, y, z, n[0], n[1] ?? 0, n[2] ?? 0);
      const fluxViaDerive = data.call('flux_balance', p, 0, n)[0];
      if (Math.abs(fluxViaManufacture - fluxViaDerive) > 1e-14 * Math.max(1, Math.abs(fluxViaDerive))) {
        routes.push(`flux at ${p}: manufacture ${fluxViaManufacture}, derive ${fluxViaDerive}`);
      }
    });
    expect(mismatches(pairs, 1e-12)).toEqual([]);
    expect(mismatches(fluxes, 1e-12)).toEqual([]);
    expect(routes).toEqual([]);
    expect(solution.formulas.f).toBe(problem.equations[0].source.c.toString());
  });

  it('without coefficients the preset is −Δu = f, and coefficients not given are not declared', () => {
    // u = x²y + y³ (2D): Δu = 2y + 6y = 8y, so f = −8y.
    const problem = derive({ dim: 2, pde: diffusionConvectionReaction(), exact: { u: 'x^2*y + y^3' } });
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    for (const p of points(50, 91, 2)) pairs.push([`f at ${p}`, data.call('source_balance', p)[0], -8 * p[1]]);
    expect(mismatches(pairs, 1e-12)).toEqual([]);
    expect([...problem.coefficients.keys()]).toEqual([]);
    expect(data.names.filter((n) => n.startsWith('coef_'))).toEqual([]);
    const viaManufacture = manufacture({ dim: 2, u: 'x^2*y + y^3' });
    expect(viaManufacture.formulas.f).toBe(problem.equations[0].source.c.toString());
  });
});

// ---------------------------------------------------------------------------------------------------------------

describe('a coupled system written in the language: two temperatures convected by a glaze flow', () => {
  // Fields u (tile body) and v (glaze layer), coefficient a = (1 + y, −x) convecting both, k = 1 + x², r = 0.5:
  //   heat:  −∇·(k∇u) + a·∇u + r(u − v)        = f_u
  //   glaze: −∇·(∇v)  + a·∇v + r(v − u) − u v  = f_v
  // u = sin(x)cos(y): ∇u = (cos(x)cos(y), −sin(x)sin(y)), Δu = −2 sin(x)cos(y).
  // v = x² + y³:       ∇v = (2x, 3y²), Δv = 2 + 6y.
  // −∇·(k∇u) = −kΔu − ∇k·∇u = 2(1 + x²) sin(x)cos(y) − 2x cos(x)cos(y).
  const pde: PdeDeclaration = {
    label: 'tile and glaze temperatures',
    fields: { u: 'scalar', v: 'scalar' },
    coefficients: { a: ['1 + y', '-x'], k: '1 + x^2', r: 0.5 },
    equations: {
      heat: { flux: 'k*grad(u)', rest: 'dot(a, grad(u)) + r*(u - v)' },
      glaze: { flux: 'grad(v)', rest: 'dot(a, grad(v)) + r*(v - u) - u*v' },
    },
  };

  it('sources, fluxes and field pairing against hand formulas', () => {
    const problem = derive({ dim: 2, pde, exact: { u: 'sin(x)*cos(y)', v: 'x^2 + y^3' } });
    expect(problem.equations.map((e) => [e.name, e.rank, e.field])).toEqual([['heat', 0, 'u'], ['glaze', 0, 'v']]);
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    const normals = unitNormals(200, 102, 2);
    points(200, 101, 2).forEach((p, idx) => {
      const [x, y] = p;
      const u = sin(x) * cos(y);
      const v = x * x + y ** 3;
      const gu = [cos(x) * cos(y), -sin(x) * sin(y)];
      const gv = [2 * x, 3 * y * y];
      const a = [1 + y, -x];
      const fu = 2 * (1 + x * x) * sin(x) * cos(y) - 2 * x * cos(x) * cos(y) + a[0] * gu[0] + a[1] * gu[1] + 0.5 * (u - v);
      const fv = -(2 + 6 * y) + a[0] * gv[0] + a[1] * gv[1] + 0.5 * (v - u) - u * v;
      pairs.push([`f_u at ${p}`, data.call('source_heat', p)[0], fu], [`f_v at ${p}`, data.call('source_glaze', p)[0], fv]);
      const n = normals[idx];
      pairs.push([`k∇u·n at ${p}`, data.call('flux_heat', p, 0, n)[0], (1 + x * x) * (gu[0] * n[0] + gu[1] * n[1])]);
      pairs.push([`∇v·n at ${p}`, data.call('flux_glaze', p, 0, n)[0], gv[0] * n[0] + gv[1] * n[1]]);
      const exactU = data.call('exact_u', p)[0];
      const exactV = data.call('exact_v', p)[0];
      pairs.push([`u at ${p}`, exactU, u], [`v at ${p}`, exactV, v]);
      const coefA = data.call('coef_a', p);
      pairs.push([`a1 at ${p}`, coefA[0], a[0]], [`a2 at ${p}`, coefA[1], a[1]]);
    });
    // The mixed set spans several magnitudes; each value is judged against the largest of the set.
    expect(mismatches(pairs, 1e-12)).toEqual([]);
  });
});

// ---------------------------------------------------------------------------------------------------------------

describe('time: sources with ∂u/∂t, initial data, hasTime', () => {
  it('a cooling tile: u = e^(−t) sin(πx) cos(y), rest dt(u) + c u, flux k∇u', () => {
    // Δu = −(π² + 1)u, ∂u/∂t = −u; with k = 2, c = x:
    // f = ∂u/∂t − kΔu + cu = −u + 2(π² + 1)u + x u.
    const pde: PdeDeclaration = {
      fields: { u: 'scalar' },
      coefficients: { k: 2, c: 'x' },
      equations: { balance: { flux: 'k*grad(u)', rest: 'dt(u) + c*u' } },
    };
    const problem = derive({ dim: 2, pde, exact: { u: 'exp(-t)*sin(pi*x)*cos(y)' } });
    expect(problem.hasTime).toBe(true);
    const data = compiled(problem);
    expect(data.names).toContain('initial_u');
    const pairs: Array<[string, number, number]> = [];
    const initial: Array<[string, number, number]> = [];
    for (const q of points(200, 111, 2, -1, 1.5, true)) {
      const [x, y, t] = q;
      const u = exp(-t) * sin(PI * x) * cos(y);
      pairs.push([`f at ${q}`, data.call('source_balance', [x, y], t)[0], -u + 2 * (PI * PI + 1) * u + x * u]);
      pairs.push([`u at ${q}`, data.call('exact_u', [x, y], t)[0], u]);
      initial.push([`u(x, 0) at ${q}`, data.call('initial_u', [x, y])[0], sin(PI * x) * cos(y)]);
    }
    expect(mismatches(pairs, 1e-12)).toEqual([]);
    expect(mismatches(initial, 1e-12)).toEqual([]);
    const bundle = dataBundle('tile', problem);
    expect(bundle.hasTime).toBe(true);
  });

  it('a vector field in time: u = (t x², eᵗ y), flux ∇u, rest dt(u): f = ∂u/∂t − Δu', () => {
    // ∂u/∂t = (x², eᵗ y), Δu = (2t, 0), f = (x² − 2t, eᵗ y); u(x, 0) = (0, y).
    const pde: PdeDeclaration = { fields: { u: 'vector' }, equations: { momentum: { flux: 'grad(u)', rest: 'dt(u)' } } };
    const problem = derive({ dim: 2, pde, exact: { u: ['t*x^2', 'exp(t)*y'] } });
    expect(problem.hasTime).toBe(true);
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    for (const q of points(200, 121, 2, -1, 1.5, true)) {
      const [x, y, t] = q;
      const f = data.call('source_momentum', [x, y], t);
      pairs.push([`f1 at ${q}`, f[0], x * x - 2 * t], [`f2 at ${q}`, f[1], exp(t) * y]);
      const u0 = data.call('initial_u', [x, y]);
      pairs.push([`u1(x, 0) at ${q}`, u0[0], 0], [`u2(x, 0) at ${q}`, u0[1], y]);
    }
    expect(mismatches(pairs, 1e-12)).toEqual([]);
  });

  it('a second time derivative: rest dt(dt(u)) gives ∂²u/∂t²', () => {
    // u = t³ x + sin(t) y (2D): ∂²u/∂t² = 6t x − sin(t) y, Δu = 0, so f = 6tx − sin(t) y with flux ∇u.
    const pde: PdeDeclaration = { fields: { u: 'scalar' }, equations: { wave: { flux: 'grad(u)', rest: 'dt(dt(u))' } } };
    const problem = derive({ dim: 2, pde, exact: { u: 't^3*x + sin(t)*y' } });
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    for (const q of points(100, 131, 2, -1, 1.5, true)) {
      const [x, y, t] = q;
      pairs.push([`f at ${q}`, data.call('source_wave', [x, y], t)[0], 6 * t * x - sin(t) * y]);
    }
    expect(mismatches(pairs, 1e-12)).toEqual([]);
  });

  it('hasTime: false for a steady study (no initial data); true when t appears only in a coefficient or dt() on a steady u', () => {
    const steady = derive({ dim: 3, pde: linearElasticity({ lambda: 2, mu: 1 }), exact: { u: ROD_3D.formulas } });
    expect(steady.hasTime).toBe(false);
    const bundle = dataBundle('rod', steady);
    expect(bundle.hasTime).toBe(false);
    expect(bundle.functions.map((f) => f.name).filter((n) => n.startsWith('initial_'))).toEqual([]);
    const steadyTime = derive({ dim: 2, pde: diffusionConvectionReaction({ k: '1 + x' }), exact: { u: 'x*y' }, time: false });
    expect(steadyTime.hasTime).toBe(false);

    // t only in a coefficient: the problem depends on time (doc of DerivedProblem.hasTime).
    const coefficientInTime = derive({ dim: 1, pde: diffusionConvectionReaction({ k: '1 + t' }), exact: { u: 'x^2' } });
    expect(coefficientInTime.hasTime).toBe(true);
    // −((1 + t)·2x)' = −2(1 + t).
    expect(compiled(coefficientInTime).call('source_balance', [0.3], 0.5)[0]).toBeCloseTo(-3, 13);

    // dt() of a u without t: the equation takes a time derivative (hasTime true), the term is 0: −(x²)'' = −2.
    const dtOfSteady = derive({ dim: 1, pde: { fields: { u: 'scalar' }, equations: { balance: { flux: 'grad(u)', rest: 'dt(u)' } } }, exact: { u: 'x^2' } });
    expect(dtOfSteady.hasTime).toBe(true);
    expect(compiled(dtOfSteady).call('source_balance', [0.7], 1.3)[0]).toBeCloseTo(-2, 13);
  });

  it('t written in an equation itself (rest t·u) enters the source: f = t x² − 2 for u = x²', () => {
    // −(x²)'' + t·x² = t x² − 2 (by hand).
    const pde: PdeDeclaration = { fields: { u: 'scalar' }, equations: { balance: { flux: 'grad(u)', rest: 't*u' } } };
    const problem = derive({ dim: 1, pde, exact: { u: 'x^2' } });
    const data = compiled(problem);
    const pairs: Array<[string, number, number]> = [];
    for (const [x, t] of points(50, 141, 1, -1, 1.5, true)) pairs.push([`f at ${x}, ${t}`, data.call('source_balance', [x], t)[0], t * x * x - 2]);
    expect(mismatches(pairs, 1e-12)).toEqual([]);
  });

  // Regression: t written only in a flux or rest (rest 't*u', source t x² − 2) once left hasTime false, so the bundle
  // called the study steady (no initial_u; generated code told to pass t = 0).
  it('hasTime: t written only in an equation (rest t*u) makes the problem time-dependent', () => {
    const pde: PdeDeclaration = { fields: { u: 'scalar' }, equations: { balance: { flux: 'grad(u)', rest: 't*u' } } };
    const problem = derive({ dim: 1, pde, exact: { u: 'x^2' } });
    expect(problem.hasTime).toBe(true);
  });

  it('a steady u = cbrt(x²) keeps a real gradient and source for x < 0', () => {
    // u = (x²)^(1/3): u' = (2/3) x (x²)^(−2/3), u'' = −(2/9)|x|^(−4/3) for x ≠ 0 (by hand), so with flux ∇u, f = (2/9)|x|^(−4/3).
    const pde: PdeDeclaration = { fields: { u: 'scalar' }, equations: { balance: { flux: 'grad(u)' } } };
    const data = compiled(derive({ dim: 1, pde, exact: { u: 'cbrt(x^2)' } }));
    const x = -0.5;
    const pairs: Array<[string, number, number]> = [
      ['du/dx', data.call('grad_u', [x])[0], (2 / 3) * x * Math.cbrt(x * x) ** -2],
      ['f', data.call('source_balance', [x])[0], (2 / 9) * Math.abs(x) ** (-4 / 3)],
    ];
    expect(mismatches(pairs, 1e-12)).toEqual([]);
  });

  // Regression: the guard that rejects a mathjs simplification which changes the domain (agreesAtSamples) once sampled
  // x, y, z only; a tree holding t was NaN at every sample and the simplification was kept, so for u = cbrt(x²) eᵗ the
  // gradient x^(−1/3) eᵗ 2/3 and the source were NaN for x < 0 (Math.pow of a negative base).
  it('time-dependent simplification: u = cbrt(x²) eᵗ keeps a real gradient and source for x < 0', () => {
    // Same derivation as the steady case, times eᵗ.
    const pde: PdeDeclaration = { fields: { u: 'scalar' }, equations: { balance: { flux: 'grad(u)' } } };
    const data = compiled(derive({ dim: 1, pde, exact: { u: 'cbrt(x^2)*exp(t)' } }));
    const [x, t] = [-0.5, 0.3];
    const pairs: Array<[string, number, number]> = [
      ['du/dx', data.call('grad_u', [x], t)[0], (2 / 3) * x * Math.cbrt(x * x) ** -2 * exp(t)],
      ['f', data.call('source_balance', [x], t)[0], (2 / 9) * Math.abs(x) ** (-4 / 3) * exp(t)],
    ];
    expect(mismatches(pairs, 1e-12)).toEqual([]);
  });
});
