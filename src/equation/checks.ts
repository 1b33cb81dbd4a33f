import { ConstantNode, OperatorNode, SymbolNode, parse } from '../exact/mathjs.ts';
import type { MathNode } from 'mathjs';
import { RungsInputError } from '../errors.ts';
import { compileOutputs } from '../exact/compile.ts';
import { differentiate } from '../exact/differentiate.ts';
import { variablesOf } from '../exact/formula.ts';
import { polynomialDegree } from '../exact/polynomial.ts';
import { DEFAULT_SEED, checkBox, formatPoint, samplePoints } from '../exact/sample-points.ts';
import type { BoundingBox, Dim } from '../exact/types.ts';
import { mulberry32 } from '../mesh/random.ts';
import { NORMAL_SYMBOLS, type DerivedEquation, type DerivedProblem } from './derive.ts';
import { evaluateExpression } from './language.ts';
import { components, mapTensor, type Tensor } from './tensor.ts';
import type { PdeDeclaration } from './types.ts';

// Checks of a manufactured solution itself, before any mesh is solved: does it exercise every term, is it outside
// the discrete space, are its boundary data nonzero. Source of the guidelines: Salari & Knupp (2000), SAND2000-1444,
// "Code verification by the method of manufactured solutions", their guidelines for choosing a manufactured
// solution (numbered here as recalled, from memory): (1) smooth analytic functions, (2) general enough to exercise
// every term of the equations, (3) a sufficient number of nontrivial derivatives, (4) derivatives bounded by a
// small constant, so that the solution does not vary strongly.

/** Samples on one Neumann boundary: packed xyz triples (unused coordinates 0) and the outward unit normals there. */
export interface NeumannSamples {
  points: ArrayLike<number>;
  normals: ArrayLike<number>;
  /** The equations whose natural data F·n are imposed on this boundary (default: every equation with a flux). */
  equations?: readonly string[];
}

export interface ManufacturedCheckOptions {
  /** The domain's bounding box, one [low, high] pair per coordinate. */
  box: BoundingBox;
  /** Time interval sampled when the problem depends on t (default [0, 1]). */
  time?: readonly [number, number];
  /** The element degree: one for every field, or one per field name (e.g. { u: 2, p: 1 }). No degree, no check 3. */
  degree?: number | Readonly<Record<string, number>>;
  /** The declaration `p` was derived from. A coefficient is first followed through p's flux and rest trees by
   *  identity; where that misses one (a literal 1 multiplying a term is folded away) or a declared expression
   *  differentiates a coefficient, the equations are evaluated again from this declaration. Without it such a
   *  coefficient is not checked. */
  pde?: PdeDeclaration;
  /** Neumann boundaries by tag, each with sample points and outward normals (the caller samples the mesh facets). */
  neumann?: Readonly<Record<string, NeumannSamples>>;
  /** Seeded points in the box (default 32). */
  samples?: number;
  seed?: number;
}

/** Factor of the perturbed coefficient: large, so that a term that is there shows far above round-off. */
const PERTURBATION = 1.5;
/** A change below this fraction of the values' size is round-off, not a term (sources are ~1e-16 exact). */
const CHANGE_TOLERANCE = 1e-9;
/** Two coefficients agreeing to this relative accuracy at every sample are taken as equal. */
const EQUAL_TOLERANCE = 1e-12;
/** A derivative below this fraction of the field's largest derivative is taken as zero. */
const ZERO_DERIVATIVE = 1e-12;
/** max|∂u/∂x_d|·(box width) / (range of u) above this: about eight half-waves or a steep layer across the box. */
const STRONG_VARIATION = 50;

/** Symbols the compiled functions read, in this order, from each packed sample. */
const ARGS = ['x', 'y', 'z', 't', 'nx', 'ny', 'nz'] as const;
const STRIDE = ARGS.length;

const S_AND_K = 'Salari & Knupp 2000';

