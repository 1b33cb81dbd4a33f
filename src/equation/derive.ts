import { ConstantNode, SymbolNode } from '../exact/mathjs.ts';
import type { MathNode } from 'mathjs';
import { RungsInputError } from '../errors.ts';
import { parseFormula } from '../exact/formula.ts';
import { simplifyDerived, type SimplifyMode } from '../exact/simplify.ts';
import type { Dim } from '../exact/types.ts';
import { evaluateExpression, type Scope } from './language.ts';
import {
  RANK_WORDS, components, mapTensor, matrix, negate, scalar, sum, terms, times, vector, zeroTensor, type Tensor,
} from './tensor.ts';
import type { CoefficientValue, FieldKind, PdeDeclaration } from './types.ts';

/** A field with its exact solution and gradient (components are formula trees in x, y, z, t). */
export interface DerivedField {
  name: string;
  kind: FieldKind;
  exact: Tensor;
  grad: Tensor;
}

/** An equation with everything derived from the exact solution. */
export interface DerivedEquation {
  name: string;
  /** 0 for a scalar equation, 1 for a vector one. */
  rank: 0 | 1;
  /** The field its Dirichlet and Robin data pair with. */
  field: string;
  flux: Tensor | null;
  rest: Tensor;
  /** s = −∇·F + R at the exact solution. */
  source: Tensor;
  /** F·n in the symbols nx, ny, nz (null without a flux). */
  normalFlux: Tensor | null;
}

export interface DerivedProblem {
  dim: Dim;
  /** True when a formula depends on t or an equation takes a time derivative. */
  hasTime: boolean;
  fields: DerivedField[];
  coefficients: Map<string, Tensor>;
  equations: DerivedEquation[];
  meanFree: string[];
}

export interface DeriveInput {
  dim: Dim;
  pde: PdeDeclaration;
  /** Exact solution per field: one formula for a scalar field, one per coordinate for a vector field. */
  exact: Record<string, string | readonly string[]>;
  /** Path prefixes for messages. */
  paths?: { pde?: string; exact?: string };
  simplify?: SimplifyMode;
  /** Admit t in formulas and dt() in equations (default true); steady callers (the built-in solver) say false. */
  time?: boolean;
}

export const NORMAL_SYMBOLS = ['nx', 'ny', 'nz'] as const;

const NAME = /^[A-Za-z][A-Za-z0-9_]*$/;
/** Names the language itself uses; a field or coefficient may not take them. */
const RESERVED = new Set(['x', 'y', 'z', 't', 'pi', 'e', 'I', 'nx', 'ny', 'nz']);

function checkName(name: string, path: string): void {
  if (!NAME.test(name) || RESERVED.has(name)) {
    throw new RungsInputError(`${path}: '${name}' cannot name a field, coefficient or equation; use letters, digits and _ (starting with a letter), not one of ${[...RESERVED].join(', ')}`, path);
  }
}

/** Parse a coefficient into a tensor: a formula or number (scalar), a list (vector), a list of lists (matrix). */
function coefficientTensor(value: CoefficientValue, path: string, dim: Dim, time: boolean): Tensor {
  const one = (v: unknown, p: string): MathNode => {
    if (typeof v === 'number') {
      if (!Number.isFinite(v)) throw new RungsInputError(`${p}: expected a finite number or a formula, got ${v}`, p);
      return parseFormula(String(v), p, dim, { time });
    }
    if (typeof v === 'string') return parseFormula(v, p, dim, { time });
    throw new RungsInputError(`${p}: expected a formula, a number, or a list of ${dim} of them, got ${JSON.stringify(v)}`, p);
  };
  if (!Array.isArray(value)) return scalar(one(value, path));
  if (value.length !== dim) throw new RungsInputError(`${path}: expected ${dim} entries (one per coordinate in ${dim}D), got ${value.length}`, path);
  if (value.every((v) => !Array.isArray(v))) return vector(value.map((v, i) => one(v, `${path}[${i}]`)));
  return matrix(value.map((row, i) => {
    if (!Array.isArray(row) || row.length !== dim) throw new RungsInputError(`${path}[${i}]: expected a row of ${dim} entries`, path);
    return row.map((v, j) => one(v, `${path}[${i}][${j}]`));
  }));
}

