// Is a scalar field fixed only up to a constant? A pressure in Stokes flow with Dirichlet velocity all round appears
// in the equations only through its gradient and in no boundary datum, so the discrete problem is singular unless
// the solver fixes its mean (common practice, no source). Decided symbolically: add a constant C to the field and
// see whether any source, or the natural data of an equation with a natural boundary, changes.
import { ConstantNode, OperatorNode, SymbolNode } from '../exact/mathjs.ts';
import type { MathNode } from 'mathjs';
import { compileOutputs } from '../exact/compile.ts';
import { differentiate } from '../exact/differentiate.ts';
import { samplePoints, DEFAULT_SEED } from '../exact/sample-points.ts';
import type { BoundingBox } from '../exact/types.ts';
import { mulberry32 } from '../mesh/random.ts';
import { NORMAL_SYMBOLS, type DerivedProblem } from './derive.ts';
import { evaluateExpression } from './language.ts';
import { components, mapTensor, type Tensor } from './tensor.ts';
import type { PdeDeclaration } from './types.ts';

const SHIFT = '__rungs_shift';
const ARGS = ['x', 'y', 'z', 't', 'nx', 'ny', 'nz'];

export interface ConstantDependence {
  /** Equations whose source changes when a constant is added to the field. */
  sources: string[];
  /** Equations whose natural data F·n change. */
  natural: string[];
}

/** Which sources and natural data change when a constant is added to the scalar field `name`. */
export function constantDependence(p: DerivedProblem, pde: PdeDeclaration, name: string, box: BoundingBox): ConstantDependence {
  const values = new Map<string, Tensor>();
  for (const [c, t] of p.coefficients) values.set(c, t);
  for (const f of p.fields) {
    values.set(f.name, f.name === name ? mapTensor(f.exact, (c) => new OperatorNode('+', 'add', [c, new SymbolNode(SHIFT)])) : f.exact);
  }
  const scope = { dim: p.dim, values, time: true };
  const coords = ['x', 'y', 'z'].slice(0, p.dim);
  const n = NORMAL_SYMBOLS.slice(0, p.dim).map((s) => new SymbolNode(s));
  const out: ConstantDependence = { sources: [], natural: [] };
  const samples = sampleArgs(box, p.hasTime);
  for (const e of p.equations) {
    const decl = pde.equations[e.name]!;
    const flux = decl.flux === undefined ? null : evaluateExpression(decl.flux, `pde.equations.${e.name}.flux`, scope);
    const rest = decl.rest === undefined ? null : evaluateExpression(decl.rest, `pde.equations.${e.name}.rest`, scope);
    const rows: MathNode[][] = flux === null ? [] : flux.rank === 1 ? [flux.c] : flux.rank === 2 ? flux.c : [];
    const restComps = rest ? components(rest) : rows.map(() => new ConstantNode(0));
    const source = restComps.map((r, i) => rows.length
      ? new OperatorNode('-', 'subtract', [r, rows[i]!.reduce<MathNode>((a, f, j) => new OperatorNode('+', 'add', [a, differentiate(f, coords[j]!)]), new ConstantNode(0))])
      : r);
    const natural = rows.map((row) => row.reduce<MathNode>((a, f, j) => new OperatorNode('+', 'add', [a, new OperatorNode('*', 'multiply', [f, n[j]!])]), new ConstantNode(0)));
    if (changes(source, samples)) out.sources.push(e.name);
    if (natural.length && changes(natural, samples)) out.natural.push(e.name);
  }
  return out;
}

/** ∂(trees)/∂C at C = 0 is non-zero at some sample. */
function changes(trees: MathNode[], samples: Float64Array[]): boolean {
  const d = trees.map((t) => differentiate(t, SHIFT).transform((m) => (
    m.type === 'SymbolNode' && (m as unknown as { name: string }).name === SHIFT ? new ConstantNode(0) : m)));
  const fn = compileOutputs(ARGS, d);
  const v = new Float64Array(d.length);
  for (const s of samples) {
    fn(s, v);
    for (const x of v) if (Number.isFinite(x) && Math.abs(x) > 1e-12) return true;
  }
  return false;
}

function sampleArgs(box: BoundingBox, time: boolean): Float64Array[] {
  const pts = samplePoints(box, 12, DEFAULT_SEED);
  const random = mulberry32(DEFAULT_SEED + 1);
  const out: Float64Array[] = [];
  for (let i = 0; i < 12; i++) {
    const nrm = [random() - 0.5, random() - 0.5, random() - 0.5].slice(0, box.length);
    const len = Math.hypot(...nrm) || 1;
    out.push(Float64Array.from([pts[3 * i]!, pts[3 * i + 1]!, pts[3 * i + 2]!, time ? random() : 0, ...[0, 1, 2].map((k) => (nrm[k] ?? 0) / len)]));
  }
  return out;
}
