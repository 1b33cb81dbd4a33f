import { FunctionNode, SymbolNode, simplify, simplifyConstant, simplifyCore } from './mathjs.ts';
import type { MathNode } from 'mathjs';
import { mulberry32 } from '../mesh/random.ts';
import { compileScalar } from './compile.ts';
import type { Dim } from './types.ts';

/** How hard to simplify derived trees: 'light' = identities only (x*1, x+0, constant folding; always cheap),
 *  'full' = mathjs simplify as well, 'auto' = full only for small trees (simplify costs ~0.1 s at 100 nodes and
 *  grows quickly, measured on this machine). */
export type SimplifyMode = 'light' | 'full' | 'auto';

/** Trees up to this many nodes get the full simplification in 'auto' mode. */
export const AUTO_FULL_SIMPLIFY_NODES = 60;

export function nodeCount(node: MathNode): number {
  let count = 0;
  node.traverse(() => count++);
  return count;
}

/** mathjs differentiates abs(g) as g'·abs(g)/g, which is 0/0 at g = 0; write it as sign(g), equal elsewhere. */
export function absQuotientToSign(node: MathNode): MathNode {
  return node.transform((n) => {
    if (n.type !== 'OperatorNode') return n;
    const op = n as unknown as { fn: string; args: MathNode[] };
    if (op.fn !== 'divide' || op.args[0].type !== 'FunctionNode') return n;
    const call = op.args[0] as unknown as { fn: { name?: string }; args: MathNode[] };
    if (call.fn.name !== 'abs' || call.args.length !== 1 || !call.args[0].equals(op.args[1])) return n;
    return new FunctionNode(new SymbolNode('sign'), [call.args[0]]);
  });
}

/** Simplify a derived tree. The full mathjs simplification is kept only when it is not larger and agrees with the
 *  unsimplified tree at sample points wherever that one is finite: simplify may change a function's domain, e.g.
 *  it turns the derivative of cbrt(x^2), 2x / (3 (x^2)^(2/3)), into (2/3) x^(-1/3), which is NaN for x < 0. */
export function simplifyDerived(node: MathNode, dim: Dim, mode: SimplifyMode = 'auto'): MathNode {
  const light = lightSimplify(absQuotientToSign(node));
  const size = nodeCount(light);
  if (mode === 'light' || (mode === 'auto' && size > AUTO_FULL_SIMPLIFY_NODES)) return light;
  let full: MathNode;
  try {
    full = simplify(light);
  } catch {
    return light;
  }
  if (nodeCount(full) > size) return light;
  return agreesAtSamples(light, full, dim) ? full : light;
}

/** Identities and constant folding only: a few milliseconds even for trees of hundreds of nodes. */
function lightSimplify(node: MathNode): MathNode {
  const core = simplifyCore(node);
  try {
    const folded = simplifyCore(simplifyConstant(core));
    return constantsAreNumbers(folded) ? folded : core;
  } catch {
    return core;
  }
}

/** simplifyConstant may in principle produce fractions or big numbers; the compiler takes plain numbers only. */
function constantsAreNumbers(node: MathNode): boolean {
  let ok = true;
  node.traverse((n) => {
    if (n.type === 'ConstantNode' && typeof (n as unknown as { value: unknown }).value !== 'number') ok = false;
  });
  return ok;
}

/** Compare two trees at points in [0,1]^dim and [-2,2]^dim, relative to the largest finite value of the first. */
function agreesAtSamples(reference: MathNode, candidate: MathNode, dim: Dim): boolean {
  let refFn, candFn;
  try {
    refFn = compileScalar(reference);
    candFn = compileScalar(candidate);
  } catch {
    return false;
  }
  const random = mulberry32(20240611);
  const refValues: number[] = [];
  const candValues: number[] = [];
  // The time is sampled too: a formula in t compared at undefined t would be NaN everywhere and pass unchecked.
  const withTime = (f: typeof refFn) => f as unknown as (x: number, y: number, z: number, t: number) => number;
  for (let i = 0; i < 16; i++) {
    const [lo, width] = i < 8 ? [0, 1] : [-2, 4];
    const p = [0, 0, 0, 0];
    for (let d = 0; d < dim; d++) p[d] = lo + width * random();
    p[3] = lo + width * random();
    refValues.push(withTime(refFn)(p[0], p[1], p[2], p[3]));
    candValues.push(withTime(candFn)(p[0], p[1], p[2], p[3]));
  }
  let scale = 0;
  for (const v of refValues) if (Number.isFinite(v)) scale = Math.max(scale, Math.abs(v));
  for (let i = 0; i < refValues.length; i++) {
    if (!Number.isFinite(refValues[i])) continue;
    if (!(Math.abs(refValues[i] - candValues[i]) <= 1e-9 * Math.max(scale, 1e-300))) return false;
  }
  return true;
}
