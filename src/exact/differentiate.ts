import { SymbolNode, derivative } from './mathjs.ts';
import type { MathNode } from 'mathjs';

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
