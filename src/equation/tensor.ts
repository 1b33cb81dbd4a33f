import { ConstantNode, OperatorNode } from '../exact/mathjs.ts';
import type { MathNode } from 'mathjs';

/** A value of the equation language: a scalar, a vector of `dim` components or a dim × dim matrix (row-major), each
 *  component a formula tree in x, y, z, t. Fields, coefficients, fluxes and sources are all tensors. */
export type Tensor =
  | { rank: 0; c: MathNode }
  | { rank: 1; c: MathNode[] }
  | { rank: 2; c: MathNode[][] };

export const RANK_WORDS = ['a scalar', 'a vector', 'a matrix'] as const;

export const scalar = (c: MathNode): Tensor => ({ rank: 0, c });
export const vector = (c: MathNode[]): Tensor => ({ rank: 1, c });
export const matrix = (c: MathNode[][]): Tensor => ({ rank: 2, c });

/** Every component in row-major order. */
export function components(t: Tensor): MathNode[] {
  return t.rank === 0 ? [t.c] : t.rank === 1 ? [...t.c] : t.c.flat();
}

/** The same shape with each component mapped. */
export function mapTensor(t: Tensor, f: (c: MathNode) => MathNode): Tensor {
  if (t.rank === 0) return scalar(f(t.c));
  if (t.rank === 1) return vector(t.c.map(f));
  return matrix(t.c.map((row) => row.map(f)));
}

/** Two same-shape tensors combined component by component. */
export function zipTensor(a: Tensor, b: Tensor, f: (x: MathNode, y: MathNode) => MathNode): Tensor {
  if (a.rank === 0 && b.rank === 0) return scalar(f(a.c, b.c));
  if (a.rank === 1 && b.rank === 1) return vector(a.c.map((x, i) => f(x, b.c[i])));
  if (a.rank === 2 && b.rank === 2) return matrix(a.c.map((row, i) => row.map((x, j) => f(x, b.c[i][j]))));
  throw new Error('zipTensor: shapes differ'); // callers check shapes first
}

function unwrapped(node: MathNode): MathNode {
  let n = node;
  while (n.type === 'ParenthesisNode') n = (n as unknown as { content: MathNode }).content;
  return n;
}

/** True for a literal zero (possibly in parentheses or negated): such terms are left out. */
export function isZeroLiteral(node: MathNode): boolean {
  const n = unwrapped(node);
  if (n.type === 'ConstantNode') return (n as unknown as { value: unknown }).value === 0;
  if (n.type === 'OperatorNode') {
    const op = n as unknown as { fn: string; args: MathNode[] };
    if (op.fn === 'unaryMinus' || op.fn === 'unaryPlus') return isZeroLiteral(op.args[0]);
  }
  return false;
}

/** True for a literal one, so a unit coefficient does not multiply every term. */
export function isOneLiteral(node: MathNode): boolean {
  const n = unwrapped(node);
  return n.type === 'ConstantNode' && (n as unknown as { value: unknown }).value === 1;
}

export const ZERO: MathNode = new ConstantNode(0);
export const ONE: MathNode = new ConstantNode(1);

/** a·b with the literal identities 0·b = 0 and 1·b = b applied, so presets build the same trees as hand-written code. */
export function times(a: MathNode, b: MathNode): MathNode {
  if (isZeroLiteral(a) || isZeroLiteral(b)) return ZERO;
  if (isOneLiteral(a)) return b;
  if (isOneLiteral(b)) return a;
  return new OperatorNode('*', 'multiply', [a, b]);
}

/** The terms of a sum built by `sum` (its add chain, flattened), zeros dropped. */
export function terms(node: MathNode): MathNode[] {
  if (isZeroLiteral(node)) return [];
  if (node.type === 'OperatorNode') {
    const op = node as unknown as { fn: string; args: MathNode[]; isSum?: boolean };
    if (op.fn === 'add' && SUMS.has(node)) return op.args.flatMap(terms);
  }
  return [node];
}

/** Add nodes built here (not those of the user's own formulas): only these are flattened into terms. */
const SUMS = new WeakSet<MathNode>();

/** Σ terms, left to right, zero literals dropped; a single term stands alone, none is 0. */
export function sum(parts: readonly MathNode[]): MathNode {
  const kept = parts.flatMap(terms);
  if (kept.length === 0) return ZERO;
  return kept.reduce((a, b) => {
    const node = new OperatorNode('+', 'add', [a, b]);
    SUMS.add(node);
    return node;
  });
}

/** −a (0 stays 0). */
export function negate(a: MathNode): MathNode {
  return isZeroLiteral(a) ? ZERO : new OperatorNode('-', 'unaryMinus', [a]);
}

/** a − b as a + (−b), so that the terms stay a flat list. */
export function minus(a: MathNode, b: MathNode): MathNode {
  return sum([a, negate(b)]);
}

export function divide(a: MathNode, b: MathNode): MathNode {
  if (isZeroLiteral(a)) return ZERO;
  if (isOneLiteral(b)) return a;
  return new OperatorNode('/', 'divide', [a, b]);
}

/** The dim × dim identity. */
export function identity(dim: number): Tensor {
  return matrix(Array.from({ length: dim }, (_, i) => Array.from({ length: dim }, (_, j) => (i === j ? ONE : ZERO))));
}

/** Zero of a rank. */
export function zeroTensor(rank: 0 | 1 | 2, dim: number): Tensor {
  if (rank === 0) return scalar(ZERO);
  if (rank === 1) return vector(Array.from({ length: dim }, () => ZERO));
  return matrix(Array.from({ length: dim }, () => Array.from({ length: dim }, () => ZERO)));
}
