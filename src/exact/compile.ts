import type { MathNode } from 'mathjs';
import type { FluxFn, ScalarFn, ValueGradFn, VectorFn } from './types.ts';

/** JavaScript for each function name that can occur in a formula or in a mathjs derivative of one. Reciprocal
 *  functions follow mathjs's own number implementations (e.g. sec = 1/cos, acot = atan(1/x)) so both agree. */
const FUNCTION_JS: Readonly<Record<string, (args: string[]) => string>> = {
  sin: (a) => `Math.sin(${a[0]})`,
  cos: (a) => `Math.cos(${a[0]})`,
  tan: (a) => `Math.tan(${a[0]})`,
  sec: (a) => `(1 / Math.cos(${a[0]}))`,
  csc: (a) => `(1 / Math.sin(${a[0]}))`,
  cot: (a) => `(1 / Math.tan(${a[0]}))`,
  asin: (a) => `Math.asin(${a[0]})`,
  acos: (a) => `Math.acos(${a[0]})`,
  atan: (a) => `Math.atan(${a[0]})`,
  acot: (a) => `Math.atan(1 / ${a[0]})`,
  asec: (a) => `Math.acos(1 / ${a[0]})`,
  acsc: (a) => `Math.asin(1 / ${a[0]})`,
  sinh: (a) => `Math.sinh(${a[0]})`,
  cosh: (a) => `Math.cosh(${a[0]})`,
  tanh: (a) => `Math.tanh(${a[0]})`,
  sech: (a) => `(1 / Math.cosh(${a[0]}))`,
  csch: (a) => `(1 / Math.sinh(${a[0]}))`,
  coth: (a) => `(1 / Math.tanh(${a[0]}))`,
  asinh: (a) => `Math.asinh(${a[0]})`,
  acosh: (a) => `Math.acosh(${a[0]})`,
  atanh: (a) => `Math.atanh(${a[0]})`,
  acoth: (a) => `Math.atanh(1 / ${a[0]})`,
  asech: (a) => `Math.acosh(1 / ${a[0]})`,
  acsch: (a) => `Math.asinh(1 / ${a[0]})`,
  exp: (a) => `Math.exp(${a[0]})`,
  log: (a) => (a.length === 1 ? `Math.log(${a[0]})` : `(Math.log(${a[0]}) / Math.log(${a[1]}))`),
  log10: (a) => `Math.log10(${a[0]})`,
  sqrt: (a) => `Math.sqrt(${a[0]})`,
  cbrt: (a) => `Math.cbrt(${a[0]})`,
  abs: (a) => `Math.abs(${a[0]})`,
  sign: (a) => `Math.sign(${a[0]})`,
  pow: (a) => `Math.pow(${a[0]}, ${a[1]})`,
};

const SYMBOL_JS: Readonly<Record<string, string>> = { x: 'x', y: 'y', z: 'z', t: 't', pi: 'Math.PI', e: 'Math.E' };
/** The variables of a formula: the coordinates, the time and (boundary data) the normal; a tree free of them is a
 *  constant and is folded. */
const COORDINATES: ReadonlySet<string> = new Set(['x', 'y', 'z', 't', 'nx', 'ny', 'nz', 'u']);
/** Variables that are not in SYMBOL_JS, emitted as themselves where a function takes them as arguments: the normal,
 *  and the solution value u of a coefficient that depends on it (κ(u) of nonlinear diffusion, which the parser of
 *  user formulas never lets through elsewhere). */
const NORMAL_SYMBOLS: ReadonlySet<string> = new Set(['nx', 'ny', 'nz', 'u']);

const BINARY_JS: Readonly<Record<string, string>> = { add: '+', subtract: '-', multiply: '*', divide: '/' };

/** State of one generated function: temporaries (to square a sub-expression without evaluating it twice) and
 *  whether coordinate-free sub-trees are folded to numbers. */
interface CodeContext {
  temps: number;
  fold: boolean;
  /** When present, each distinct function call is computed once into a constant (common subexpressions of u and its
   *  gradient: sin(πx) appears in u and in ∂u/∂y); `lines` collects those constants in evaluation order. */
  shared?: { names: Map<string, string>; lines: string[] };
}

const coordinateFreeCache = new WeakMap<MathNode, boolean>();

