import type { Argument } from './types.ts';
import type { BaseFunction, BinaryOperator, Expr } from './expr.ts';

/** One distinct subtree of a function, its operands given as indices of earlier nodes (children come first). */
export type DagNode =
  | { kind: 'num'; value: number }
  | { kind: 'arg'; name: Argument }
  | { kind: 'neg'; a: number }
  | { kind: 'bin'; op: BinaryOperator; a: number; b: number }
  | { kind: 'ipow'; a: number; n: 2 | 3 }
  | { kind: 'pow'; a: number; b: number }
  | { kind: 'call'; fn: BaseFunction; a: number };

/** How one function is computed: its distinct subtrees, which of them go into local temporaries, and the outputs. */
export interface Plan {
  nodes: DagNode[];
  /** Node index of each output. */
  outputs: number[];
  /** Nodes computed once into a local, in dependency order (each after every temporary it reads). */
  temps: number[];
  /** Local name of a node that is a temporary (w0, w1, …), else undefined. */
  names: (string | undefined)[];
  /** Arguments some output reads. */
  used: ReadonlySet<Argument>;
}

/** A subtree larger than this (in nodes printed inline) goes into a temporary of its own, so no statement grows past
 *  what Fortran's 255 continuation lines hold, and generated lines stay readable. */
export const MAX_INLINE_NODES = 48;

/** Prefix of the temporaries; names of this form are refused as function names. */
export const TEMP_PREFIX = 'w';

const operands = (n: DagNode): number[] =>
  n.kind === 'bin' || n.kind === 'pow' ? [n.a, n.b] : n.kind === 'neg' || n.kind === 'ipow' || n.kind === 'call' ? [n.a] : [];

const isLeaf = (n: DagNode): boolean => n.kind === 'num' || n.kind === 'arg';

function keyOf(n: DagNode): string {
  switch (n.kind) {
    // Object.is keeps -0 and 0 apart: they print and divide differently.
    case 'num': return Object.is(n.value, -0) ? 'n-0' : `n${n.value}`;
    case 'arg': return `a${n.name}`;
    case 'neg': return `-${n.a}`;
    case 'bin': return `${n.op}${n.a},${n.b}`;
    case 'ipow': return `i${n.n}:${n.a}`;
    case 'pow': return `^${n.a},${n.b}`;
    case 'call': return `${n.fn}(${n.a})`;
  }
}

/** Share every repeated subtree (structural equality, by hashing each subtree once its operands are known) of the
 *  outputs of one function, and choose the temporaries: every non-leaf node used twice or more, the base of a
 *  square or cube (printed twice), and any subtree that would print larger than MAX_INLINE_NODES. */
export function planFunction(outputs: readonly Expr[]): Plan {
  const nodes: DagNode[] = [];
  const index = new Map<string, number>();
  const used = new Set<Argument>();
  const intern = (n: DagNode): number => {
    const key = keyOf(n);
    let i = index.get(key);
    if (i === undefined) {
      i = nodes.length;
      nodes.push(n);
      index.set(key, i);
    }
    return i;
  };
  const add = (e: Expr): number => {
    switch (e.kind) {
      case 'num': return intern({ kind: 'num', value: e.value });
      case 'arg': used.add(e.name); return intern({ kind: 'arg', name: e.name });
      case 'neg': return intern({ kind: 'neg', a: add(e.arg) });
      case 'bin': { const a = add(e.left); return intern({ kind: 'bin', op: e.op, a, b: add(e.right) }); }
      case 'ipow': return intern({ kind: 'ipow', a: add(e.base), n: e.n });
      case 'pow': { const a = add(e.base); return intern({ kind: 'pow', a, b: add(e.exponent) }); }
      case 'call': return intern({ kind: 'call', fn: e.fn, a: add(e.arg) });
    }
  };
  const outs = outputs.map(add);

  const uses = new Array<number>(nodes.length).fill(0);
  for (const o of outs) uses[o]++;
  nodes.forEach((n) => { for (const c of operands(n)) uses[c]++; });
  const temp = nodes.map((n, i) => !isLeaf(n) && uses[i] >= 2);
  nodes.forEach((n) => { if (n.kind === 'ipow' && !isLeaf(nodes[n.a])) temp[n.a] = true; });
  // Operands come before their node, so one pass in index order sees every operand's final size.
  const size = new Array<number>(nodes.length).fill(1);
  nodes.forEach((n, i) => {
    for (const c of operands(n)) {
      if (!temp[c] && size[c] > MAX_INLINE_NODES) temp[c] = true;
      size[i] += temp[c] ? 1 : size[c];
    }
  });

  // Dependency order: depth-first from the outputs, a temporary listed once all it reads is listed.
  const temps: number[] = [];
  const seen = new Array<boolean>(nodes.length).fill(false);
  const visit = (i: number): void => {
    if (seen[i]) return;
    seen[i] = true;
    for (const c of operands(nodes[i])) visit(c);
    if (temp[i]) temps.push(i);
  };
  outs.forEach(visit);
  const names = new Array<string | undefined>(nodes.length).fill(undefined);
  temps.forEach((i, k) => { names[i] = `${TEMP_PREFIX}${k}`; });
  return { nodes, outputs: outs, temps, names, used };
}

/** How a language writes each operation (operands arrive already printed). */
export interface ExpressionSyntax {
  num(value: number): string;
  arg(name: Argument): string;
  neg(a: string): string;
  bin(op: BinaryOperator, a: string, b: string): string;
  /** a is a local name or a literal, so printing it twice evaluates nothing twice. */
  ipow(a: string, n: 2 | 3): string;
  pow(a: string, b: string): string;
  /** a comes without enclosing parentheses. */
  call(fn: BaseFunction, a: string): string;
}

/** The text of node i, temporaries by name (the node itself printed in full when `define` is true). */
export function printNode(plan: Plan, i: number, syntax: ExpressionSyntax, define = false): string {
  const name = plan.names[i];
  if (name !== undefined && !define) return name;
  const n = plan.nodes[i];
  const p = (c: number): string => printNode(plan, c, syntax);
  switch (n.kind) {
    case 'num': return syntax.num(n.value);
    case 'arg': return syntax.arg(n.name);
    case 'neg': return syntax.neg(p(n.a));
    case 'bin': return syntax.bin(n.op, p(n.a), p(n.b));
    case 'ipow': return syntax.ipow(p(n.a), n.n);
    case 'pow': return syntax.pow(p(n.a), p(n.b));
    case 'call': return syntax.call(n.fn, unwrap(p(n.a)));
  }
}

/** Drop one pair of parentheses around a whole statement's right-hand side. */
export function unwrap(text: string): string {
  if (!text.startsWith('(') || !text.endsWith(')')) return text;
  let depth = 0;
  for (let k = 0; k < text.length; k++) {
    if (text[k] === '(') depth++;
    else if (text[k] === ')' && --depth === 0 && k < text.length - 1) return text;
  }
  return text.slice(1, -1);
}
