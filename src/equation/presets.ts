import type { CoefficientValue, PdeDeclaration } from './types.ts';

// The common equations, written in the equation language exactly as a user would write them (read and copy them).
// Convention: −∇·F + R = s, natural boundary data F·n.

/** −∇·(k∇u) + b·∇u + c u = f: steady diffusion–convection–reaction of one scalar field u (temperature in a tile).
 *  Terms whose coefficient is not given are left out, so the derived source has the same terms as before. */
export function diffusionConvectionReaction(args: { k?: CoefficientValue; b?: CoefficientValue; c?: CoefficientValue } = {}): PdeDeclaration {
  const coefficients: Record<string, CoefficientValue> = {};
  if (args.k !== undefined) coefficients.k = args.k;
  if (args.b !== undefined) coefficients.b = args.b;
  if (args.c !== undefined) coefficients.c = args.c;
  const rest = [args.b !== undefined ? 'dot(b, grad(u))' : null, args.c !== undefined ? 'c*u' : null].filter((s) => s !== null);
  return {
    label: 'diffusion–convection–reaction',
    fields: { u: 'scalar' },
    coefficients,
    equations: { balance: { flux: args.k !== undefined ? 'k*grad(u)' : 'grad(u)', ...(rest.length ? { rest: rest.join(' + ') } : {}) } },
    preset: { name: 'diffusion-convection-reaction', args },
  };
}

/** Linear elasticity, −∇·σ(u) = f with σ = 2μ ε(u) + λ tr ε(u) I and ε(u) = sym ∇u (tr ε(u) = ∇·u); the natural
 *  data σn are the traction. Lamé parameters λ and μ are formulas or numbers. */
export function linearElasticity(args: { lambda: CoefficientValue; mu: CoefficientValue }): PdeDeclaration {
  return {
    label: 'linear elasticity',
    fields: { u: 'vector' },
    coefficients: { lambda: args.lambda, mu: args.mu },
    equations: { momentum: { flux: '2*mu*sym(grad(u)) + lambda*div(u)*I' } },
    preset: { name: 'linear-elasticity', args },
  };
}

/** Stokes flow, −∇·(ν∇u − pI) = f, ∇·u = g: the natural data (ν∇u − pI)n. With Dirichlet velocity on the whole
 *  boundary the pressure is fixed only up to a constant, so it is mean-free unless `meanFree: false` (a study with
 *  an outflow boundary). */
export function stokes(args: { nu: CoefficientValue; meanFree?: boolean }): PdeDeclaration {
  return {
    label: 'Stokes',
    fields: { u: 'vector', p: 'scalar' },
    coefficients: { nu: args.nu },
    equations: { momentum: { flux: 'nu*grad(u) - p*I' }, mass: { rest: 'div(u)' } },
    meanFree: args.meanFree === false ? [] : ['p'],
    preset: { name: 'stokes', args },
  };
}

/** Nearly incompressible linear elasticity in mixed form, displacement u and pressure p = −λ ∇·u (Herrmann's
 *  formulation; Braess 2007, Finite Elements, ch. VI §3; Boffi, Brezzi & Fortin 2013, Mixed Finite Element Methods,
 *  §8.12): −∇·(2μ ε(u) − pI) = f and ∇·u + p/λ = g. Solved by rungs's own Taylor–Hood elements it does not lock as
 *  λ/μ → ∞ (Poisson's ratio → 1/2); at λ = ∞ it is Stokes flow with viscosity 2μ in the symmetric-gradient form.
 *  The natural data (2μ ε(u) − pI)n are the traction.
 *
 *  What the study gives: the exact u and the exact p, both as formulas. The constraint equation's source g is derived
 *  like every other: g = ∇·u + p/λ at the exact pair, so it vanishes when the given p is −λ ∇·u (write p out by hand
 *  from u, e.g. u with ∇·u = 4xy/λ and p = '-4*x*y'), and otherwise it is handed to the solver (a consistent
 *  discretization of another, equally valid manufactured problem). A displacement with ∇·u = O(1/λ) keeps p of
 *  order one as λ grows, which is what a nearly incompressible material does. λ and μ are formulas or numbers,
 *  μ > 0 and λ > 0. */
export function nearlyIncompressibleElasticity(args: { lambda: CoefficientValue; mu: CoefficientValue }): PdeDeclaration {
  return {
    label: 'nearly incompressible elasticity',
    fields: { u: 'vector', p: 'scalar' },
    coefficients: { lambda: args.lambda, mu: args.mu },
    equations: { momentum: { flux: '2*mu*sym(grad(u)) - p*I' }, mass: { rest: 'div(u) + p/lambda' } },
    preset: { name: 'nearly-incompressible-elasticity', args },
  };
}

/** Nonlinear diffusion −∇·(κ(u)∇u) + r(u) = f, with κ and r formulas in u (and x, y, z, t), e.g. κ = 1 + u^2,
 *  r = u^3. */
export function nonlinearDiffusion(args: { conductivity: string; reaction?: string }): PdeDeclaration {
  return {
    label: 'nonlinear diffusion',
    fields: { u: 'scalar' },
    equations: { balance: { flux: `(${args.conductivity})*grad(u)`, ...(args.reaction ? { rest: args.reaction } : {}) } },
    preset: { name: 'nonlinear-diffusion', args },
  };
}

/** The heat equation ∂u/∂t − ∇·(k∇u) = f of one scalar field (a kiln rod or a tile heating up), with the
 *  conductivity k a formula in x, y, z (or a number); the natural data k∇u·n. rungs's own elements advance it in
 *  time with the study's stepper (time: { final, stepper }); an external code with its own. */
export function heat(args: { k?: CoefficientValue } = {}): PdeDeclaration {
  const coefficients: Record<string, CoefficientValue> = {};
  if (args.k !== undefined) coefficients.k = args.k;
  return {
    label: 'heat equation',
    fields: { u: 'scalar' },
    coefficients,
    equations: { balance: { flux: args.k !== undefined ? 'k*grad(u)' : 'grad(u)', rest: 'dt(u)' } },
    preset: { name: 'heat', args },
  };
}
