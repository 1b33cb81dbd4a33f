import { parse } from './mathjs.ts';
import type { MathNode } from 'mathjs';
import { RungsInputError } from '../errors.ts';
import type { Dim } from './types.ts';
import { compileScalar as compileScalarOf } from './compile.ts';

/** Coordinate names per dimension. */
export const VARIABLES: Record<Dim, readonly string[]> = { 1: ['x'], 2: ['x', 'y'], 3: ['x', 'y', 'z'] };

/** Named constants a formula may use. */
export const CONSTANTS: readonly string[] = ['pi', 'e'];

/** Functions a formula may call, with the argument counts allowed. Only functions mathjs can differentiate are listed,
 *  so every accepted formula has a symbolic gradient and source term. */
export const FUNCTION_ARITY: Readonly<Record<string, readonly number[]>> = {
  sin: [1], cos: [1], tan: [1], sec: [1], csc: [1], cot: [1],
  asin: [1], acos: [1], atan: [1], acot: [1], asec: [1], acsc: [1],
  sinh: [1], cosh: [1], tanh: [1], sech: [1], csch: [1], coth: [1],
  asinh: [1], acosh: [1], atanh: [1], acoth: [1], asech: [1], acsch: [1],
  exp: [1], log: [1, 2], log10: [1], sqrt: [1], cbrt: [1], abs: [1], pow: [2],
};

/** Arithmetic operators a formula may use, by mathjs operator function name. */
const OPERATORS: ReadonlySet<string> = new Set(['add', 'subtract', 'multiply', 'divide', 'pow', 'unaryMinus', 'unaryPlus']);

/** What a formula in `dim` dimensions may contain, for error messages. */
export function validVocabulary(dim: Dim, time = false): string {
  return (
    `variables ${variablesOf(dim, time).join(', ')}; constants ${CONSTANTS.join(', ')}; operators + - * / ^; ` +
    `functions ${Object.keys(FUNCTION_ARITY).join(', ')}`
  );
}

/** The variables a formula may use: the coordinates of `dim`, and t where time is admitted. */
export function variablesOf(dim: Dim, time: boolean): readonly string[] {
  return time ? [...VARIABLES[dim], 't'] : VARIABLES[dim];
}

export interface FormulaOptions {
  /** Admit the time t (formulas of time-dependent studies and of generated data). */
  time?: boolean;
}

/** Parse a formula and check it uses only the coordinates of `dim`, pi, e, arithmetic and whitelisted functions.
 *  `field` is the path of the input field (e.g. "exact" or "coefficients.k") named in any error. */
export function parseFormula(text: string, field: string, dim: Dim, options: FormulaOptions = {}): MathNode {
  const time = options.time ?? false;
  if (typeof text !== 'string') {
    throw new RungsInputError(`${field}: expected a formula string, got ${typeof text}`, field);
  }
  if (text.trim() === '') {
    throw new RungsInputError(`${field}: the formula is empty; give an expression in ${variablesOf(dim, time).join(', ')}`, field);
  }
  let node: MathNode;
  try {
    node = parse(text);
  } catch (err) {
    throw parseError(err, text, field);
  }
  checkNode(node, text, field, dim, time);
  return node;
}

function parseError(err: unknown, text: string, field: string): RungsInputError {
  const message = err instanceof Error ? err.message : String(err);
  const char = (err as { char?: unknown } | null)?.char;
  const column = typeof char === 'number' ? char : null;
  // mathjs appends "(char N)" with a 1-based column; restate it once, in words.
  const reason = message.replace(/\s*\(char \d+\)\s*$/, '');
  const where = column === null ? '' : ` at column ${column}`;
  return new RungsInputError(`${field}: cannot parse "${text}": ${reason}${where}`, field);
}

function reject(text: string, field: string, dim: Dim, what: string, time = false): never {
  throw new RungsInputError(`${field}: ${what} in "${text}" is not allowed in ${dim}D; valid: ${validVocabulary(dim, time)}`, field);
}

function checkNode(node: MathNode, text: string, field: string, dim: Dim, time: boolean): void {
  switch (node.type) {
    case 'ConstantNode': {
      const value = (node as unknown as { value: unknown }).value;
      if (typeof value !== 'number') reject(text, field, dim, `the constant ${JSON.stringify(value)}`, time);
      return;
    }
    case 'SymbolNode': {
      const name = (node as unknown as { name: string }).name;
      if (!variablesOf(dim, time).includes(name) && !CONSTANTS.includes(name)) reject(text, field, dim, `the symbol "${name}"`, time);
      return;
    }
    case 'ParenthesisNode':
      checkNode((node as unknown as { content: MathNode }).content, text, field, dim, time);
      return;
    case 'OperatorNode': {
      const op = node as unknown as { op: string; fn: string; args: MathNode[]; isPercentage?: boolean };
      if (op.isPercentage === true) reject(text, field, dim, 'the percent sign', time);
      if (!OPERATORS.has(op.fn)) reject(text, field, dim, `the operator "${op.op}"`, time);
      for (const arg of op.args) checkNode(arg, text, field, dim, time);
      return;
    }
    case 'FunctionNode': {
      const fn = node as unknown as { fn: MathNode; args: MathNode[] };
      if (fn.fn.type !== 'SymbolNode') reject(text, field, dim, 'a computed function call', time);
      const name = (fn.fn as unknown as { name: string }).name;
      const arity = Object.hasOwn(FUNCTION_ARITY, name) ? FUNCTION_ARITY[name] : undefined;
      if (arity === undefined) reject(text, field, dim, `the function "${name}"`, time);
      if (!arity.includes(fn.args.length)) {
        reject(text, field, dim, `"${name}" with ${fn.args.length} argument(s) (takes ${arity.join(' or ')})`, time);
      }
      for (const arg of fn.args) checkNode(arg, text, field, dim, time);
      return;
    }
    default:
      reject(text, field, dim, `the construct "${node.toString()}" (${node.type})`, time);
  }
}

export function checkDim(dim: unknown, field: string): asserts dim is Dim {
  if (dim !== 1 && dim !== 2 && dim !== 3) {
    throw new RungsInputError(`${field}: dimension must be 1, 2 or 3, got ${String(dim)}`, field);
  }
}

/** A formula compiled on its own (a coefficient, a Robin α). */
export function compileFormula(text: string, field: string, dim: Dim): (x: number, y: number, z: number) => number {
  return compileScalarOf(parseFormula(text, field, dim));
}
