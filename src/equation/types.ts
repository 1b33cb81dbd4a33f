/** The kind of an unknown: one value per point, or one per coordinate direction. */
export type FieldKind = 'scalar' | 'vector';

/** A coefficient: a formula in x, y, z (and t), a number, or a list of them for a vector (a list of lists: a matrix). */
export type CoefficientValue = string | number | readonly (string | number)[] | readonly (readonly (string | number)[])[];

/** One equation in conservation form, −∇·F + R = s: F the flux (a vector for a scalar equation, a matrix for a vector
 *  one), R the remaining terms (time derivative, convection, reaction), both in the equation language; s, the
 *  source, is what rungs derives from the exact solution. The natural boundary data are F·n (n the outward normal). */
export interface EquationDeclaration {
  flux?: string;
  rest?: string;
  /** The field whose Dirichlet and Robin data pair with this equation (default: the field declared in the same
   *  position). */
  field?: string;
}

/** A PDE, as data: its unknowns, its coefficients and its equations. Presets (src/equation/presets.ts) return one. */
export interface PdeDeclaration {
  /** Name for reports, e.g. "linear elasticity". */
  label?: string;
  /** The unknowns in order, e.g. { u: 'vector', p: 'scalar' }. */
  fields: Record<string, FieldKind>;
  coefficients?: Record<string, CoefficientValue>;
  equations: Record<string, EquationDeclaration>;
  /** Fields fixed only up to a constant (a pressure with Dirichlet velocity everywhere): the solver fixes the mean,
   *  and the exact solution's mean over the domain is handed over with the data. */
  meanFree?: string[];
  /** Set by the presets: which preset and its arguments, so the built-in discretization can recognise the equation
   *  it solves. */
  preset?: { name: PresetName; args: Record<string, unknown> };
}

export type PresetName = 'diffusion-convection-reaction' | 'linear-elasticity' | 'stokes' | 'nonlinear-diffusion'
  | 'nearly-incompressible-elasticity' | 'heat';
