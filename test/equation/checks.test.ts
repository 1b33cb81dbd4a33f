import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { checkManufactured, type ManufacturedCheckOptions, type NeumannSamples } from '../../src/equation/checks.ts';
import { derive } from '../../src/equation/derive.ts';
import { diffusionConvectionReaction, linearElasticity, stokes } from '../../src/equation/presets.ts';
import type { PdeDeclaration } from '../../src/equation/types.ts';

// Scenario: temperature in a square ceramic tile [0,1]², displacement of a kiln rod cross-section. Each case is a
// deliberately poor choice that a guideline of Salari & Knupp (2000) rules out, next to a good one that passes.

const BOX: [number, number][] = [[0, 1], [0, 1]];

function warningsFor(pde: PdeDeclaration, exact: Record<string, string | string[]>, opts: Partial<ManufacturedCheckOptions> = {}): string[] {
  const p = derive({ dim: 2, pde, exact });
  return checkManufactured(p, { box: BOX, pde, ...opts });
}

/** Samples on an edge of the unit square: `along` runs 0..1, the other coordinate is fixed; n the outward normal. */
function edge(fixed: 'x' | 'y', at: number, normal: [number, number], count = 16): NeumannSamples {
  const points: number[] = [];
  const normals: number[] = [];
  for (let i = 0; i < count; i++) {
    const s = (i + 0.5) / count;
    points.push(fixed === 'x' ? at : s, fixed === 'y' ? at : s, 0);
    normals.push(normal[0], normal[1], 0);
  }
  return { points, normals };
}

/** The kiln-tile heat balance with every term present and distinct coefficients. */
const TILE = diffusionConvectionReaction({ k: '1 + x/2', b: [1, 0.5], c: 3 });
const GOOD_U = 'sin(pi*x)*exp(y) + cos(2*x*y)';

describe('checkManufactured: a term left unexercised (Salari & Knupp 2000, guideline 2)', () => {
  it('u = x·y makes Δu = 0, so a constant conductivity k never shows in the source; b and c still do', () => {
    // −∇·(k∇(xy)) = −kΔ(xy) = 0 for constant k (calculus); b·∇u = y + 0.5x and c·u = 3xy are nonzero.
    const w = warningsFor(diffusionConvectionReaction({ k: 2, b: [1, 0.5], c: 3 }), { u: 'x*y' });
    expect(w.filter((s) => s.startsWith('coefficient k:'))).toHaveLength(1);
    expect(w.some((s) => /coefficient (b|c)\b/.test(s) && s.includes('scaling'))).toBe(false);
  });

  it('also for k = 1, which the derivation folds out of the trees (the declaration is put through again)', () => {
    const w = warningsFor(diffusionConvectionReaction({ k: 1 }), { u: 'x*y' });
    expect(w.some((s) => s.startsWith('coefficient k:') && s.includes('unchanged'))).toBe(true);
  });

  it('a Neumann boundary where k∇u·n ≠ 0 does exercise k: on x = 1, k∂(xy)/∂x = 2y', () => {
    const w = warningsFor(diffusionConvectionReaction({ k: 2 }), { u: 'x*y' }, { neumann: { right: edge('x', 1, [1, 0]) } });
    expect(w.some((s) => s.startsWith('coefficient k:'))).toBe(false);
  });

  it('a diagonal conductivity diag(2, 3) with u = x·sin(y): ∂²u/∂x² = 0 hides k[1,1], not k[2,2]', () => {
    const pde: PdeDeclaration = { fields: { u: 'scalar' }, coefficients: { k: [[2, 0], [0, 3]] }, equations: { balance: { flux: 'dot(k, grad(u))' } } };
    const w = warningsFor(pde, { u: 'x*sin(y)' });
    expect(w.some((s) => s.startsWith('coefficient k[1,1]:'))).toBe(true);
    expect(w.some((s) => s.includes('k[2,2]'))).toBe(false);
  });

  it('a coefficient differentiated inside the rest is followed through the derivative: −∇·((1+x)∇(xy)) = −y ≠ 0', () => {
    // ∂x((1+x)y) + ∂y((1+x)x) = y (calculus): k's gradient carries the term even though Δ(xy) = 0.
    const pde: PdeDeclaration = { fields: { u: 'scalar' }, coefficients: { k: '1 + x' }, equations: { balance: { rest: '-div(k*grad(u))' } } };
    const w = warningsFor(pde, { u: 'x*y' });
    expect(w.some((s) => s.startsWith('coefficient k:'))).toBe(false);
  });

  it('a good choice (sin/exp mixture, every coefficient distinct and nonzero) raises no warning at all', () => {
    expect(warningsFor(TILE, { u: GOOD_U }, { degree: 2 })).toEqual([]);
  });
});

