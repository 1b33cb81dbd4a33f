import type { Argument } from './types.ts';
import type { BaseFunction, Expr } from './expr.ts';

/** Values of the arguments at one point. */
export type Point = Readonly<Record<Argument, number>>;

const MATH: Readonly<Record<BaseFunction, (a: number) => number>> = {
  sin: Math.sin, cos: Math.cos, tan: Math.tan, asin: Math.asin, acos: Math.acos, atan: Math.atan,
  sinh: Math.sinh, cosh: Math.cosh, tanh: Math.tanh, asinh: Math.asinh, acosh: Math.acosh, atanh: Math.atanh,
  exp: Math.exp, log: Math.log, log10: Math.log10, sqrt: Math.sqrt, cbrt: Math.cbrt, abs: Math.abs, sign: Math.sign,
};

/** A lowered formula evaluated in JavaScript doubles, operation by operation as the generated code writes it (so the
 *  generated JavaScript gives the same bits, and the other languages agree to their libraries' rounding). */
export function evaluate(e: Expr, at: Point): number {
  switch (e.kind) {
    case 'num': return e.value;
    case 'arg': return at[e.name];
    case 'neg': return -evaluate(e.arg, at);
    case 'bin': {
      const a = evaluate(e.left, at);
      const b = evaluate(e.right, at);
      return e.op === '+' ? a + b : e.op === '-' ? a - b : e.op === '*' ? a * b : a / b;
    }
    case 'ipow': {
      const a = evaluate(e.base, at);
      return e.n === 2 ? a * a : a * a * a;
    }
    case 'pow': {
      const a = evaluate(e.base, at);
      return Math.pow(a, evaluate(e.exponent, at));
    }
    case 'call': return MATH[e.fn](evaluate(e.arg, at));
  }
}
