import { ConstantNode, FunctionNode, OperatorNode, SymbolNode, parse } from '../exact/mathjs.ts';
import type { MathNode } from 'mathjs';
import { RungsInputError } from '../errors.ts';
import { CONSTANTS, FUNCTION_ARITY, variablesOf } from '../exact/formula.ts';
import { simplifyDerived } from '../exact/simplify.ts';
import { differentiate } from '../exact/differentiate.ts';
import type { Dim } from '../exact/types.ts';
import {
  RANK_WORDS, ZERO, components, divide, identity, mapTensor, matrix, negate, scalar, sum, times, vector, zipTensor,
  type Tensor,
} from './tensor.ts';

/** The operators of the equation language, with what each does: one list, used by the evaluator and the messages. */
export const TENSOR_FUNCTIONS: Readonly<Record<string, string>> = {
  grad: 'grad(a): gradient; of a vector v the matrix ∂v_i/∂x_j',
  div: 'div(a): divergence; of a matrix A the vector Σ_j ∂A_ij/∂x_j (row-wise)',
  dot: 'dot(a, b): contraction of the last index of a with the first of b (vector·vector, matrix·vector, matrix·matrix)',
  outer: 'outer(a, b): the matrix a_i b_j',
  transpose: 'transpose(A)',
  sym: 'sym(A): (A + Aᵀ)/2',
  trace: 'trace(A)',
  dt: 'dt(a): the time derivative ∂a/∂t',
};

/** The identity matrix's name in the language. */
export const IDENTITY = 'I';

/** What an expression of the equation language may use, for messages. */
export function languageVocabulary(dim: Dim, names: readonly string[], time = true): string {
  return `fields and coefficients ${names.join(', ') || '(none)'}; variables ${variablesOf(dim, time).join(', ')}; ` +
    `constants ${CONSTANTS.join(', ')}, ${IDENTITY} (identity); operators + - * / ^, a[i] and A[i, j] (1-based); ` +
    `tensor functions ${Object.keys(TENSOR_FUNCTIONS).join(', ')}; scalar functions ${Object.keys(FUNCTION_ARITY).join(', ')}`;
}

/** What the evaluator substitutes for a name: a field's exact solution or a coefficient, as tensors. */
export interface Scope {
  dim: Dim;
  values: ReadonlyMap<string, Tensor>;
  /** Whether t and dt() are admitted. */
  time: boolean;
}

/** Evaluate an expression of the equation language to a tensor of formula trees in x, y, z, t. `field` is the path
 *  named in messages (e.g. "pde.equations.momentum.flux"). Derivatives are symbolic (mathjs), so the result is exact. */
export function evaluateExpression(text: string, field: string, scope: Scope): Tensor {
  if (typeof text !== 'string' || text.trim() === '') {
    throw new RungsInputError(`${field}: expected an expression of the equation language, got ${JSON.stringify(text)}`, field);
  }
  let node: MathNode;
  try {
    node = parse(text);
  } catch (err) {
    const message = err instanceof Error ? err.message.replace(/\s*\(char \d+\)\s*$/, '') : String(err);
    throw new RungsInputError(`${field}: cannot parse "${text}": ${message}`, field);
  }
  return new Evaluator(text, field, scope).value(node);
}

class Evaluator {
  constructor(private readonly text: string, private readonly field: string, private readonly scope: Scope) {}

  private fail(what: string): never {
    const names = [...this.scope.values.keys()];
    throw new RungsInputError(`${this.field}: ${what} in "${this.text}"; valid: ${languageVocabulary(this.scope.dim, names, this.scope.time)}`, this.field);
  }

  private shapeError(what: string): never {
    throw new RungsInputError(`${this.field}: ${what} in "${this.text}"`, this.field);
  }

  value(node: MathNode): Tensor {
    switch (node.type) {
      case 'ConstantNode': {
        const v = (node as unknown as { value: unknown }).value;
        if (typeof v !== 'number') this.fail(`the constant ${JSON.stringify(v)}`);
        return scalar(node);
      }
      case 'SymbolNode':
        return this.symbol((node as unknown as { name: string }).name, node);
      case 'ParenthesisNode':
        return this.value((node as unknown as { content: MathNode }).content);
      case 'OperatorNode':
        return this.operator(node as unknown as { fn: string; op: string; args: MathNode[] });
      case 'FunctionNode':
        return this.call(node as unknown as { fn: MathNode; args: MathNode[] });
      case 'AccessorNode':
        return this.access(node as unknown as { object: MathNode; index: { dimensions: MathNode[] } });
      default:
        return this.fail(`the construct "${node.toString()}" (${node.type})`);
    }
  }