/** Warnings about the manufactured solution of `p`, one sentence each; empty when none applies. */
export function checkManufactured(p: DerivedProblem, opts: ManufacturedCheckOptions): string[] {
  const { dim } = p;
  checkBox(opts.box, dim, 'checkManufactured: box');
  const n = opts.samples ?? 32;
  if (!Number.isInteger(n) || n < 1) throw new RungsInputError(`checkManufactured: samples must be a positive integer, got ${n}`, 'samples');
  const seed = opts.seed ?? DEFAULT_SEED;
  const timeRange = p.hasTime ? (opts.time ?? [0, 1]) : ([0, 0] as const);
  const box = boxSamples(opts.box, n, seed, timeRange);
  const boundaries = neumannSamples(opts.neumann ?? {}, p, seed, timeRange);
  const warnings: string[] = [];
  warnings.push(...nonFinite(p, box));
  warnings.push(...zeroAndCoincidentCoefficients(p, box));
  warnings.push(...unexercisedCoefficients(p, opts.pde, box, boundaries));
  warnings.push(...fieldsInDiscreteSpace(p, opts.degree));
  warnings.push(...trivialOrSteepFields(p, box, opts.box));
  warnings.push(...zeroNeumannData(box, boundaries));
  return warnings;
}

// ---------------------------------------------------------------------------------------------------- sampling

/** Seeded points in the box, packed STRIDE numbers each (normals 0). */
function boxSamples(box: BoundingBox, n: number, seed: number, time: readonly [number, number]): Float64Array {
  const xyz = samplePoints(box, n, seed);
  const random = mulberry32(seed + 1);
  const out = new Float64Array(n * STRIDE);
  for (let s = 0; s < n; s++) {
    out.set(xyz.subarray(3 * s, 3 * s + 3), s * STRIDE);
    out[s * STRIDE + 3] = time[0] + (time[1] - time[0]) * random();
  }
  return out;
}

interface Boundary { tag: string; samples: Float64Array; equations: DerivedEquation[] }

function neumannSamples(given: Readonly<Record<string, NeumannSamples>>, p: DerivedProblem, seed: number, time: readonly [number, number]): Boundary[] {
  return Object.entries(given).map(([tag, s]) => {
    const where = `checkManufactured: neumann.${tag}`;
    if (s.points.length % 3 !== 0 || s.points.length !== s.normals.length || s.points.length === 0) {
      throw new RungsInputError(`${where}: expected points and normals as packed xyz triples of equal, nonzero length, got ${s.points.length} and ${s.normals.length} numbers`, where);
    }
    const names = s.equations ?? p.equations.filter((e) => e.flux).map((e) => e.name);
    const equations = names.map((name) => {
      const e = p.equations.find((q) => q.name === name);
      if (!e || !e.flux) throw new RungsInputError(`${where}.equations: '${name}' is not an equation with a flux; those are ${p.equations.filter((q) => q.flux).map((q) => q.name).join(', ') || '(none)'}`, where);
      return e;
    });
    const count = s.points.length / 3;
    const random = mulberry32(seed + 2);
    const samples = new Float64Array(count * STRIDE);
    for (let i = 0; i < count; i++) {
      for (let d = 0; d < 3; d++) {
        samples[i * STRIDE + d] = s.points[3 * i + d];
        samples[i * STRIDE + 4 + d] = s.normals[3 * i + d];
      }
      samples[i * STRIDE + 3] = time[0] + (time[1] - time[0]) * random();
    }
    return { tag, samples, equations };
  });
}

/** Values of `trees` at each sample: out[s·m + i] for tree i at sample s. */
function valuesAt(trees: readonly MathNode[], samples: Float64Array): Float64Array {
  const m = trees.length;
  const count = samples.length / STRIDE;
  const out = new Float64Array(count * m);
  if (m === 0) return out;
  const fn = compileOutputs(ARGS, trees);
  const one = new Float64Array(m);
  for (let s = 0; s < count; s++) {
    fn(samples.subarray(s * STRIDE, (s + 1) * STRIDE), one);
    out.set(one, s * m);
  }
  return out;
}

function largestAbs(values: Float64Array): number {
  let m = 0;
  for (const v of values) if (Number.isFinite(v)) m = Math.max(m, Math.abs(v));
  return m;
}

