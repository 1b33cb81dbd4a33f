import type { MathNode } from 'mathjs';
import { RungsInputError } from '../errors.ts';
import type { Argument } from './types.ts';

/** Functions every target language has under some name; every other function of a formula is written with these. */
export type BaseFunction =
  | 'sin' | 'cos' | 'tan' | 'asin' | 'acos' | 'atan'
  | 'sinh' | 'cosh' | 'tanh' | 'asinh' | 'acosh' | 'atanh'
  | 'exp' | 'log' | 'log10' | 'sqrt' | 'cbrt' | 'abs' | 'sign';

export type BinaryOperator = '+' | '-' | '*' | '/';

/** A formula lowered to the few operations every language prints the same way (plain data, no mathjs). */
export type Expr =
  | { kind: 'num'; value: number }
  | { kind: 'arg'; name: Argument }
  | { kind: 'neg'; arg: Expr }
  | { kind: 'bin'; op: BinaryOperator; left: Expr; right: Expr }
  /** base^2 or base^3 written as a product (exact where the language has it, and no call to pow). */
  | { kind: 'ipow'; base: Expr; n: 2 | 3 }
  | { kind: 'pow'; base: Expr; exponent: Expr }
  | { kind: 'call'; fn: BaseFunction; arg: Expr };

const BASE: ReadonlySet<string> = new Set<BaseFunction>([
  'sin', 'cos', 'tan', 'asin', 'acos', 'atan', 'sinh', 'cosh', 'tanh', 'asinh', 'acosh', 'atanh',
  'exp', 'log', 'log10', 'sqrt', 'cbrt', 'abs', 'sign',
]);

const num = (value: number): Expr => ({ kind: 'num', value });
const call = (fn: BaseFunction, arg: Expr): Expr => ({ kind: 'call', fn, arg });
const recip = (a: Expr): Expr => ({ kind: 'bin', op: '/', left: num(1), right: a });

/** Reciprocal functions as rungs compiles them (src/exact/compile.ts, after mathjs's number implementations), so
 *  every language computes the same operations: sec = 1/cos, acot(a) = atan(1/a), … */
const RECIPROCAL: Readonly<Record<string, (a: Expr) => Expr>> = {
  sec: (a) => recip(call('cos', a)),
  csc: (a) => recip(call('sin', a)),
  cot: (a) => recip(call('tan', a)),
  sech: (a) => recip(call('cosh', a)),
  csch: (a) => recip(call('sinh', a)),
  coth: (a) => recip(call('tanh', a)),
  acot: (a) => call('atan', recip(a)),
  asec: (a) => call('acos', recip(a)),
  acsc: (a) => call('asin', recip(a)),
  acoth: (a) => call('atanh', recip(a)),
  asech: (a) => call('acosh', recip(a)),
  acsch: (a) => call('asinh', recip(a)),
};

const OPERATOR: Readonly<Record<string, BinaryOperator>> = { add: '+', subtract: '-', multiply: '*', divide: '/' };

/** Lower a mathjs tree over `args`, pi and e. `where` names the study and function in error messages. */
export function lower(node: MathNode, args: readonly Argument[], where: string): Expr {
  const fail = (what: string): never => {
    throw new RungsInputError(`${where}: ${what} cannot be generated; valid: arguments ${args.join(', ')}, constants pi, e, ` +
      `operators + - * / ^, functions ${[...BASE, ...Object.keys(RECIPROCAL), 'pow', 'log(a, b)'].join(', ')}`, where);
  };
  const walk = (n: MathNode): Expr => {
    switch (n.type) {
      case 'ConstantNode': {
        const value = (n as unknown as { value: unknown }).value;
        if (typeof value !== 'number' || !Number.isFinite(value)) return fail(`the constant ${String(value)}`);
        return num(value);
      }
      case 'SymbolNode': {
        const name = (n as unknown as { name: string }).name;
        if (name === 'pi') return num(Math.PI);
        if (name === 'e') return num(Math.E);
        if ((args as readonly string[]).includes(name)) return { kind: 'arg', name: name as Argument };
        return fail(`the symbol "${name}"`);
      }
      case 'ParenthesisNode':
        return walk((n as unknown as { content: MathNode }).content);
      case 'OperatorNode': {
        const op = n as unknown as { fn: string; op: string; args: MathNode[] };
        if (op.fn === 'unaryPlus' && op.args.length === 1) return walk(op.args[0]);
        if (op.fn === 'unaryMinus' && op.args.length === 1) {
          const inner = walk(op.args[0]);
          // -(c) is exactly the constant -c; folding it keeps negative literals literals.
          return inner.kind === 'num' ? num(-inner.value) : { kind: 'neg', arg: inner };
        }
        if (op.fn === 'pow' && op.args.length === 2) return power(walk(op.args[0]), walk(op.args[1]));
        const symbol = Object.hasOwn(OPERATOR, op.fn) ? OPERATOR[op.fn] : undefined;
        if (symbol === undefined || op.args.length < 2) return fail(`the operator "${op.op}"`);
        // n-ary sums and products are evaluated left to right, as mathjs does.
        return op.args.slice(1).reduce<Expr>((left, arg) => ({ kind: 'bin', op: symbol, left, right: walk(arg) }), walk(op.args[0]));
      }
      case 'FunctionNode': {
        const fn = n as unknown as { fn: { name?: string }; args: MathNode[] };
        const name = fn.fn.name ?? '';
        const count = fn.args.length;
        if (name === 'pow' && count === 2) return power(walk(fn.args[0]), walk(fn.args[1]));
        if (name === 'log' && count === 2) {
          return { kind: 'bin', op: '/', left: call('log', walk(fn.args[0])), right: call('log', walk(fn.args[1])) };
        }
        if (count === 1 && BASE.has(name)) return call(name as BaseFunction, walk(fn.args[0]));
        if (count === 1 && Object.hasOwn(RECIPROCAL, name)) return RECIPROCAL[name](walk(fn.args[0]));
        return fail(`the function "${name}" with ${count} argument(s)`);
      }
      default:
        return fail(`the construct "${n.toString()}" (${n.type})`);
    }
  };
  return walk(node);
}

function power(base: Expr, exponent: Expr): Expr {
  if (exponent.kind === 'num' && (exponent.value === 2 || exponent.value === 3)) return { kind: 'ipow', base, n: exponent.value };
  return { kind: 'pow', base, exponent };
}