  private symbol(name: string, node: MathNode): Tensor {
    const bound = this.scope.values.get(name);
    if (bound) return bound;
    if (name === IDENTITY) return identity(this.scope.dim);
    if (variablesOf(this.scope.dim, this.scope.time).includes(name) || CONSTANTS.includes(name)) return scalar(node);
    return this.fail(`the name "${name}" is not declared`);
  }

  private operator(op: { fn: string; op: string; args: MathNode[] }): Tensor {
    const a = op.args.map((arg) => this.value(arg));
    switch (op.fn) {
      case 'unaryMinus': return mapTensor(a[0], negate);
      case 'unaryPlus': return a[0];
      case 'add':
      case 'subtract': {
        if (a[0].rank !== a[1].rank) this.shapeError(`"${op.op}" between ${RANK_WORDS[a[0].rank]} and ${RANK_WORDS[a[1].rank]}`);
        return zipTensor(a[0], a[1], (x, y) => sum([x, op.fn === 'add' ? y : negate(y)]));
      }
      case 'multiply': {
        if (a[0].rank === 0) return mapTensor(a[1], (c) => times(a[0].c as MathNode, c));
        if (a[1].rank === 0) return mapTensor(a[0], (c) => times(c, a[1].c as MathNode));
        return this.shapeError(`"*" between ${RANK_WORDS[a[0].rank]} and ${RANK_WORDS[a[1].rank]} (use dot() or outer())`);
      }
      case 'divide': {
        if (a[1].rank !== 0) this.shapeError(`division by ${RANK_WORDS[a[1].rank]}`);
        return mapTensor(a[0], (c) => divide(c, a[1].c as MathNode));
      }
      case 'pow': {
        if (a[0].rank !== 0 || a[1].rank !== 0) this.shapeError('"^" on a vector or matrix (powers are for scalars)');
        return scalar(new OperatorNode('^', 'pow', [a[0].c as MathNode, a[1].c as MathNode]));
      }
      default:
        return this.fail(`the operator "${op.op}"`);
    }
  }

  private call(fn: { fn: MathNode; args: MathNode[] }): Tensor {
    if (fn.fn.type !== 'SymbolNode') this.fail('a computed function call');
    const name = (fn.fn as unknown as { name: string }).name;
    if (name === 'dt' && !this.scope.time) this.fail('the time derivative dt() (this study is steady)');
    if (Object.hasOwn(TENSOR_FUNCTIONS, name)) return this.tensorCall(name, fn.args);
    const arity = Object.hasOwn(FUNCTION_ARITY, name) ? FUNCTION_ARITY[name] : undefined;
    if (arity === undefined) return this.fail(`the function "${name}"`);
    if (!arity.includes(fn.args.length)) this.fail(`"${name}" with ${fn.args.length} argument(s) (takes ${arity.join(' or ')})`);
    const args = fn.args.map((arg) => this.value(arg));
    for (const a of args) if (a.rank !== 0) this.shapeError(`${name}() of ${RANK_WORDS[a.rank]} (scalar functions take scalars)`);
    return scalar(new FunctionNode(new SymbolNode(name), args.map((a) => a.c as MathNode)));
  }

