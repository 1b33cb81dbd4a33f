import { ConstantNode, OperatorNode, SymbolNode, derivative, type MathNode } from 'mathjs';
import { VARIABLES } from './formula.ts';
import { simplifyDerived, type SimplifyMode } from './simplify.ts';
import type { Dim } from './types.ts';

/** True for a literal zero (possibly in parentheses or negated): such terms are left out of the source. */
export function isZeroLiteral(node: MathNode): boolean {
  if (node.type === 'ConstantNode') return (node as unknown as { value: unknown }).value === 0;
  if (node.type === 'ParenthesisNode') return isZeroLiteral((node as unknown as { content: MathNode }).content);
  if (node.type === 'OperatorNode') {
    const op = node as unknown as { fn: string; args: MathNode[] };
    if (op.fn === 'unaryMinus' || op.fn === 'unaryPlus') return isZeroLiteral(op.args[0]);
  }
  return false;
}

/** True for a literal one, so k = 1 does not multiply every term. */
function isOneLiteral(node: MathNode): boolean {
  if (node.type === 'ParenthesisNode') return isOneLiteral((node as unknown as { content: MathNode }).content);
  return node.type === 'ConstantNode' && (node as unknown as { value: unknown }).value === 1;
}

function times(a: MathNode, b: MathNode): MathNode {
  return new OperatorNode('*', 'multiply', [a, b]);
}

function sum(terms: MathNode[]): MathNode {
  if (terms.length === 0) return new ConstantNode(0);
  return terms.reduce((a, b) => new OperatorNode('+', 'add', [a, b]));
}

/** ∂node/∂variable by mathjs. sign(g), which our simplification puts in place of abs(g)/g, is held fixed: its
 *  derivative is 0 away from g = 0 (mathjs cannot differentiate it). The Dirac part at a kink of u is not
 *  representable in f, so a u with abs() is exact only where the kink is not crossed. */
export function differentiate(node: MathNode, variable: string): MathNode {
  const frozen: MathNode[] = [];
  const held = node.transform((n) => {
    if (n.type !== 'FunctionNode' || (n as unknown as { fn: { name?: string } }).fn.name !== 'sign') return n;
    frozen.push(n);
    return new SymbolNode(`__held${frozen.length - 1}`);
  });
  const d = derivative(held, variable, { simplify: false });
  if (frozen.length === 0) return d;
  return d.transform((n) => {
    if (n.type !== 'SymbolNode') return n;
    const match = /^__held(\d+)$/.exec((n as unknown as { name: string }).name);
    return match === null ? n : frozen[Number(match[1])];
  });
}

/** ∂u/∂x_i for each coordinate of `dim`, by mathjs symbolic differentiation. */
export function gradientTrees(u: MathNode, dim: Dim, mode: SimplifyMode = 'auto'): MathNode[] {
  return VARIABLES[dim].map((v) => simplifyDerived(differentiate(u, v), dim, mode));
}

export interface OperatorTrees {
  u: MathNode;
  grad: readonly MathNode[];
  k: MathNode;
  b: readonly MathNode[];
  c: MathNode;
}

/** f = −∇·(k∇u) + b·∇u + c·u, with ∇·(k∇u) = Σ_i ∂_i(k ∂_i u) differentiated symbolically (product rule by mathjs). */
export function sourceTree(t: OperatorTrees, dim: Dim, mode: SimplifyMode = 'auto'): MathNode {
  const variables = VARIABLES[dim];
  const terms: MathNode[] = [];
  const unitK = isOneLiteral(t.k);
  const divergence = sum(
    variables.map((v, i) => differentiate(unitK ? t.grad[i] : times(t.k, t.grad[i]), v)),
  );
  terms.push(new OperatorNode('-', 'unaryMinus', [divergence]));
  variables.forEach((_, i) => {
    if (!isZeroLiteral(t.b[i])) terms.push(times(t.b[i], t.grad[i]));
  });
  if (!isZeroLiteral(t.c)) terms.push(times(t.c, t.u));
  return simplifyDerived(sum(terms), dim, mode);
}