/** True when the tree does not depend on x, y, z or t (memoised: trees are immutable once built). */
export function isCoordinateFree(node: MathNode): boolean {
  const known = coordinateFreeCache.get(node);
  if (known !== undefined) return known;
  let free = true;
  if (node.type === 'SymbolNode') {
    free = !COORDINATES.has((node as unknown as { name: string }).name);
  } else {
    const children: MathNode[] =
      node.type === 'FunctionNode' ? (node as unknown as { args: MathNode[] }).args : childrenOf(node);
    for (const child of children) if (!isCoordinateFree(child)) free = false;
  }
  coordinateFreeCache.set(node, free);
  return free;
}

function childrenOf(node: MathNode): MathNode[] {
  const children: MathNode[] = [];
  node.forEach((child) => children.push(child));
  return children;
}

function literal(value: number): string {
  if (Object.is(value, -0)) return '(-0)';
  return value < 0 ? `(${String(value)})` : String(value);
}

/** The value of a coordinate-free tree, computed with the same floating-point operations as the generated code. */
function constantValue(node: MathNode): number {
  const ctx: CodeContext = { temps: 0, fold: false };
  const code = expressionOf(node, ctx);
  return (new Function(`"use strict";\n${declareTemps(ctx)}return ${code};`) as () => number)();
}

/** A JavaScript expression for `node`, in the variables x, y, z. Coordinate-free sub-trees are folded to a number
 *  once, at compile time. */
function expressionOf(node: MathNode, ctx: CodeContext): string {
  if (ctx.fold && node.type !== 'ConstantNode' && node.type !== 'SymbolNode' && isCoordinateFree(node)) {
    return literal(constantValue(node));
  }
  switch (node.type) {
    case 'ConstantNode': {
      const value = (node as unknown as { value: unknown }).value;
      if (typeof value !== 'number') throw new Error(`compile: constant ${String(value)} is not a number`);
      return literal(value);
    }
    case 'SymbolNode': {
      const name = (node as unknown as { name: string }).name;
      const js = Object.hasOwn(SYMBOL_JS, name) ? SYMBOL_JS[name] : NORMAL_SYMBOLS.has(name) ? name : undefined;
      if (js === undefined) throw new Error(`compile: unknown symbol ${name}`);
      return js;
    }
    case 'ParenthesisNode':
      return expressionOf((node as unknown as { content: MathNode }).content, ctx);
    case 'OperatorNode':
      return operatorOf(node as unknown as { fn: string; args: MathNode[] }, ctx);
    case 'FunctionNode': {
      const fn = node as unknown as { fn: { name?: string }; args: MathNode[] };
      const name = fn.fn.name ?? '';
      const emit = Object.hasOwn(FUNCTION_JS, name) ? FUNCTION_JS[name] : undefined;
      if (emit === undefined) throw new Error(`compile: unknown function ${name}`);
      if (name === 'pow') return powerOf(fn.args[0], fn.args[1], ctx);
      const call = emit(fn.args.map((arg) => expressionOf(arg, ctx)));
      if (!ctx.shared || call.includes(' = ')) return call; // a call holding a temporary's assignment stays inline
      let shared = ctx.shared.names.get(call);
      if (shared === undefined) {
        shared = `s${ctx.shared.names.size}`;
        ctx.shared.names.set(call, shared);
        ctx.shared.lines.push(`const ${shared} = ${call};`);
      }
      return shared;
    }
    default:
      throw new Error(`compile: unsupported node ${node.type}`);
  }
}

function operatorOf(op: { fn: string; args: MathNode[] }, ctx: CodeContext): string {
  const args = op.args;
  if (op.fn === 'unaryMinus') return `(-${expressionOf(args[0], ctx)})`;
  if (op.fn === 'unaryPlus') return expressionOf(args[0], ctx);
  if (op.fn === 'pow') return powerOf(args[0], args[1], ctx);
  const symbol = Object.hasOwn(BINARY_JS, op.fn) ? BINARY_JS[op.fn] : undefined;
  if (symbol === undefined) throw new Error(`compile: unsupported operator ${op.fn}`);
  return `(${args.map((arg) => expressionOf(arg, ctx)).join(` ${symbol} `)})`;
}

/** Powers 1, 2, 3 become products (faster than Math.pow); every other power calls Math.pow. */
function powerOf(base: MathNode, exponent: MathNode, ctx: CodeContext): string {
  const b = expressionOf(base, ctx);
  const n = ctx.fold && isCoordinateFree(exponent) ? constantValue(exponent) : NaN;
  if (n === 1) return b;
  if (n === 2 || n === 3) {
    if (/^[xyz]$/.test(b)) return n === 2 ? `(${b} * ${b})` : `(${b} * ${b} * ${b})`;
    const t = `t${ctx.temps++}`;
    return n === 2 ? `((${t} = ${b}) * ${t})` : `((${t} = ${b}) * ${t} * ${t})`;
  }
  return `Math.pow(${b}, ${expressionOf(exponent, ctx)})`;
}

