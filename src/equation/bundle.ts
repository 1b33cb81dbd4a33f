import { OperatorNode } from '../exact/mathjs.ts';
import type { MathNode } from 'mathjs';
import { NORMAL_ARGUMENTS, POINT_ARGUMENTS, type DataBundle, type GeneratedFunction } from '../codegen/types.ts';
import { compileOutputs, type ArgumentsFn } from '../exact/compile.ts';
import { VARIABLES } from '../exact/formula.ts';
import type { Dim } from '../exact/types.ts';
import { atTimeZero, type DerivedProblem } from './derive.ts';
import { components, type Tensor } from './tensor.ts';

/** Robin data asked for by the study: α (a formula tree) and the tags it applies on. */
export interface RobinData {
  alpha: MathNode;
}

/** Names of the components of a tensor for comments and the JSON of formulas: u, u_x, grad_u_x_y … */
function componentNames(base: string, t: Tensor, dim: Dim): string[] {
  const axes = VARIABLES[dim];
  if (t.rank === 0) return [base];
  if (t.rank === 1) return axes.map((a) => `${base}_${a}`);
  return axes.flatMap((a) => axes.map((b) => `${base}_${a}${b}`));
}

function fn(name: string, doc: string, args: GeneratedFunction['args'], t: Tensor, dim: Dim, base = name): GeneratedFunction {
  return { name, doc, args, outputs: components(t), outputNames: componentNames(base, t, dim) };
}

/** Every datum a solver needs, as functions: exact solution and gradient per field (Dirichlet data, error norms),
 *  source per equation, F·n per equation with a flux (Neumann data), F·n + α·field for Robin data, the coefficients,
 *  and the initial data when the problem depends on time. */
export function dataBundle(study: string, p: DerivedProblem, robin?: RobinData): DataBundle {
  const { dim } = p;
  const out: GeneratedFunction[] = [];
  for (const f of p.fields) {
    out.push(fn(`exact_${f.name}`, `exact ${f.kind} field ${f.name} (Dirichlet data)`, POINT_ARGUMENTS, f.exact, dim, f.name));
    out.push(fn(`grad_${f.name}`, `gradient of ${f.name}${f.kind === 'vector' ? ', row-major: out[i*dim + j] = d(' + f.name + '_i)/dx_j' : ''}`, POINT_ARGUMENTS, f.grad, dim));
  }
  for (const e of p.equations) {
    out.push(fn(`source_${e.name}`, `source of equation ${e.name} (-div F + R = source)`, POINT_ARGUMENTS, e.source, dim));
    if (e.normalFlux) {
      out.push(fn(`flux_${e.name}`, `F.n of equation ${e.name}, n the outward unit normal (Neumann data)`, NORMAL_ARGUMENTS, e.normalFlux, dim));
    }
    const field = p.fields.find((f) => f.name === e.field)!;
    if (robin && e.normalFlux && field.exact.rank === e.normalFlux.rank) {
      const alpha = robin.alpha;
      const g = e.normalFlux.rank === 0
        ? { rank: 0 as const, c: plus(e.normalFlux.c, times(alpha, field.exact.c as MathNode)) }
        : { rank: 1 as const, c: (e.normalFlux.c as MathNode[]).map((c, i) => plus(c, times(alpha, (field.exact.c as MathNode[])[i]))) };
      out.push(fn(`robin_${e.name}`, `F.n + alpha*${field.name} of equation ${e.name} (Robin data)`, NORMAL_ARGUMENTS, g, dim));
    }
  }
  if (robin) out.push(fn('robin_alpha', 'Robin coefficient alpha', POINT_ARGUMENTS, { rank: 0, c: robin.alpha }, dim));
  for (const [name, t] of p.coefficients) out.push(fn(`coef_${name}`, `coefficient ${name}`, POINT_ARGUMENTS, t, dim, name));
  if (p.hasTime) {
    for (const f of p.fields) out.push(fn(`initial_${f.name}`, `initial data: ${f.name} at t = 0`, ['x', 'y', 'z'], atTimeZero(f.exact, dim), dim));
  }
  return { study, dim, hasTime: p.hasTime, functions: out };
}

const plus = (a: MathNode, b: MathNode): MathNode => new OperatorNode('+', 'add', [a, b]);
const times = (a: MathNode, b: MathNode): MathNode => new OperatorNode('*', 'multiply', [a, b]);

/** A bundle's functions compiled to JavaScript for rungs's own use (the preflight check, values at a solver's
 *  points, a custom discretization's data): by name, each taking its arguments in an array and filling `out`. */
export interface CompiledData {
  functions: Map<string, { args: readonly string[]; outputs: number; evaluate: ArgumentsFn }>;
}

export function compileBundle(bundle: DataBundle): CompiledData {
  const functions = new Map<string, { args: readonly string[]; outputs: number; evaluate: ArgumentsFn }>();
  for (const f of bundle.functions) {
    functions.set(f.name, { args: f.args, outputs: f.outputs.length, evaluate: compileOutputs(f.args, f.outputs) });
  }
  return { functions };
}
