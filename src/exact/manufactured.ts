import { RungsInputError } from '../errors.ts';
import { compileFlux, compileScalar, compileValueAndGradient, compileVector } from './compile.ts';
import { fieldPath, type FieldNames } from './field-names.ts';
import { assertFinite } from './finite.ts';
import { parseFormula } from './formula.ts';
import { polynomialDegree } from './polynomial.ts';
import { checkBox } from './sample-points.ts';
import type { SimplifyMode } from './simplify.ts';
import { gradientTrees, sourceTree } from './source-term.ts';
import type { BoundingBox, Dim, ManufacturedSolution } from './types.ts';

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

export function checkDim(dim: unknown, field: string): asserts dim is Dim {
  if (dim !== 1 && dim !== 2 && dim !== 3) {
    throw new RungsInputError(`${field}: dimension must be 1, 2 or 3, got ${String(dim)}`, field);
  }
}

/** Derive ∇u and f = −∇·(k∇u) + b·∇u + c·u symbolically (mathjs derivative) and compile every piece to a plain
 *  function. Errors name the field paths given by `fields`. */
export function manufacture(input: FormulaInput, fields: FieldNames = '', options: ManufactureOptions = {}): ManufacturedSolution {
  const { dim } = input;
  checkDim(dim, fieldPath(fields, 'u'));
  const mode = options.simplify ?? 'auto';
  const bField = fieldPath(fields, 'b');

  const u = parseFormula(input.u, fieldPath(fields, 'u'), dim);
  const k = parseFormula(input.k ?? '1', fieldPath(fields, 'k'), dim);
  const c = parseFormula(input.c ?? '0', fieldPath(fields, 'c'), dim);
  const bTexts = input.b ?? Array.from({ length: dim }, () => '0');
  if (!Array.isArray(bTexts) || bTexts.length !== dim) {
    throw new RungsInputError(`${bField}: expected ${dim} formula(s), one per coordinate, got ${JSON.stringify(bTexts)}`, bField);
  }
  const b = bTexts.map((text, i) => parseFormula(text, `${bField}[${i}]`, dim));

  const grad = gradientTrees(u, dim, mode);
  const f = sourceTree({ u, grad, k, b, c }, dim, mode);

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