describe('checkManufactured: coincident coefficients (common practice, no source)', () => {
  const ROD = ['sin(x)*exp(y)', 'cos(x + 2*y)'];

  it('λ = μ = 1 in linear elasticity: a solver swapping them would pass', () => {
    const w = warningsFor(linearElasticity({ lambda: 1, mu: 1 }), { u: ROD });
    expect(w.filter((s) => s.startsWith('coefficients lambda and mu are equal'))).toHaveLength(1);
  });

  it('distinct λ = 2, μ = 1 pass, and so does the rest of that choice', () => {
    expect(warningsFor(linearElasticity({ lambda: 2, mu: 1 }), { u: ROD }, { degree: 2 })).toEqual([]);
  });

  it('b = (1, 1): the components of one vector coincide', () => {
    const w = warningsFor(diffusionConvectionReaction({ k: '1 + x/2', b: [1, 1], c: 3 }), { u: GOOD_U });
    expect(w.some((s) => s.startsWith('coefficients b[1] and b[2] are equal'))).toBe(true);
  });

  it('a symmetric conductivity (k[1,2] = k[2,1]) is not a coincidence; equal diagonal entries are', () => {
    const flux = { balance: { flux: 'dot(k, grad(u))' } };
    const symmetric = warningsFor({ fields: { u: 'scalar' }, coefficients: { k: [[2, 0.5], [0.5, 3]] }, equations: flux }, { u: GOOD_U });
    expect(symmetric).toEqual([]);
    const isotropic = warningsFor({ fields: { u: 'scalar' }, coefficients: { k: [[2, 0.5], [0.5, 2]] }, equations: flux }, { u: GOOD_U });
    expect(isotropic.some((s) => s.startsWith('coefficients k[1,1] and k[2,2] are equal'))).toBe(true);
  });

  it('a coefficient that is zero everywhere is named as such', () => {
    const w = warningsFor(diffusionConvectionReaction({ k: '1 + x/2', b: [1, 0.5], c: '0*x' }), { u: GOOD_U });
    expect(w.some((s) => s.startsWith('coefficient c is zero everywhere'))).toBe(true);
  });
});

describe('checkManufactured: u already in the discrete space (Salari & Knupp 2000, guideline 3)', () => {
  it('u = x² + y with degree-2 elements is reproduced exactly; with degree 1 it is not flagged', () => {
    const pde = diffusionConvectionReaction({ k: '1 + x/2' });
    const w2 = warningsFor(pde, { u: 'x^2 + y' }, { degree: 2 });
    expect(w2.some((s) => s.startsWith('field u = ') && s.includes('total degree 2') && s.includes('degree-2 element space'))).toBe(true);
    const w1 = warningsFor(pde, { u: 'x^2 + y' }, { degree: 1 });
    expect(w1.some((s) => s.includes('element space'))).toBe(false);
  });

  it('a product that expands to a polynomial counts: (x + y)·(x − y) = x² − y² is degree 2', () => {
    const w = warningsFor(diffusionConvectionReaction({ k: 2 }), { u: '(x + y)*(x - y)' }, { degree: 2 });
    expect(w.some((s) => s.includes('total degree 2'))).toBe(true);
  });

  it('per-field degrees (Taylor–Hood u: 2, p: 1): a linear pressure is flagged, a trigonometric velocity is not', () => {
    const exact = { u: ['sin(pi*x)*cos(pi*y)', '-cos(pi*x)*sin(pi*y)'], p: 'x + 2*y' };
    const w = warningsFor(stokes({ nu: 1 }), exact, { degree: { u: 2, p: 1 } });
    expect(w.some((s) => s.startsWith('field p = ') && s.includes('degree-1 element space'))).toBe(true);
    expect(w.some((s) => s.startsWith('field u[') && s.includes('element space'))).toBe(false);
  });
});