function pointOf(samples: Float64Array, s: number, dim: Dim): string {
  return formatPoint(samples[s * STRIDE], samples[s * STRIDE + 1], samples[s * STRIDE + 2], dim);
}

// ---------------------------------------------------------------------------------------------------- names

/** Named scalar components of a tensor, indices 1-based as in the equation language (b[2], k[1,2]). */
interface Component { label: string; node: MathNode; index: number[] }

function componentsOf(name: string, t: Tensor): Component[] {
  if (t.rank === 0) return [{ label: name, node: t.c, index: [] }];
  if (t.rank === 1) return t.c.map((node, i) => ({ label: `${name}[${i + 1}]`, node, index: [i] }));
  return t.c.flatMap((row, i) => row.map((node, j) => ({ label: `${name}[${i + 1},${j + 1}]`, node, index: [i, j] })));
}

/** The formula of a component for messages, shortened when long. */
function formulaText(node: MathNode): string {
  const text = node.toString();
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

// ---------------------------------------------------------------------------------------------------- (5) finite values

/** Fields and sources must be finite in the domain: the operators have to make sense there (Salari & Knupp 2000,
 *  guideline 1, smooth functions). */
function nonFinite(p: DerivedProblem, box: Float64Array): string[] {
  const warnings: string[] = [];
  const items: { what: string; node: MathNode }[] = [
    ...p.fields.flatMap((f) => componentsOf(f.name, f.exact).map((c) => ({ what: `field ${c.label}`, node: c.node }))),
    ...p.equations.flatMap((e) => componentsOf(e.name, e.source).map((c) => ({ what: `the source of equation ${c.label}`, node: c.node }))),
  ];
  const values = valuesAt(items.map((i) => i.node), box);
  items.forEach((item, i) => {
    for (let s = 0; s < values.length / items.length; s++) {
      const v = values[s * items.length + i];
      if (!Number.isFinite(v)) {
        warnings.push(`${item.what} is ${v} at ${pointOf(box, s, p.dim)} inside the box, so the study cannot converge there; choose smooth functions defined on the whole domain (${S_AND_K}, guideline 1).`);
        return;
      }
    }
  });
  return warnings;
}

// ---------------------------------------------------------------------------------------------------- (2) coefficients

/** A zero coefficient leaves its term out (Salari & Knupp 2000, guideline 2). Two coefficients of the same shape
 *  that are equal everywhere hide a solver that swaps them, e.g. λ for μ (common practice, no source). Zero
 *  off-diagonal entries of a matrix (a diagonal tensor) and the symmetric pair k[i,j] = k[j,i] are normal and pass. */
function zeroAndCoincidentCoefficients(p: DerivedProblem, box: Float64Array): string[] {
  const warnings: string[] = [];
  const entries = [...p.coefficients].map(([name, t]) => {
    const comps = componentsOf(name, t);
    const values = valuesAt(comps.map((c) => c.node), box);
    const count = box.length / STRIDE;
    const columns = comps.map((_, i) => Float64Array.from({ length: count }, (_v, s) => values[s * comps.length + i]));
    return { name, t, comps, columns };
  });
  const isZero = (col: Float64Array) => col.every((v) => v === 0);
  for (const { t, comps, columns } of entries) {
    comps.forEach((c, i) => {
      const offDiagonal = t.rank === 2 && c.index[0] !== c.index[1];
      if (offDiagonal || !isZero(columns[i])) return;
      warnings.push(`coefficient ${c.label} is zero everywhere in the box, so the term it multiplies is absent and a mistake in that term could not show; give it a nonzero value (${S_AND_K}, guideline 2).`);
    });
  }
  const same = (a: Float64Array, b: Float64Array) => !isZero(a) && !isZero(b) &&
    a.every((v, s) => Math.abs(v - b[s]) <= EQUAL_TOLERANCE * Math.max(Math.abs(v), Math.abs(b[s])));
  const say = (a: string, b: string, formula: string) =>
    `coefficients ${a} and ${b} are equal everywhere in the box (both ${formula}), so a solver that swaps them would pass unnoticed; give them different values (common practice, no source).`;
  // Within one coefficient: components of a vector, diagonal entries of a matrix.
  for (const { t, comps, columns } of entries) {
    if (t.rank === 0) continue;
    const candidates = comps.map((c, i) => ({ c, col: columns[i] })).filter(({ c }) => t.rank === 1 || c.index[0] === c.index[1]);
    for (let i = 0; i < candidates.length; i++) {
      for (let j = i + 1; j < candidates.length; j++) {
        if (same(candidates[i].col, candidates[j].col)) warnings.push(say(candidates[i].c.label, candidates[j].c.label, formulaText(candidates[i].c.node)));
      }
    }
  }
  // Between coefficients of the same shape: every component equal.
  for (let a = 0; a < entries.length; a++) {
    for (let b = a + 1; b < entries.length; b++) {
      const A = entries[a];
      const B = entries[b];
      if (A.t.rank !== B.t.rank || !A.columns.every((col, i) => same(col, B.columns[i]))) continue;
      warnings.push(say(A.name, B.name, A.t.rank === 0 ? formulaText(A.comps[0].node) : 'component by component'));
    }
  }
  return warnings;
}

// ---------------------------------------------------------------------------------------------------- (1) unexercised terms

/** −∇·F + R and F·n, built the same way for the unperturbed and the perturbed trees, so untouched parts agree to
 *  the last bit. */
function sourceAndNormalFlux(flux: Tensor | null, rest: Tensor, dim: Dim): { source: MathNode[]; normal: MathNode[] } {
  const coords = variablesOf(dim, false);
  const n = NORMAL_SYMBOLS.slice(0, dim).map((s) => new SymbolNode(s));
  const add = (parts: MathNode[]) => parts.reduce((a, b) => new OperatorNode('+', 'add', [a, b]));
  const rows: MathNode[][] | null = flux === null ? null : flux.rank === 1 ? [flux.c] : flux.rank === 2 ? flux.c : null;
  const restComps = components(rest);
  const source = restComps.map((r, i) => {
    if (rows === null) return r;
    const div = add(rows[i].map((f, j) => differentiate(f, coords[j])));
    return new OperatorNode('-', 'subtract', [r, div]);
  });
  const normal = rows === null ? [] : rows.map((row) => add(row.map((f, j) => new OperatorNode('*', 'multiply', [f, n[j]]))));
  return { source, normal };
}

/** Symbols standing for "this coefficient component's factor": 1 in the baseline, PERTURBATION in its variant. A
 *  symbol, not a node identity, so that it survives mathjs differentiation (∂(k·m)/∂x = m·∂k/∂x keeps m by name). */
const MARK = '__rungs_mark';

interface Marked { eqs: { flux: Tensor | null; rest: Tensor }[]; present: Set<number> }

/** Every equation's flux and rest with coefficient component i multiplied by the symbol MARK+i, marked where the
 *  component's node occurs in p's trees (by identity: the evaluator inserts coefficient trees as they are);
 *  `present` says which were found. A literal 1 multiplying a term is folded away by the evaluator and is not found. */
function markedByIdentity(p: DerivedProblem, comps: Component[]): Marked {
  const index = new Map<MathNode, number>(comps.map((c, i) => [c.node, i]));
  const present = new Set<number>();
  const replace = (node: MathNode) => node.transform((n) => {
    const i = index.get(n);
    if (i === undefined) return n;
    present.add(i);
    return markedNode(n, i);
  });
  const eqs = p.equations.map((e) => ({ flux: e.flux ? mapTensor(e.flux, replace) : null, rest: mapTensor(e.rest, replace) }));
  return { eqs, present };
}

/** The same, with the equations evaluated again from their declaration and every component marked before: each
 *  component is then followed wherever it goes, differentiated or not. Null when the declaration is not the one p
 *  came from (the check then stays silent rather than guess). */
function markedByDeclaration(p: DerivedProblem, pde: PdeDeclaration, comps: Component[]): Marked | null {
  const values = new Map<string, Tensor>();
  let i = 0;
  for (const [name, t] of p.coefficients) values.set(name, mapTensor(t, (c) => markedNode(c, i++)));
  for (const f of p.fields) values.set(f.name, f.exact);
  const scope = { dim: p.dim, values, time: true };
  try {
    const eqs = p.equations.map((e) => {
      const decl = pde.equations[e.name];
      if (!decl) throw new Error(`no equation ${e.name}`);
      const flux = decl.flux === undefined ? null : evaluateExpression(decl.flux, `pde.equations.${e.name}.flux`, scope);
      const rest = decl.rest === undefined ? e.rest : evaluateExpression(decl.rest, `pde.equations.${e.name}.rest`, scope);
      return { flux, rest };
    });
    return { eqs, present: new Set(comps.map((_, j) => j)) };
  } catch {
    return null;
  }
}

function markedNode(c: MathNode, i: number): MathNode {
  return new OperatorNode('*', 'multiply', [c, new SymbolNode(`${MARK}${i}`)]);
}

/** True when a declared flux or rest takes grad, div or dt of an expression holding a coefficient: the derivative's
 *  new trees hold no node of the coefficient, so marking by identity would miss part of its term. */
function differentiatesCoefficient(pde: PdeDeclaration, names: ReadonlySet<string>): boolean {
  let found = false;
  for (const decl of Object.values(pde.equations)) {
    for (const text of [decl.flux, decl.rest]) {
      if (typeof text !== 'string') continue;
      let tree: MathNode;
      try { tree = parse(text); } catch { continue; }
      tree.traverse((n) => {
        if (n.type !== 'FunctionNode') return;
        const call = n as unknown as { fn: { name?: string }; args: MathNode[] };
        if (!['grad', 'div', 'dt'].includes(call.fn.name ?? '')) return;
        for (const a of call.args) a.traverse((m) => { if (m.type === 'SymbolNode' && names.has((m as unknown as { name: string }).name)) found = true; });
      });
    }
  }
  return found;
}

/** The trees with MARK+j set to PERTURBATION and every other mark to 1 (j = −1: the baseline). */
function withFactor(nodes: readonly MathNode[], j: number): MathNode[] {
  return nodes.map((node) => node.transform((n) => {
    if (n.type !== 'SymbolNode') return n;
    const name = (n as unknown as { name: string }).name;
    if (!name.startsWith(MARK)) return n;
    return new ConstantNode(Number(name.slice(MARK.length)) === j ? PERTURBATION : 1);
  }));
}

/** Largest change between two value arrays and their size (largest finite value of either). */
function change(a: Float64Array, b: Float64Array): { delta: number; size: number } {
  let delta = 0;
  for (let i = 0; i < a.length; i++) if (Number.isFinite(a[i]) && Number.isFinite(b[i])) delta = Math.max(delta, Math.abs(a[i] - b[i]));
  return { delta, size: Math.max(largestAbs(a), largestAbs(b)) };
}

/** Every term must be exercised (Salari & Knupp 2000, guideline 2): scale each coefficient (each component of a
 *  vector or matrix) by 1.5 and see whether any source, or the Neumann data on a declared Neumann boundary, moves.
 *  If nothing moves, the derivatives the coefficient multiplies vanish for this u, and so would a mistake there. */
function unexercisedCoefficients(p: DerivedProblem, pde: PdeDeclaration | undefined, box: Float64Array, boundaries: Boundary[]): string[] {
  const comps = [...p.coefficients].flatMap(([name, t]) => componentsOf(name, t));
  if (comps.length === 0) return [];
  // A zero component has no term to exercise: reported as zero, or a normal off-diagonal zero.
  const zero = comps.map((c) => valuesAt([c.node], box).every((v) => v === 0));
  // By identity when that finds every component (cheap); from the declaration otherwise (it derives ∇u again).
  let marked: Marked | null = markedByIdentity(p, comps);
  if (pde && (comps.some((_, j) => !zero[j] && !marked!.present.has(j)) || differentiatesCoefficient(pde, new Set(p.coefficients.keys())))) {
    marked = markedByDeclaration(p, pde, comps);
  }
  if (marked === null) return [];
  // Differentiated once, marks in place; each variant then only substitutes numbers and compiles.
  const built = marked.eqs.map((e) => sourceAndNormalFlux(e.flux, e.rest, p.dim));
  const evaluate = (j: number) => ({
    sources: built.map((b) => valuesAt(withFactor(b.source, j), box)),
    normals: boundaries.map((bd) => bd.equations.map((eq) => valuesAt(withFactor(built[p.equations.indexOf(eq)].normal, j), bd.samples))),
  });
  const base = evaluate(-1);
  const moves = (a: Float64Array, b: Float64Array) => { const c = change(a, b); return c.delta > CHANGE_TOLERANCE * c.size; };
  const names = p.equations.map((e) => e.name).join(', ');
  const unchanged = boundaries.length
    ? `the source of ${names} and the Neumann data on ${boundaries.map((b) => `'${b.tag}'`).join(', ')}`
    : `the source of ${names}`;
  const warnings: string[] = [];
  comps.forEach((comp, j) => {
    if (zero[j] || !marked!.present.has(j)) return;
    const moved = evaluate(j);
    if (moved.sources.some((v, i) => moves(v, base.sources[i]))) return;
    if (moved.normals.some((perTag, b) => perTag.some((v, i) => moves(v, base.normals[b][i])))) return;
    warnings.push(`coefficient ${comp.label}: scaling it by ${PERTURBATION} leaves ${unchanged} unchanged at every sample point, so the derivatives it multiplies vanish for this exact solution and a mistake in its term could not show; choose an exact solution for which that term is nonzero (${S_AND_K}, guideline 2).`);
  });
  return warnings;
}

// ---------------------------------------------------------------------------------------------------- (3) discrete space

/** The tree with t fixed at a value, so a space-time polynomial is judged by its degree in space. */
function atTime(node: MathNode, t: number): MathNode {
  return node.transform((n) => (n.type === 'SymbolNode' && (n as unknown as { name: string }).name === 't' ? new ConstantNode(t) : n));
}

/** A component that is a polynomial of total degree ≤ k lies in every degree-k Lagrange space (P_k ⊂ Q_k too), so
 *  Galerkin reproduces it and no order can be measured: the solution needs nontrivial derivatives beyond the
 *  element's (Salari & Knupp 2000, guideline 3). */
function fieldsInDiscreteSpace(p: DerivedProblem, degree: ManufacturedCheckOptions['degree']): string[] {
  if (degree === undefined) return [];
  const warnings: string[] = [];
  for (const f of p.fields) {
    const k = typeof degree === 'number' ? degree : degree[f.name];
    if (k === undefined) continue;
    for (const c of componentsOf(f.name, f.exact)) {
      // Two times: a coefficient of t that happens to vanish at one of them does not lower the degree.
      const degrees = p.hasTime ? [0.37, 0.71].map((t) => polynomialDegree(atTime(c.node, t))) : [polynomialDegree(c.node)];
      if (degrees.some((d) => d === null)) continue;
      const d = Math.max(...(degrees as number[]));
      if (d > k) continue;
      warnings.push(`field ${c.label} = ${formulaText(c.node)} is a polynomial of total degree ${d}, inside the degree-${k} element space, so the solver reproduces it exactly and the study can only report "exact", not measure an order; add a non-polynomial part (e.g. sin, exp) or raise its degree above ${k} (${S_AND_K}, guideline 3).`);
    }
  }
  return warnings;
}

// ---------------------------------------------------------------------------------------------------- (5) trivial or steep fields

/** A field that does not vary in some coordinate (or in t, for a time-dependent problem) leaves every term in that
 *  direction untested (Salari & Knupp 2000, guideline 2; their example is a temperature independent of time). A field
 *  whose derivatives are large against its range needs very fine meshes before the rate shows (guideline 4). */
function trivialOrSteepFields(p: DerivedProblem, box: Float64Array, bounds: BoundingBox): string[] {
  const warnings: string[] = [];
  const coords = variablesOf(p.dim, false);
  const count = box.length / STRIDE;
  for (const f of p.fields) {
    const comps = componentsOf(f.name, f.exact);
    // Row i of the gradient is ∇ of component i; one more column for ∂/∂t when the problem is time dependent.
    const gradRows: MathNode[][] = f.grad.rank === 1 ? [f.grad.c] : f.grad.rank === 2 ? f.grad.c : [];
    const rows = gradRows.map((row, i) => (p.hasTime ? [...row, differentiate(comps[i].node, 't')] : row));
    const width = rows[0]?.length ?? 0;
    const values = valuesAt(comps.map((c) => c.node), box);
    const derivatives = valuesAt(rows.flat(), box);
    let fieldScale = 0;
    for (let s = 0; s < count; s++) for (let i = 0; i < comps.length; i++) for (let d = 0; d < coords.length; d++) {
      const v = derivatives[s * rows.length * width + i * width + d];
      if (Number.isFinite(v)) fieldScale = Math.max(fieldScale, Math.abs(v));
    }
    comps.forEach((c, i) => {
      const column = (d: number) => Float64Array.from({ length: count }, (_v, s) => derivatives[s * rows.length * width + i * width + d]);
      const vanishes = (d: number) => column(d).every((v) => !(Math.abs(v) > ZERO_DERIVATIVE * fieldScale));
      const still = coords.map((_, d) => d).filter(vanishes);
      if (still.length === coords.length) {
        warnings.push(`field ${c.label} is constant in space over the box, so no term acting on its derivatives is exercised; give it a nonconstant formula such as sin(pi*x)*exp(y) (${S_AND_K}, guideline 2).`);
        return;
      }
      if (still.length > 0 && p.dim > 1) {
        warnings.push(`field ${c.label} does not vary in ${still.map((d) => coords[d]).join(', ')}, so the terms in that direction are not exercised; make it depend on every coordinate (${S_AND_K}, guideline 2).`);
      }
      if (p.hasTime && vanishes(coords.length)) {
        warnings.push(`field ${c.label} does not vary in t although the problem is time dependent, so the time-derivative term is not exercised; make it depend on t (${S_AND_K}, guideline 2).`);
      }
      // Steepness: derivative times box width against the range of the component.
      let lo = Infinity;
      let hi = -Infinity;
      for (let s = 0; s < count; s++) {
        const v = values[s * comps.length + i];
        if (Number.isFinite(v)) { lo = Math.min(lo, v); hi = Math.max(hi, v); }
      }
      const range = hi - lo;
      if (!(range > 0)) return;
      let steepest = 0;
      let along = 0;
      coords.forEach((_, d) => {
        const w = bounds[d][1] - bounds[d][0];
        const m = largestAbs(column(d)) * w / range;
        if (m > steepest) { steepest = m; along = d; }
      });
      if (steepest > STRONG_VARIATION) {
        warnings.push(`field ${c.label} varies strongly in ${coords[along]} (largest derivative × box width = ${steepest.toPrecision(3)} × its range over the box), so the ladder needs very fine meshes before the rate shows; choose gentler frequencies or layers (${S_AND_K}, guideline 4).`);
      }
    });
  }
  return warnings;
}

// ---------------------------------------------------------------------------------------------------- (4) Neumann data

/** Zero natural data on a Neumann boundary: a solver that forgets the boundary term passes. Every term, the
 *  boundary term included, has to be exercised (Salari & Knupp 2000, guideline 2, applied to the boundary term). */
function zeroNeumannData(box: Float64Array, boundaries: Boundary[]): string[] {
  const warnings: string[] = [];
  for (const b of boundaries) {
    for (const e of b.equations) {
      const fluxComps = components(e.flux!);
      // The size of F over the box and on this boundary: F·n is judged against it, not against itself.
      const size = Math.max(largestAbs(valuesAt(fluxComps, box)), largestAbs(valuesAt(fluxComps, b.samples)));
      const fn = valuesAt(components(e.normalFlux!), b.samples);
      if (largestAbs(fn) > CHANGE_TOLERANCE * size) continue;
      if (fn.some((v) => !Number.isFinite(v))) continue; // reported as non-finite, not as zero
      warnings.push(`equation ${e.name}: the Neumann data F·n on boundary '${b.tag}' are zero at all ${b.samples.length / STRIDE} sample points, so a solver that drops the boundary term would still pass; choose an exact solution with a nonzero normal flux on '${b.tag}' or make it a Dirichlet boundary (${S_AND_K}, guideline 2).`);
    }
  }
  return warnings;
}
