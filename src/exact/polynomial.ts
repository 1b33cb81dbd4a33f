import type { MathNode } from 'mathjs';
import { compileScalar, isCoordinateFree } from './compile.ts';

/** Powers above this are not expanded (no finite element study needs them); the degree is then reported unknown. */
const MAX_DEGREE = 64;
/** Expansion stops beyond this many monomials, to bound time and memory. */
const MAX_TERMS = 20000;
/** Coefficients below this fraction of the largest are taken as cancelled by round-off, e.g. (0.1+0.2)x² − 0.3x². */
const CANCELLATION = 1e-13;

/** A polynomial in x, y, z: monomial key (exponents packed base 128) → coefficient. */
type Poly = Map<number, number>;

const BASE = 128;
const VARIABLE_KEY: Readonly<Record<string, number>> = { x: 1, y: BASE, z: BASE * BASE };

function totalDegree(key: number): number {
  return (key % BASE) + (Math.floor(key / BASE) % BASE) + Math.floor(key / (BASE * BASE));
}

function constant(value: number): Poly {
  return new Map([[0, value]]);
}

function constantValueOf(p: Poly): number | null {
  for (const key of p.keys()) if (key !== 0) return null;
  return p.get(0) ?? 0;
}

function combine(a: Poly, b: Poly, sign: 1 | -1): Poly {
  const out = new Map(a);
  for (const [key, c] of b) out.set(key, (out.get(key) ?? 0) + sign * c);
  return out;
}

function scale(a: Poly, s: number): Poly {
  const out: Poly = new Map();
  for (const [key, c] of a) out.set(key, s * c);
  return out;
}

function multiply(a: Poly, b: Poly): Poly | null {
  const out: Poly = new Map();
  for (const [ka, ca] of a) {
    for (const [kb, cb] of b) {
      // Packed keys add exponent-wise as long as no exponent exceeds BASE - 1 (guarded by MAX_DEGREE).
      if (totalDegree(ka) + totalDegree(kb) > MAX_DEGREE) return null;
      out.set(ka + kb, (out.get(ka + kb) ?? 0) + ca * cb);
    }
  }
  return out.size > MAX_TERMS ? null : out;
}

function power(base: Poly, n: number): Poly | null {
  let result: Poly | null = constant(1);
  for (let i = 0; i < n && result !== null; i++) result = multiply(result, base);
  return result;
}

/** Expand a formula tree into a polynomial, or null when it is not one (or too large to expand). */
function expand(node: MathNode): Poly | null {
  if (isCoordinateFree(node)) {
    const value = compileScalar(node)(0, 0, 0);
    return Number.isFinite(value) ? constant(value) : null;
  }
  switch (node.type) {
    case 'SymbolNode': {
      const key = VARIABLE_KEY[(node as unknown as { name: string }).name];
      return key === undefined ? null : new Map([[key, 1]]);
    }
    case 'ParenthesisNode':
      return expand((node as unknown as { content: MathNode }).content);
    case 'OperatorNode':
    case 'FunctionNode': {
      const op = node as unknown as { fn: string | { name?: string }; args: MathNode[] };
      const name = typeof op.fn === 'string' ? op.fn : op.fn.name;
      return expandOperation(name ?? '', op.args);
    }
    default:
      return null;
  }
}

function expandOperation(name: string, args: MathNode[]): Poly | null {
  if (name === 'pow') {
    const base = expand(args[0]);
    const exponent = expand(args[1]);
    const n = exponent === null ? null : constantValueOf(exponent);
    if (base === null || n === null || !Number.isInteger(n) || n < 0 || n > MAX_DEGREE) return null;
    return power(base, n);
  }
  const parts: Poly[] = [];
  for (const arg of args) {
    const p = expand(arg);
    if (p === null) return null;
    parts.push(p);
  }
  switch (name) {
    case 'unaryPlus':
      return parts[0];
    case 'unaryMinus':
      return scale(parts[0], -1);
    case 'add':
      return parts.reduce((a, b) => combine(a, b, 1));
    case 'subtract':
      return combine(parts[0], parts[1], -1);
    case 'multiply':
      return parts.reduce<Poly | null>((a, b) => (a === null ? null : multiply(a, b)), constant(1));
    case 'divide': {
      const divisor = constantValueOf(parts[1]);
      return divisor === null || divisor === 0 ? null : scale(parts[0], 1 / divisor);
    }
    default:
      return null;
  }
}

/** Total degree of the formula when it is a polynomial in the coordinates (after expansion, so cancelling terms do
 *  not count), else null. A quotient counts only when its divisor is a constant; x²/x is reported as not polynomial. */
export function polynomialDegree(node: MathNode): number | null {
  const p = expand(node);
  if (p === null) return null;
  let largest = 0;
  for (const c of p.values()) largest = Math.max(largest, Math.abs(c));
  let degree = 0;
  for (const [key, c] of p) if (Math.abs(c) > CANCELLATION * largest) degree = Math.max(degree, totalDegree(key));
  return degree;
}