function exactTensor(kind: FieldKind, value: unknown, path: string, dim: Dim, time: boolean): Tensor {
  if (kind === 'scalar') {
    if (typeof value !== 'string') throw new RungsInputError(`${path}: the field is scalar; expected one formula string, got ${JSON.stringify(value)}`, path);
    return scalar(parseFormula(value, path, dim, { time }));
  }
  if (!Array.isArray(value) || value.length !== dim || !value.every((v) => typeof v === 'string')) {
    throw new RungsInputError(`${path}: the field is a vector; expected ${dim} formula strings (one per component), got ${JSON.stringify(value)}`, path);
  }
  return vector(value.map((v, i) => parseFormula(v, `${path}[${i}]`, dim, { time })));
}

/** The rank of the unknown of each kind. */
const FIELD_RANK: Record<FieldKind, 0 | 1> = { scalar: 0, vector: 1 };

/** Derive every source, flux and boundary datum of a PDE from its exact solution, symbolically. Errors name the
 *  field path, what was found and what would be valid. */
export function derive(input: DeriveInput): DerivedProblem {
  const { dim, pde } = input;
  const pdePath = input.paths?.pde ?? 'pde';
  const exactPath = input.paths?.exact ?? 'exact';
  const mode = input.simplify ?? 'auto';
  const time = input.time ?? true;
  if (!pde || typeof pde !== 'object' || !pde.fields || typeof pde.fields !== 'object') {
    throw new RungsInputError(`${pdePath}.fields: missing; declare the unknowns, e.g. { u: 'vector', p: 'scalar' }`, pdePath);
  }
  const fieldNames = Object.keys(pde.fields);
  if (fieldNames.length === 0) throw new RungsInputError(`${pdePath}.fields: declare at least one unknown`, pdePath);
  const values = new Map<string, Tensor>();
  const coefficients = new Map<string, Tensor>();
  for (const [name, value] of Object.entries(pde.coefficients ?? {})) {
    checkName(name, `${pdePath}.coefficients.${name}`);
    const t = coefficientTensor(value, `${pdePath}.coefficients.${name}`, dim, time);
    coefficients.set(name, t);
    values.set(name, t);
  }
  const exactGiven = input.exact ?? {};
  for (const name of Object.keys(exactGiven)) {
    if (!fieldNames.includes(name)) {
      throw new RungsInputError(`${exactPath}.${name}: '${name}' is not a declared field; the fields are ${fieldNames.join(', ')}`, exactPath);
    }
  }
  const fields: DerivedField[] = fieldNames.map((name) => {
    const path = `${pdePath}.fields.${name}`;
    checkName(name, path);
    if (coefficients.has(name)) throw new RungsInputError(`${path}: '${name}' names both a field and a coefficient`, path);
    const kind = pde.fields[name];
    if (kind !== 'scalar' && kind !== 'vector') throw new RungsInputError(`${path}: expected 'scalar' or 'vector', got ${JSON.stringify(kind)}`, path);
    if (!Object.hasOwn(exactGiven, name)) {
      throw new RungsInputError(`${exactPath}.${name}: missing; give the exact ${kind} field ${name}${kind === 'vector' ? ` as ${dim} formulas` : ' as a formula'}`, exactPath);
    }
    const exact = exactTensor(kind, exactGiven[name], `${exactPath}.${name}`, dim, time);
    values.set(name, exact);
    const grad = evaluateExpression(`grad(${name})`, `${exactPath}.${name}`, { dim, values, time });
    return { name, kind, exact, grad };
  });
  const scope: Scope = { dim, values, time };

  const equationNames = Object.keys(pde.equations ?? {});
  if (equationNames.length === 0) throw new RungsInputError(`${pdePath}.equations: declare at least one equation, e.g. { balance: { flux: 'k*grad(u)' } }`, pdePath);
  const unknownCount = fields.reduce((n, f) => n + (f.kind === 'vector' ? dim : 1), 0);
  const equations = equationNames.map((name): DerivedEquation => {
    const path = `${pdePath}.equations.${name}`;
    checkName(name, path);
    const decl = pde.equations[name];
    if (!decl || typeof decl !== 'object' || (decl.flux === undefined && decl.rest === undefined)) {
      throw new RungsInputError(`${path}: give a flux, remaining terms or both (−∇·flux + rest = source)`, path);
    }
    const flux = decl.flux === undefined ? null : evaluateExpression(decl.flux, `${path}.flux`, scope);
    const rest = decl.rest === undefined ? null : evaluateExpression(decl.rest, `${path}.rest`, scope);
    const rank = rest ? rest.rank : flux!.rank - 1;
    if (rank !== 0 && rank !== 1) {
      throw new RungsInputError(`${path}: ${rest ? 'rest' : 'flux'} is ${RANK_WORDS[rest ? rest.rank : flux!.rank]}; an equation is scalar (flux a vector) or vector (flux a matrix)`, path);
    }
    if (flux && flux.rank !== rank + 1) {
      throw new RungsInputError(`${path}.flux: is ${RANK_WORDS[flux.rank]} but the equation is ${RANK_WORDS[rank]}${rest ? ' (its rest)' : ''}; a ${rank === 0 ? 'scalar equation needs a vector flux' : 'vector equation needs a matrix flux'}`, path);
    }
    const source = sourceOf(flux, rest, rank as 0 | 1, dim, mode);
    return { name, rank: rank as 0 | 1, field: decl.field ?? '', flux, rest: rest ?? zeroTensor(rank as 0 | 1, dim), source, normalFlux: flux ? normalFluxOf(flux, dim) : null };
  });
  // An equation of a shape no field has: its flux (or rest) does not match the unknowns.
  for (const e of equations) {
    if (fields.some((f) => FIELD_RANK[f.kind] === e.rank)) continue;
    const what = e.flux ? `flux is ${RANK_WORDS[e.flux.rank]}` : `rest is ${RANK_WORDS[e.rank]}`;
    throw new RungsInputError(
      `${pdePath}.equations.${e.name}.${e.flux ? 'flux' : 'rest'}: the ${what}, which makes a ${e.rank === 0 ? 'scalar' : 'vector'} equation, ` +
      `but no field is ${e.rank === 0 ? 'scalar' : 'a vector'} (${fields.map((f) => `${f.name}: ${f.kind}`).join(', ')}); ` +
      'a scalar field\'s equation has a vector flux (e.g. k*grad(u)), a vector field\'s a matrix flux (e.g. mu*grad(u))', pdePath);
  }
  const equationCount = equations.reduce((n, e) => n + (e.rank === 1 ? dim : 1), 0);
  if (equationCount !== unknownCount) {
    throw new RungsInputError(
      `${pdePath}.equations: ${equationCount} scalar equation(s) (${equations.map((e) => `${e.name}: ${RANK_WORDS[e.rank]}`).join(', ')}) for ${unknownCount} unknown component(s) (${fields.map((f) => `${f.name}: ${f.kind}`).join(', ')}); ` +
      'each unknown component needs one equation', pdePath);
  }
  // Each equation pairs with one field of its own shape (its Dirichlet and Robin data): the one named, else the first
  // unpaired field of that shape in declaration order.
  const paired = new Map<string, string>();
  for (const e of equations) {
    const path = `${pdePath}.equations.${e.name}`;
    const rank = e.rank;
    const name = e.name;
    const fieldName = e.field || fields.find((f) => FIELD_RANK[f.kind] === rank && !paired.has(f.name) && !equations.some((o) => o.field === f.name))?.name;
    if (fieldName === undefined || !fieldNames.includes(fieldName)) {
      throw new RungsInputError(`${path}.field: ${fieldName === undefined ? `no unpaired ${rank === 0 ? 'scalar' : 'vector'} field is left for this ${RANK_WORDS[rank].replace(/^an? /, '')} equation` : `'${fieldName}' is not a declared field`}; the fields are ${fields.map((f) => `${f.name} (${f.kind})`).join(', ')}`, path);
    }
    const kind = pde.fields[fieldName];
    if (FIELD_RANK[kind] !== rank) {
      throw new RungsInputError(`${path}.field: '${fieldName}' is a ${kind} field but the equation is ${RANK_WORDS[rank]}; pair it with a field of its own shape`, path);
    }
    if (paired.has(fieldName)) {
      throw new RungsInputError(`${path}.field: '${fieldName}' is already paired with equation '${paired.get(fieldName)}'; each field pairs with one equation`, path);
    }
    paired.set(fieldName, name);
    e.field = fieldName;
  }
  const meanFree = pde.meanFree ?? [];
  for (const name of meanFree) {
    if (!fieldNames.includes(name)) throw new RungsInputError(`${pdePath}.meanFree: '${name}' is not a declared field; the fields are ${fieldNames.join(', ')}`, pdePath);
  }
  // Time enters through the exact fields, the coefficients, the equations themselves (t*u, exp(-t)*grad(u)) or dt().
  const trees = [
    ...fields.flatMap((f) => components(f.exact)), ...[...coefficients.values()].flatMap(components),
    ...equations.flatMap((e) => [...components(e.source), ...(e.normalFlux ? components(e.normalFlux) : [])]),
  ];
  const hasTime = trees.some(usesTime) || Object.values(pde.equations).some((e) => /\bdt\s*\(/.test(`${e.flux ?? ''} ${e.rest ?? ''}`));
  return { dim, hasTime, fields, coefficients, equations, meanFree };
}

/** s = −∇·F + R, simplified once as a whole (the terms of R after the divergence, as the scalar derivation always
 *  built them, so that today's equation gets the same trees). */
function sourceOf(flux: Tensor | null, rest: Tensor | null, rank: 0 | 1, dim: Dim, mode: SimplifyMode): Tensor {
  const div = flux ? evaluateDivergence(flux, dim) : null;
  const parts = (i: number): MathNode[] => {
    const out: MathNode[] = [];
    if (div) out.push(negate(div.rank === 0 ? div.c : (div.c as MathNode[])[i]));
    if (rest) out.push(...terms(rest.rank === 0 ? rest.c : (rest.c as MathNode[])[i]));
    return out;
  };
  const one = (i: number) => simplifyDerived(sum(parts(i)), dim, mode);
  return rank === 0 ? scalar(one(0)) : vector(Array.from({ length: dim }, (_, i) => one(i)));
}

function evaluateDivergence(flux: Tensor, dim: Dim): Tensor {
  return evaluateExpression('div(F)', 'flux', { dim, values: new Map([['F', flux]]), time: true });
}

/** F·n: Σ_j F_j n_j for a scalar equation, (Σ_j F_ij n_j)_i for a vector one. */
function normalFluxOf(flux: Tensor, dim: Dim): Tensor {
  const n = NORMAL_SYMBOLS.slice(0, dim).map((s) => new SymbolNode(s));
  if (flux.rank === 1) return scalar(sum(flux.c.map((f, j) => times(f, n[j]))));
  if (flux.rank === 2) return vector(flux.c.map((row) => sum(row.map((f, j) => times(f, n[j])))));
  throw new Error('normalFluxOf: flux of rank 0');
}

/** True when the tree mentions t. */
export function usesTime(node: MathNode): boolean {
  let found = false;
  node.traverse((n) => {
    if (n.type === 'SymbolNode' && (n as unknown as { name: string }).name === 't') found = true;
  });
  return found;
}

/** The tree at t = 0 (initial data). */
export function atTimeZero(t: Tensor, dim: Dim): Tensor {
  return mapTensor(t, (c) => simplifyDerived(c.transform((n) => (
    n.type === 'SymbolNode' && (n as unknown as { name: string }).name === 't' ? new ConstantNode(0) : n)), dim, 'light'));
}

export { FIELD_RANK };
