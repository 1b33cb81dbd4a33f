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