describe('checkManufactured: Neumann data identically zero (Salari & Knupp 2000, guideline 2, boundary term)', () => {
  const pde = diffusionConvectionReaction({ k: '1 + x' });
  const top = edge('y', 1, [0, 1]);

  it('u = exp(x)·cos(πy): ∂u/∂y = −π eˣ sin(πy) = 0 on the top edge y = 1', () => {
    const w = warningsFor(pde, { u: 'exp(x)*cos(pi*y)' }, { neumann: { top } });
    expect(w.filter((s) => s.startsWith("equation balance: the Neumann data F·n on boundary 'top' are zero"))).toHaveLength(1);
  });

  it('u = exp(x)·sin(πy/2 + 0.3): ∂u/∂y ∝ cos(π/2 + 0.3) ≠ 0 on y = 1, and nothing else is wrong', () => {
    expect(warningsFor(pde, { u: 'exp(x)*sin(pi*y/2 + 0.3)' }, { neumann: { top } })).toEqual([]);
  });

  it('refuses samples whose points and normals differ in length, and equations without a flux', () => {
    const p = derive({ dim: 2, pde, exact: { u: GOOD_U } });
    expect(() => checkManufactured(p, { box: BOX, neumann: { top: { points: [0.5, 1, 0], normals: [0, 1] } } })).toThrow(RungsInputError);
    expect(() => checkManufactured(p, { box: BOX, neumann: { top: { ...top, equations: ['energy'] } } })).toThrow(/'energy' is not an equation with a flux/);
  });
});

describe('checkManufactured: too trivial, too steep, not finite (Salari & Knupp 2000, guidelines 1, 2 and 4)', () => {
  const pde = diffusionConvectionReaction({ k: '1 + x/2' });

  it('u = sin(πx) on a 2D tile does not vary in y', () => {
    const w = warningsFor(pde, { u: 'sin(pi*x)' });
    expect(w.some((s) => s.startsWith('field u does not vary in y'))).toBe(true);
    expect(w.some((s) => s.includes('does not vary in x'))).toBe(false);
  });

  it('a vector field with a zero component is constant in space', () => {
    const w = warningsFor(linearElasticity({ lambda: 2, mu: 1 }), { u: ['sin(x)*exp(y)', '0'] });
    expect(w.some((s) => s.startsWith('field u[2] is constant in space'))).toBe(true);
  });

  it('a transient balance with a steady u leaves dt(u) unexercised; u·e^(−t) does not', () => {
    const transient: PdeDeclaration = { fields: { u: 'scalar' }, coefficients: { k: '1 + x/2' }, equations: { balance: { flux: 'k*grad(u)', rest: 'dt(u)' } } };
    const steady = warningsFor(transient, { u: GOOD_U });
    expect(steady.some((s) => s.startsWith('field u does not vary in t'))).toBe(true);
    expect(warningsFor(transient, { u: `(${GOOD_U})*exp(-t)` }, { time: [0, 2] })).toEqual([]);
  });

  it('sin(60πx)·eʸ varies strongly (max|∂u/∂x| / range = 60π/2 ≈ 94 > 50); sin(4πx)·eʸ (2π ≈ 6.3) does not', () => {
    const steep = warningsFor(pde, { u: 'sin(60*pi*x)*exp(y)' });
    expect(steep.some((s) => s.startsWith('field u varies strongly in x'))).toBe(true);
    const gentle = warningsFor(pde, { u: 'sin(4*pi*x)*exp(y)' });
    expect(gentle.some((s) => s.includes('varies strongly'))).toBe(false);
  });

  it('log(x − 1/2) is not defined on the left half of the tile', () => {
    const w = warningsFor(pde, { u: 'log(x - 0.5) + exp(y)' });
    expect(w.some((s) => s.startsWith('field u is NaN at'))).toBe(true);
  });

  it('refuses a box of the wrong dimension', () => {
    const p = derive({ dim: 2, pde, exact: { u: GOOD_U } });
    expect(() => checkManufactured(p, { box: [[0, 1]] })).toThrow(RungsInputError);
  });
});
