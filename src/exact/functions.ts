import { RungsInputError } from '../errors.ts';
import { checkConsistency, type ConsistencyOptions } from './consistency.ts';
import { fieldPath, type FieldNames, type QuantityName } from './field-names.ts';
import { checkDim } from './formula.ts';
import type { Dim, FluxFn, ManufacturedSolution, ScalarFn, VectorFn } from './types.ts';

/** A vector field given by the user: fills `out`, or returns its components (then they are copied into out). */
export type UserVectorFn = (x: number, y: number, z: number, out: Float64Array) => void | ArrayLike<number>;

/** A manufactured solution given as TypeScript functions (for solutions formulas cannot express). Coefficients may be
 *  numbers or functions; they default to k = 1, b = 0, c = 0. */
export interface FunctionInput {
  dim: Dim;
  u: ScalarFn;
  grad: UserVectorFn;
  f: ScalarFn;
  k?: number | ScalarFn;
  b?: readonly number[] | UserVectorFn;
  c?: number | ScalarFn;
  /** Total degree of u if the user knows it is a polynomial. */
  polynomialDegree?: number | null;
  /** Total degree of k if it is a polynomial given as a function. */
  kDegree?: number | null;
  /** Total degree of f if it is a polynomial. */
  fDegree?: number | null;
}

const GIVEN_AS_FUNCTION = '(given as a function)';

function requireFunction(value: unknown, fields: FieldNames, quantity: QuantityName): void {
  if (typeof value !== 'function') {
    const field = fieldPath(fields, quantity);
    throw new RungsInputError(`${field}: expected a function of (x, y, z), got ${typeof value}`, field);
  }
}

function scalar(value: number | ScalarFn | undefined, fallback: number, fields: FieldNames, quantity: QuantityName): ScalarFn {
  const v = value ?? fallback;
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) {
      const field = fieldPath(fields, quantity);
      throw new RungsInputError(`${field}: expected a finite number or a function, got ${v}`, field);
    }
    return () => v;
  }
  requireFunction(v, fields, quantity);
  return v;
}

function vector(value: readonly number[] | UserVectorFn | undefined, dim: Dim, fields: FieldNames, quantity: QuantityName): VectorFn {
  if (value === undefined) return (_x, _y, _z, out) => out.fill(0, 0, dim);
  if (typeof value !== 'function') {
    const field = fieldPath(fields, quantity);
    if (!Array.isArray(value) || value.length !== dim || !value.every(Number.isFinite)) {
      throw new RungsInputError(`${field}: expected ${dim} finite numbers or a function, got ${JSON.stringify(value)}`, field);
    }
    const constant = Float64Array.from(value);
    return (_x, _y, _z, out) => out.set(constant);
  }
  return (x, y, z, out) => {
    const returned = value(x, y, z, out);
    if (returned !== undefined && returned !== out) for (let i = 0; i < dim; i++) out[i] = returned[i];
  };
}

function describe(value: unknown): string {
  return typeof value === 'function' ? GIVEN_AS_FUNCTION : String(value ?? '');
}

/** Wrap user functions into a ManufacturedSolution after checkConsistency has compared grad and f with finite
 *  differences of u (default: 25 seeded points in [0,1]^dim). */
export function fromFunctions(input: FunctionInput, fields: FieldNames = '', options: ConsistencyOptions = {}): ManufacturedSolution {
  const { dim } = input;
  checkDim(dim, fieldPath(fields, 'u'));
  requireFunction(input.u, fields, 'u');
  requireFunction(input.grad, fields, 'grad');
  requireFunction(input.f, fields, 'f');
  const grad = vector(input.grad, dim, fields, 'grad');
  const k = scalar(input.k, 1, fields, 'k');
  const c = scalar(input.c, 0, fields, 'c');
  const b = vector(input.b, dim, fields, 'b');
  const solution = { dim, u: input.u, grad, f: input.f, k, b, c };
  checkConsistency(solution, fields, options);

  const scratch = new Float64Array(3);
  const flux: FluxFn = (x, y, z, nx, ny, nz) => {
    scratch.fill(0);
    grad(x, y, z, scratch);
    return k(x, y, z) * (scratch[0] * nx + scratch[1] * ny + scratch[2] * nz);
  };
  const bText =
    input.b === undefined ? Array.from({ length: dim }, () => '0')
    : typeof input.b === 'function' ? Array.from({ length: dim }, () => GIVEN_AS_FUNCTION)
    : input.b.map(String);
  return {
    ...solution,
    origin: 'functions',
    flux,
    formulas: {
      u: GIVEN_AS_FUNCTION,
      grad: Array.from({ length: dim }, () => GIVEN_AS_FUNCTION),
      f: GIVEN_AS_FUNCTION,
      k: describe(input.k ?? 1),
      b: bText,
      c: describe(input.c ?? 0),
    },
    polynomialDegree: input.polynomialDegree ?? null,
    kDegreeHint: typeof input.k === 'function' ? (input.kDegree ?? null) : 0,
    fDegreeHint: input.fDegree ?? null,
  };
}