function declareTemps(ctx: CodeContext): string {
  if (ctx.temps === 0) return '';
  return `let ${Array.from({ length: ctx.temps }, (_, i) => `t${i}`).join(', ')};\n`;
}

/** A fresh context that folds constants and computes each distinct function call once. */
const sharedContext = (): CodeContext => ({ temps: 0, fold: true, shared: { names: new Map(), lines: [] } });

/** The declarations of a context's temporaries and shared calls, in evaluation order. */
function preamble(ctx: CodeContext): string {
  const lines = ctx.shared?.lines ?? [];
  return `${declareTemps(ctx)}${lines.length ? lines.join('\n') + '\n' : ''}`;
}

/** JavaScript source of a function body computing `node` (exposed for tests and reports). Each distinct function
 *  call is computed once (a derived source term repeats sin(3y) and exp(−x) several times); the values are the bits
 *  of the expression evaluated as written, since the calls are pure. */
export function javaScriptOf(node: MathNode): string {
  const ctx = sharedContext();
  const expression = expressionOf(node, ctx);
  return `${preamble(ctx)}return ${expression};`;
}

/** Compile a validated formula tree into a plain function of (x, y, z, t) (t is undefined for steady callers, which
 *  never pass a tree holding t). */
export function compileScalar(node: MathNode): ScalarFn {
  return new Function('x', 'y', 'z', 't', `"use strict";\n${javaScriptOf(node)}`) as ScalarFn;
}

/** Compile one tree per component into a function writing out[0 .. n-1]. */
export function compileVector(nodes: readonly MathNode[]): VectorFn {
  const ctx = sharedContext();
  const lines = nodes.map((node, i) => `out[${i}] = ${expressionOf(node, ctx)};`);
  return new Function('x', 'y', 'z', 'out', `"use strict";\n${preamble(ctx)}${lines.join('\n')}`) as VectorFn;
}

/** Compile u and its gradient into one function that writes ∇u to out and returns u, each distinct function call
 *  (sin, cos, exp, …) evaluated once. The operations on every value are those of compileScalar/compileVector, so
 *  the results are the same bits, for about two thirds of the transcendental calls on a product of sines. */
export function compileValueAndGradient(u: MathNode, grad: readonly MathNode[]): ValueGradFn {
  const ctx = sharedContext();
  const value = expressionOf(u, ctx);
  const components = grad.map((g) => expressionOf(g, ctx));
  // The shared calls come first; a temporary (t·) assigned inside a shared call is declared before them.
  const body = `"use strict";\n${preamble(ctx)}` +
    `const v = ${value};\n${components.map((c, i) => `out[${i}] = ${c};`).join('\n')}\nreturn v;`;
  return new Function('x', 'y', 'z', 'out', body) as ValueGradFn;
}

/** Compile k ∇u·n from the trees of k and of the gradient components. */
export function compileFlux(k: MathNode, grad: readonly MathNode[]): FluxFn {
  const ctx = sharedContext();
  const normals = ['nx', 'ny', 'nz'];
  const kCode = expressionOf(k, ctx);
  const dot = grad.map((g, i) => `${expressionOf(g, ctx)} * ${normals[i]}`).join(' + ');
  const body = `"use strict";\n${preamble(ctx)}return ${kCode} * (${dot});`;
  return new Function('x', 'y', 'z', 'nx', 'ny', 'nz', body) as FluxFn;
}

/** A compiled function of named arguments (x, y, z, t and, for boundary data, nx, ny, nz) with one or more outputs: it
 *  writes output i to out[i] and returns output 0. Each distinct function call is computed once. */
export type ArgumentsFn = (args: Float64Array, out: Float64Array) => number;

/** Compile trees over the symbols `args` (read from args[i] in that order) into one ArgumentsFn. */
export function compileOutputs(args: readonly string[], outputs: readonly MathNode[]): ArgumentsFn {
  const ctx = sharedContext();
  const lines = outputs.map((node, i) => `out[${i}] = ${expressionOf(node, ctx)};`);
  const unpack = args.map((a, i) => `const ${a} = args[${i}];`).join('\n');
  const body = `"use strict";\n${unpack}\n${preamble(ctx)}${lines.join('\n')}\nreturn out[0];`;
  return new Function('args', 'out', body) as ArgumentsFn;
}
