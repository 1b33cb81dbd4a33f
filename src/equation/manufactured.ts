import type { MathNode } from 'mathjs';
import { RungsInputError } from '../errors.ts';
import { compileFlux, compileScalar, compileValueAndGradient, compileVector } from '../exact/compile.ts';
import { fieldPath, type FieldNames } from '../exact/field-names.ts';
import { assertFinite } from '../exact/finite.ts';
import { checkDim } from '../exact/formula.ts';
import { polynomialDegree } from '../exact/polynomial.ts';
import { checkBox } from '../exact/sample-points.ts';
import type { SimplifyMode } from '../exact/simplify.ts';
import type { BoundingBox, ManufacturedSolution } from '../exact/types.ts';
import { derive, type DerivedProblem } from './derive.ts';
import { ONE, ZERO } from './tensor.ts';
import { diffusionConvectionReaction } from './presets.ts';
import type { Dim } from '../exact/types.ts';

/** A manufactured solution given as formula strings; coefficients default to k = 1, b = 0, c = 0. */
export interface FormulaInput {
  dim: Dim;
  u: string;
  k?: string;
  /** One formula per coordinate. */
  b?: readonly string[];
  c?: string;
}

export interface ManufactureOptions {
  /** When given, u and f must be finite at seeded points inside this box (the domain's bounding box). */
  box?: BoundingBox;
  /** Points for that check (default 64). */
  finitePoints?: number;
  /** Simplification of the derived trees (default 'auto': full simplify only where it is cheap). */
  simplify?: SimplifyMode;
}

/** Derive ∇u and f = −∇·(k∇u) + b·∇u + c·u symbolically through the equation language (the preset
 *  diffusionConvectionReaction, src/equation/presets.ts) and compile every piece to a plain function. Errors name the
 *  field paths given by `fields`. */
export function manufacture(input: FormulaInput, fields: FieldNames = '', options: ManufactureOptions = {}): ManufacturedSolution {
  return manufactureDerived(input, fields, options).solution;
}

/** manufacture, also returning the derivation (the PDE as data, for the generated code handed to external solvers). */
export function manufactureDerived(
  input: FormulaInput, fields: FieldNames = '', options: ManufactureOptions = {},
): { solution: ManufacturedSolution; derived: DerivedProblem } {
  const { dim } = input;
  checkDim(dim, fieldPath(fields, 'u'));
  const mode = options.simplify ?? 'auto';
  const bField = fieldPath(fields, 'b');

  if (input.b !== undefined && (!Array.isArray(input.b) || input.b.length !== dim)) {
    throw new RungsInputError(`${bField}: expected ${dim} formula(s), one per coordinate, got ${JSON.stringify(input.b)}`, bField);
  }
  const derived = deriveScalar(input, fields, mode);
  return { solution: solutionOf(derived, fields, options), derived };
}

/** The compiled ManufacturedSolution of an already derived scalar preset (one derivation, whoever derived it). */
export function solutionOf(derived: DerivedProblem, fields: FieldNames = '', options: ManufactureOptions = {}): ManufacturedSolution {
  const { dim } = derived;
  const [field] = derived.fields;
  const u = field.exact.c as MathNode;
  const grad = field.grad.c as MathNode[];
  const f = derived.equations[0].source.c as MathNode;
  const coefficient = (name: string, fallback: MathNode): MathNode => (derived.coefficients.get(name)?.c as MathNode | undefined) ?? fallback;
  const k = coefficient('k', ONE);
  const c = coefficient('c', ZERO);
  const b = (derived.coefficients.get('b')?.c as MathNode[] | undefined) ?? Array.from({ length: dim }, () => ZERO);

  const solution: ManufacturedSolution = {
    dim,
    origin: 'formulas',
    u: compileScalar(u),
    grad: compileVector(grad),
    valueAndGrad: compileValueAndGradient(u, grad),
    f: compileScalar(f),
    k: compileScalar(k),
    b: compileVector(b),
    c: compileScalar(c),
    flux: compileFlux(k, grad),
    formulas: {
      u: u.toString(),
      grad: grad.map((g) => g.toString()),
      f: f.toString(),
      k: k.toString(),
      b: b.map((node) => node.toString()),
      c: c.toString(),
    },
    polynomialDegree: polynomialDegree(u),
    kDegreeHint: polynomialDegree(k),
    fDegreeHint: polynomialDegree(f),
  };

  if (options.box !== undefined) {
    checkBox(options.box, dim, `${fieldPath(fields, 'u')} (bounding box)`);
    const n = options.finitePoints ?? 64;
    assertFinite(solution.u, fieldPath(fields, 'u'), options.box, n);
    assertFinite(solution.f, `source term f derived from ${fieldPath(fields, 'u')}`, options.box, n);
  }
  return solution;
}

/** The scalar preset derived for a formula input; messages name the study's own field paths (exact, coefficients.k). */
function deriveScalar(input: FormulaInput, fields: FieldNames, mode: SimplifyMode) {
  const pde = diffusionConvectionReaction({ k: input.k, b: input.b, c: input.c });
  try {
    return derive({ dim: input.dim, pde, exact: { u: input.u }, simplify: mode, time: false });
  } catch (err) {
    if (!(err instanceof RungsInputError)) throw err;
    // derive names its own paths (exact.u, pde.coefficients.k); say them the way this caller named them.
    const renamed = err.message
      .replace(/^exact\.u/, fieldPath(fields, 'u'))
      .replace(/^pde\.coefficients\.(k|c)/, (_m, q: 'k' | 'c') => fieldPath(fields, q))
      .replace(/^pde\.coefficients\.b/, fieldPath(fields, 'b'));
    throw new RungsInputError(renamed, err.where);
  }
}