  private tensorCall(name: string, rawArgs: MathNode[]): Tensor {
    const wanted = name === 'dot' || name === 'outer' ? 2 : 1;
    if (rawArgs.length !== wanted) this.fail(`"${name}" with ${rawArgs.length} argument(s) (takes ${wanted})`);
    const args = rawArgs.map((arg) => this.value(arg));
    const dim = this.scope.dim;
    const coords = variablesOf(dim, false);
    const a = args[0];
    switch (name) {
      case 'grad': {
        // Components simplified as they are made, as for the scalar gradient: it keeps later derivatives small.
        const g = (c: MathNode) => coords.map((v) => simplifyDerived(differentiate(c, v), dim));
        if (a.rank === 0) return vector(g(a.c));
        if (a.rank === 1) return matrix(a.c.map(g));
        return this.shapeError('grad() of a matrix (the language stops at matrices)');
      }
      case 'div': {
        // Not simplified here: the source is simplified once, as a whole.
        const d = (row: MathNode[]) => rawSum(row.map((c, j) => differentiate(c, coords[j])));
        if (a.rank === 1) return scalar(d(a.c));
        if (a.rank === 2) return vector(a.c.map(d));
        return this.shapeError('div() of a scalar (take grad() first)');
      }
      case 'dt':
        return mapTensor(a, (c) => simplifyDerived(differentiate(c, 't'), dim));
      case 'transpose':
        if (a.rank !== 2) this.shapeError(`transpose() of ${RANK_WORDS[a.rank]}`);
        return matrix(a.c.map((row, i) => row.map((_, j) => a.c[j][i])));
      case 'sym':
        if (a.rank !== 2) this.shapeError(`sym() of ${RANK_WORDS[a.rank]}`);
        return matrix(a.c.map((row, i) => row.map((x, j) => (i === j ? x : times(new ConstantNode(0.5), sum([x, a.c[j][i]]))))));
      case 'trace':
        if (a.rank !== 2) this.shapeError(`trace() of ${RANK_WORDS[a.rank]}`);
        return scalar(sum(a.c.map((row, i) => row[i])));
      case 'dot':
        return this.dot(a, args[1]);
      case 'outer': {
        const b = args[1];
        if (a.rank !== 1 || b.rank !== 1) this.shapeError(`outer() of ${RANK_WORDS[a.rank]} and ${RANK_WORDS[b.rank]} (takes two vectors)`);
        return matrix(a.c.map((x) => b.c.map((y) => times(x, y))));
      }
      default:
        return this.fail(`the function "${name}"`);
    }
  }

  private dot(a: Tensor, b: Tensor): Tensor {
    if (a.rank === 1 && b.rank === 1) return scalar(sum(a.c.map((x, i) => times(x, b.c[i]))));
    if (a.rank === 2 && b.rank === 1) return vector(a.c.map((row) => sum(row.map((x, j) => times(x, b.c[j])))));
    if (a.rank === 1 && b.rank === 2) return vector(b.c[0].map((_, j) => sum(a.c.map((x, i) => times(x, b.c[i][j])))));
    if (a.rank === 2 && b.rank === 2) {
      return matrix(a.c.map((row) => b.c[0].map((_, j) => sum(row.map((x, k) => times(x, b.c[k][j]))))));
    }
    return this.shapeError(`dot() of ${RANK_WORDS[a.rank]} and ${RANK_WORDS[b.rank]} (use * with a scalar)`);
  }

  private access(acc: { object: MathNode; index: { dimensions: MathNode[] } }): Tensor {
    const t = this.value(acc.object);
    const idx = acc.index.dimensions.map((d) => {
      const v = d.type === 'ConstantNode' ? (d as unknown as { value: unknown }).value : undefined;
      if (typeof v !== 'number' || !Number.isInteger(v)) this.fail(`the index "${d.toString()}" (indices are the numbers 1 to ${this.scope.dim})`);
      if (v < 1 || v > this.scope.dim) this.shapeError(`index ${v} of "${acc.object.toString()}" is out of range: components are 1 to ${this.scope.dim} in ${this.scope.dim}D`);
      return v - 1;
    });
    if (idx.length !== t.rank) this.shapeError(`"${acc.object.toString()}" is ${RANK_WORDS[t.rank]} and takes ${t.rank} index(es), got ${idx.length}`);
    if (t.rank === 1) return scalar(t.c[idx[0]]);
    if (t.rank === 2) return scalar(t.c[idx[0]][idx[1]]);
    return this.shapeError(`a scalar cannot be indexed: "${acc.object.toString()}"`);
  }
}

/** Σ parts exactly as written (no zero dropped): the divergence keeps the shape of the scalar source derivation. */
function rawSum(parts: MathNode[]): MathNode {
  if (parts.length === 0) return ZERO;
  return parts.reduce((x, y) => new OperatorNode('+', 'add', [x, y]));
}

export { components };
