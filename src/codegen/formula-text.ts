import type { MathNode } from 'mathjs';
import { RungsInputError } from '../errors.ts';
import { lower, type Expr } from './expr.ts';
import { shortest } from './literal.ts';
import { NORMAL_ARGUMENTS } from './types.ts';

export type PowerStyle = 'pow' | 'starstar';
export const POWER_STYLES: readonly PowerStyle[] = ['pow', 'starstar'];

const ATOM = 9;
const PRECEDENCE: Readonly<Record<string, number>> = { '+': 1, '-': 1, '*': 2, '/': 2 };

/** Plain infix text of a formula for solvers' own parsers: powers as `a ** b` or `pow(a, b)` (never ^), constants
 *  (pi and e too) as the shortest decimal that reads back as the same double, and only the functions sin cos tan asin
 *  acos atan sinh cosh tanh asinh acosh atanh exp log log10 sqrt cbrt abs sign, with the reciprocal ones written out
 *  as rungs computes them (sec(a) = 1 / cos(a), acot(a) = atan(1 / a), log(a, b) = log(a) / log(b), …). Operations
 *  keep the tree's grouping: a parenthesis is dropped only where precedence and left-to-right order make it redundant. */
export function formulaText(node: MathNode, style: PowerStyle): string {
  if (!POWER_STYLES.includes(style)) {
    throw new RungsInputError(`formulaText: power style ${JSON.stringify(style)} is not offered; valid: ${POWER_STYLES.join(', ')}`, 'formulaText');
  }
  return print(lower(node, NORMAL_ARGUMENTS, 'formulaText'), style).text;
}

interface Printed { text: string; prec: number }

function print(e: Expr, style: PowerStyle): Printed {
  const atom = (p: Printed): string => (p.prec >= ATOM ? p.text : `(${p.text})`);
  const power = (base: Printed, exponent: string): Printed =>
    style === 'pow' ? { text: `pow(${base.text}, ${exponent})`, prec: ATOM } : { text: `${atom(base)} ** ${exponent}`, prec: 3 };
  switch (e.kind) {
    // A negative number is a negation to most parsers: it gets the negation's lowest rank, so it is parenthesised.
    case 'num': return { text: shortest(e.value), prec: e.value < 0 || Object.is(e.value, -0) ? 0 : ATOM };
    case 'arg': return { text: e.name, prec: ATOM };
    // Negation ranks lowest so that every operand position parenthesises it (a * (-b), (-a) ** 2): no parser differs.
    case 'neg': return { text: `-${atom(print(e.arg, style))}`, prec: 0 };
    case 'bin': {
      const p = PRECEDENCE[e.op];
      const left = print(e.left, style);
      const right = print(e.right, style);
      const l = left.prec < p || left.prec === 0 ? `(${left.text})` : left.text;
      // Same rank on the right keeps its parentheses: a - (b - c), and a + (b + c) rounds differently from a + b + c.
      const r = right.prec <= p ? `(${right.text})` : right.text;
      return { text: `${l} ${e.op} ${r}`, prec: p };
    }
    case 'ipow': return power(print(e.base, style), String(e.n));
    case 'pow': {
      const exponent = print(e.exponent, style);
      return power(print(e.base, style), style === 'pow' ? exponent.text : atom(exponent));
    }
    case 'call': return { text: `${e.fn}(${print(e.arg, style).text})`, prec: ATOM };
  }
}
