import { describe, expect, it } from 'vitest';
import { parse, type MathNode } from 'mathjs';
import { RungsInputError } from '../../src/errors.ts';
import { evaluateExpression, type Scope } from '../../src/equation/language.ts';
import { derive, type DeriveInput } from '../../src/equation/derive.ts';
import { compileBundle, dataBundle } from '../../src/equation/bundle.ts';
import { linearElasticity, stokes } from '../../src/equation/presets.ts';
import type { Tensor } from '../../src/equation/tensor.ts';
import type { PdeDeclaration } from '../../src/equation/types.ts';

// The equation language evaluated to trees of formulas; every tree is evaluated here with mathjs's own
// `node.evaluate` (mathjs is the outside reference library) and compared with values computed by hand in plain
// TypeScript. The vector and matrix algebra follows the usual index conventions (Gurtin 1981, "An Introduction to
// Continuum Mechanics", §1–§5: (∇v)_ij = ∂v_i/∂x_j, (div A)_i = Σ_j ∂A_ij/∂x_j, (Av)_i = Σ_j A_ij v_j,
// (vA)_j = Σ_i v_i A_ij, (AB)_ij = Σ_k A_ik B_kj, (a⊗b)_ij = a_i b_j, sym A = (A + Aᵀ)/2, tr A = Σ_i A_ii).

type Dim = 1 | 2 | 3;
type Value = number | number[] | number[][];
type Given = string | string[] | string[][];

const { sin, cos, exp, sqrt, log, abs, cbrt } = Math;

/** A scope of named tensors from formula text (scalars, vectors, matrices), parsed by mathjs. */
function scopeOf(dim: Dim, given: Record<string, Given>, time = true): Scope {
  const values = new Map<string, Tensor>();
  for (const [name, g] of Object.entries(given)) {
    if (typeof g === 'string') values.set(name, { rank: 0, c: parse(g) });
    else if (g.every((c) => typeof c === 'string')) values.set(name, { rank: 1, c: (g as string[]).map((c) => parse(c)) });
    else values.set(name, { rank: 2, c: (g as string[][]).map((row) => row.map((c) => parse(c))) });
  }
  return { dim, values, time };
}

/** Every component of a tensor evaluated by mathjs at a point. */
function valueOf(t: Tensor, at: Record<string, number>): Value {
  const ev = (n: MathNode) => n.evaluate({ ...at }) as number;
  if (t.rank === 0) return ev(t.c);
  if (t.rank === 1) return t.c.map(ev);
  return t.c.map((row) => row.map(ev));
}

/** Compare two values of the same shape within tol·max(|want|, 1); a shape mismatch is a failure. */
function differences(got: Value, want: Value, tol = 1e-13, path = ''): string[] {
  if (typeof want === 'number') {
    if (typeof got !== 'number') return [`${path}: got ${JSON.stringify(got)}, want the number ${want}`];
    return Math.abs(got - want) <= tol * Math.max(Math.abs(want), 1) ? [] : [`${path}: got ${got}, want ${want}`];
  }
  if (!Array.isArray(got) || got.length !== want.length) return [`${path}: got ${JSON.stringify(got)}, want ${JSON.stringify(want)}`];
  return want.flatMap((w, i) => differences((got as Value[])[i] as Value, w as Value, tol, `${path}[${i}]`));
}

// A 3D scope at the point P = (0.3, −0.7, 1.1), t = 0.45 (a glaze sample; numbers invented).
const P = { x: 0.3, y: -0.7, z: 1.1, t: 0.45 };
const SCOPE_3D = scopeOf(3, {
  p: 'x^2*y + sin(z)',
  q: 't^2*x',
  v: ['x*y', 'y^2*z', 'exp(x)*z'],
  w: ['1 + z', 'x', 'y*t'],
  A: [['x*y', 'y^2', 'z'], ['x^3', 'x*y*z', '1'], ['y', 'z^2', 'x']],
  B: [['1', '2', '0'], ['x', '0', 'y'], ['0', 'z', '3']],
});

// The same quantities at P, by hand.
const { x, y, z, t } = P;
const hp = x * x * y + sin(z);
const hq = t * t * x;
const hv = [x * y, y * y * z, exp(x) * z];
const hw = [1 + z, x, y * t];
const hA = [[x * y, y * y, z], [x ** 3, x * y * z, 1], [y, z * z, x]];
const hB = [[1, 2, 0], [x, 0, y], [0, z, 3]];

function run(expression: string, scope: Scope = SCOPE_3D): Value {
  return valueOf(evaluateExpression(expression, 'pde.equations.test.flux', scope), P);
}

/** Hand matrix products (plain loops, Gurtin 1981 §1). */
const matVec = (M: number[][], a: number[]) => M.map((row) => row.reduce((s, m, j) => s + m * a[j], 0));
const vecMat = (a: number[], M: number[][]) => M[0].map((_, j) => a.reduce((s, ai, i) => s + ai * M[i][j], 0));
const matMat = (M: number[][], N: number[][]) => M.map((row) => N[0].map((_, j) => row.reduce((s, m, k) => s + m * N[k][j], 0)));
const transposed = (M: number[][]) => M[0].map((_, j) => M.map((row) => row[j]));

describe('equation language: tensor functions against hand values (evaluated with mathjs)', () => {
  it('grad of a scalar is the vector of partial derivatives', () => {
    // p = x²y + sin(z): ∇p = (2xy, x², cos(z)).
    expect(differences(run('grad(p)'), [2 * x * y, x * x, cos(z)])).toEqual([]);
  });

  it('grad of a vector is the matrix ∂v_i/∂x_j (row = component, column = direction)', () => {
    // v = (xy, y²z, eˣz): ∇v = [[y, x, 0], [0, 2yz, y²], [eˣz, 0, eˣ]].
    expect(differences(run('grad(v)'), [[y, x, 0], [0, 2 * y * z, y * y], [exp(x) * z, 0, exp(x)]])).toEqual([]);
  });

  it('div of a vector is Σ ∂v_i/∂x_i; div of a matrix is row-wise Σ_j ∂A_ij/∂x_j', () => {
    // div v = y + 2yz + eˣ.
    expect(differences(run('div(v)'), y + 2 * y * z + exp(x))).toEqual([]);
    // A rows: (xy, y², z) → y + 2y + 1; (x³, xyz, 1) → 3x² + xz + 0; (y, z², x) → 0 + 0 + 0.
    // (Column-wise would give (y + 3x², ..), so the orientation is pinned down.)
    expect(differences(run('div(A)'), [3 * y + 1, 3 * x * x + x * z, 0])).toEqual([]);
    // div(grad(p)) = Δp = 2y + 0 − sin(z).
    expect(differences(run('div(grad(p))'), 2 * y - sin(z))).toEqual([]);
  });

  it('dot in its four shape pairs: vector·vector, matrix·vector, vector·matrix, matrix·matrix', () => {
    expect(differences(run('dot(v, w)'), hv.reduce((s, vi, i) => s + vi * hw[i], 0))).toEqual([]);
    expect(differences(run('dot(A, v)'), matVec(hA, hv))).toEqual([]);
    expect(differences(run('dot(v, A)'), vecMat(hv, hA))).toEqual([]);
    expect(differences(run('dot(A, B)'), matMat(hA, hB))).toEqual([]);
    expect(differences(run('dot(B, A)'), matMat(hB, hA))).toEqual([]);
    // A and B do not commute, so a swapped product would be caught (checked on the hand values themselves).
    expect(differences(matMat(hA, hB), matMat(hB, hA)).length).toBeGreaterThan(0);
  });

  it('outer, transpose, sym, trace and the identity I', () => {
    expect(differences(run('outer(v, w)'), hv.map((vi) => hw.map((wj) => vi * wj)))).toEqual([]);
    expect(differences(run('transpose(A)'), transposed(hA))).toEqual([]);
    expect(differences(run('sym(A)'), hA.map((row, i) => row.map((a, j) => (a + hA[j][i]) / 2)))).toEqual([]);
    expect(differences(run('trace(A)'), x * y + x * y * z + x)).toEqual([]);
    expect(differences(run('I'), [[1, 0, 0], [0, 1, 0], [0, 0, 1]])).toEqual([]);
    expect(differences(run('p*I'), [[hp, 0, 0], [0, hp, 0], [0, 0, hp]])).toEqual([]);
    expect(differences(run('trace(I)'), 3)).toEqual([]);
    expect(differences(run('dot(I, v)'), hv)).toEqual([]);
    // In 2D and 1D I is 2 × 2 and 1 × 1.
    expect(differences(run('I', scopeOf(2, {})), [[1, 0], [0, 1]])).toEqual([]);
    expect(differences(run('trace(I)', scopeOf(2, {})), 2)).toEqual([]);
    expect(differences(run('I', scopeOf(1, {})), [[1]])).toEqual([]);
    // Composite identities (Gurtin 1981 §1): (Aᵀ)v = vA, tr(a⊗b) = a·b, sym(∇v) is symmetric.
    expect(differences(run('dot(transpose(A), v)'), vecMat(hv, hA))).toEqual([]);
    expect(differences(run('trace(outer(v, w))'), hv.reduce((s, vi, i) => s + vi * hw[i], 0))).toEqual([]);
    const symGrad = run('sym(grad(v))') as number[][];
    expect(differences(symGrad, transposed(symGrad))).toEqual([]);
  });

  it('indexing is 1-based: v[1], v[3], A[1, 2] vs A[2, 1], grad(v)[2, 3]', () => {
    expect(differences(run('v[1]'), hv[0])).toEqual([]);
    expect(differences(run('v[3]'), hv[2])).toEqual([]);
    expect(differences(run('A[1, 2]'), y * y)).toEqual([]);
    expect(differences(run('A[2, 1]'), x ** 3)).toEqual([]);
    expect(differences(run('grad(v)[2, 3]'), y * y)).toEqual([]); // ∂v_2/∂z = y²
    expect(differences(run('grad(p)[1] + v[2]*w[3]'), 2 * x * y + hv[1] * hw[2])).toEqual([]);
  });

  it('dt is ∂/∂t, componentwise, and nests', () => {
    expect(differences(run('dt(q)'), 2 * t * x)).toEqual([]);
    expect(differences(run('dt(dt(q))'), 2 * x)).toEqual([]);
    expect(differences(run('dt(w)'), [0, 0, y])).toEqual([]);
    expect(differences(run('dt(p)'), 0)).toEqual([]);
    // dt commutes with grad for these smooth fields: ∇(∂q/∂t) = (2t, 0, 0).
    expect(differences(run('grad(dt(q))'), [2 * t, 0, 0])).toEqual([]);
    expect(differences(run('dt(grad(q))'), [2 * t, 0, 0])).toEqual([]);
  });

  it('scalar functions of scalars (sin, exp, sqrt, log with a base, abs, pow, cbrt) and the constants pi, e', () => {
    const want = sin(hp) + exp(-hq) + sqrt(1 + x * x) + log(2 + y) / log(3) + abs(y) + x ** 3 + cbrt(z) + Math.PI * Math.E;
    expect(differences(run('sin(p) + exp(-q) + sqrt(1 + x^2) + log(2 + y, 3) + abs(y) + pow(x, 3) + cbrt(z) + pi*e'), want)).toEqual([]);
    // grad through a scalar function (chain rule): ∇ sin(p) = cos(p)∇p.
    expect(differences(run('grad(sin(p))'), [2 * x * y, x * x, cos(z)].map((g) => cos(hp) * g))).toEqual([]);
  });

  it('+ − * / ^: same-shape sums, scalar times tensor either side, tensor over scalar, scalar powers, precedence', () => {
    expect(differences(run('v + w'), hv.map((vi, i) => vi + hw[i]))).toEqual([]);
    expect(differences(run('v - w'), hv.map((vi, i) => vi - hw[i]))).toEqual([]);
    expect(differences(run('-v'), hv.map((vi) => -vi))).toEqual([]);
    expect(differences(run('+v'), hv)).toEqual([]);
    expect(differences(run('p*v'), hv.map((vi) => hp * vi))).toEqual([]);
    expect(differences(run('v*p'), hv.map((vi) => hp * vi))).toEqual([]);
    expect(differences(run('2v'), hv.map((vi) => 2 * vi))).toEqual([]); // implicit multiplication
    expect(differences(run('v/4'), hv.map((vi) => vi / 4))).toEqual([]);
    expect(differences(run('A/p'), hA.map((row) => row.map((a) => a / hp)))).toEqual([]);
    expect(differences(run('2*A - B'), hA.map((row, i) => row.map((a, j) => 2 * a - hB[i][j])))).toEqual([]);
    expect(differences(run('(p + 1)^2'), (hp + 1) ** 2)).toEqual([]);
    expect(differences(run('p^q'), hp ** hq, 1e-12)).toEqual([]);
    // Precedence as in ordinary algebra (common practice, no source): −a² = −(a²), (−a)² = a², 2^3^2 = 2^9,
    // a − b − c = (a − b) − c, 8/2/2 = 2.
    expect(differences(run('-p^2'), -(hp ** 2))).toEqual([]);
    expect(differences(run('(-p)^2'), hp ** 2)).toEqual([]);
    expect(differences(run('2^3^2'), 512)).toEqual([]);
    expect(differences(run('p - q - p'), -hq)).toEqual([]);
    expect(differences(run('8/2/2'), 2)).toEqual([]);
    expect(differences(run('v - (w - v)'), hv.map((vi, i) => 2 * vi - hw[i]))).toEqual([]);
    expect(differences(run('p*(v + w)[2]'), hp * (hv[1] + hw[1]))).toEqual([]);
  });

  it('the same operators through derive and compileBundle: an anisotropic flux dot(K, grad(u)) with a matrix coefficient', () => {
    // K = [[2, x], [0, 1 + y²]], u = x²y: ∇u = (2xy, x²); K∇u = (4xy + x³, (1 + y²)x²);
    // ∇·(K∇u) = ∂x(4xy + x³) + ∂y((1 + y²)x²) = 4y + 3x² + 2x²y, so f = −(4y + 3x² + 2x²y) + u.
    const pde: PdeDeclaration = {
      fields: { u: 'scalar' },
      coefficients: { K: [['2', 'x'], [0, '1 + y^2']] },
      equations: { balance: { flux: 'dot(K, grad(u))', rest: 'u' } },
    };
    const problem = derive({ dim: 2, pde, exact: { u: 'x^2*y' } });
    const data = compileBundle(dataBundle('tile', problem));
    const source = data.functions.get('source_balance')!;
    const flux = data.functions.get('flux_balance')!;
    const out = new Float64Array(1);
    const failures: string[] = [];
    for (const [px, py] of [[0.2, 0.9], [-0.6, 0.35], [1.4, -1.1]]) {
      source.evaluate(new Float64Array([px, py, 0, 0]), out);
      failures.push(...differences(out[0], -(4 * py + 3 * px * px + 2 * px * px * py) + px * px * py, 1e-13, `f(${px}, ${py})`));
      const [nx, ny] = [0.6, -0.8];
      flux.evaluate(new Float64Array([px, py, 0, 0, nx, ny, 0]), out);
      failures.push(...differences(out[0], (4 * px * py + px ** 3) * nx + (1 + py * py) * px * px * ny, 1e-13, `F·n(${px}, ${py})`));
    }
    expect(failures).toEqual([]);
  });
});

// ---------------------------------------------------------------------------------------------------------------

/** The RungsInputError thrown by run (fails the test when nothing, or another error, is thrown). */
function inputError(run: () => unknown): RungsInputError {
  try {
    run();
  } catch (err) {
    if (err instanceof RungsInputError) return err;
    throw err;
  }
  throw new Error('expected a RungsInputError, nothing was thrown');
}

const scalarPde = (flux: string, rest?: string): PdeDeclaration => ({
  fields: { u: 'scalar' },
  coefficients: { k: '1 + x' },
  equations: { balance: { flux, ...(rest === undefined ? {} : { rest }) } },
});

const deriveScalar = (flux: string, rest?: string, more: Partial<DeriveInput> = {}) =>
  derive({ dim: 2, pde: scalarPde(flux, rest), exact: { u: 'x*y' }, ...more });

describe('equation language: bad input is a RungsInputError naming the field path and what would be valid', () => {
  it('an expression that does not parse', () => {
    const err = inputError(() => deriveScalar('k*grad(u'));
    expect(err.message).toMatch(/^pde\.equations\.balance\.flux: cannot parse "k\*grad\(u"/);
    expect(err.where).toBe('pde.equations.balance.flux');
  });

  it('an undeclared name: the message lists the fields, coefficients, variables and functions', () => {
    const err = inputError(() => deriveScalar('kappa*grad(u)'));
    expect(err.message).toMatch(/^pde\.equations\.balance\.flux: the name "kappa" is not declared/);
    expect(err.message).toMatch(/valid: fields and coefficients k, u; variables x, y, t;/);
    expect(err.message).toContain('tensor functions grad, div, dot, outer, transpose, sym, trace, dt');
    // z in 2D is undeclared too.
    expect(inputError(() => deriveScalar('grad(u)', 'z')).message).toMatch(/^pde\.equations\.balance\.rest: the name "z" is not declared.*variables x, y, t/);
    // An unknown function.
    expect(inputError(() => deriveScalar('grad(u)', 'curl(u)')).message).toMatch(/the function "curl".*scalar functions sin, cos/);
  });

  it('an index out of range, 0, not an integer, or the wrong number of indices', () => {
    const pde = linearElasticity({ lambda: 1, mu: 1 });
    pde.equations.momentum.flux = '2*mu*sym(grad(u)) + lambda*u[3]*I';
    const err = inputError(() => derive({ dim: 2, pde, exact: { u: ['x', 'y'] } }));
    expect(err.message).toMatch(/^pde\.equations\.momentum\.flux: index 3 of "u" is out of range: components are 1 to 2 in 2D/);
    const at = (flux: string) => inputError(() => derive({ dim: 2, pde: { ...pde, equations: { momentum: { flux } } }, exact: { u: ['x', 'y'] } })).message;
    expect(at('u[0]*I')).toMatch(/index 0 of "u" is out of range: components are 1 to 2/);
    expect(at('u[1.5]*I')).toMatch(/the index "1.5" \(indices are the numbers 1 to 2\)/);
    expect(at('grad(u)[1]*I')).toMatch(/"grad\(u\)" is a matrix and takes 2 index\(es\), got 1/);
    expect(at('grad(u)[3, 1]*I')).toMatch(/index 3 of "grad\(u\)" is out of range/);
  });

  it('a vector flux in a vector equation (wrong rank), and a matrix flux in a scalar equation', () => {
    // Rest u is a vector, so the equation is a vector one and needs a matrix flux; grad(div(u)) is a vector.
    const err = inputError(() => derive({
      dim: 2, pde: { fields: { u: 'vector' }, equations: { momentum: { flux: 'grad(div(u))', rest: 'u' } } }, exact: { u: ['x*y', 'y'] },
    }));
    expect(err.message).toMatch(/^pde\.equations\.momentum\.flux: is a vector but the equation is a vector \(its rest\); a vector equation needs a matrix flux/);
    const err2 = inputError(() => deriveScalar('grad(grad(u))', 'u'));
    expect(err2.message).toMatch(/^pde\.equations\.balance\.flux: is a matrix but the equation is a scalar.*a scalar equation needs a vector flux/);
    // A rest that is a matrix: no equation has that rank.
    const err3 = inputError(() => deriveScalar('grad(u)', 'u*I'));
    expect(err3.message).toMatch(/^pde\.equations\.balance: rest is a matrix; an equation is scalar \(flux a vector\) or vector \(flux a matrix\)/);
  });

  it('"*" between two vectors points to dot() and outer(); other shape mismatches of the operators', () => {
    const err = inputError(() => deriveScalar('grad(u)', 'grad(u)*grad(u)'));
    expect(err.message).toMatch(/^pde\.equations\.balance\.rest: "\*" between a vector and a vector \(use dot\(\) or outer\(\)\)/);
    const s = (e: string) => inputError(() => evaluateExpression(e, 'pde.equations.test.flux', SCOPE_3D)).message;
    expect(s('A*B')).toMatch(/"\*" between a matrix and a matrix \(use dot\(\) or outer\(\)\)/);
    expect(s('p + v')).toMatch(/^pde\.equations\.test\.flux: "\+" between a scalar and a vector/);
    expect(s('A - v')).toMatch(/"-" between a matrix and a vector/);
    expect(s('p/v')).toMatch(/division by a vector/);
    expect(s('v^2')).toMatch(/"\^" on a vector or matrix \(powers are for scalars\)/);
    expect(s('sin(v)')).toMatch(/sin\(\) of a vector \(scalar functions take scalars\)/);
    expect(s('transpose(v)')).toMatch(/transpose\(\) of a vector/);
    expect(s('trace(p)')).toMatch(/trace\(\) of a scalar/);
    expect(s('outer(v, p)')).toMatch(/outer\(\) of a vector and a scalar \(takes two vectors\)/);
    expect(s('dot(p, v)')).toMatch(/dot\(\) of a scalar and a vector \(use \* with a scalar\)/);
    expect(s('grad(p, q)')).toMatch(/"grad" with 2 argument\(s\) \(takes 1\)/);
    expect(s('[1, 2, 3]')).toMatch(/the construct "\[1, 2, 3\]" \(ArrayNode\).*valid:/);
    expect(s('p[1]')).toMatch(/"p" is a scalar and takes 0 index\(es\), got 1/);
  });

  it('grad of a matrix and div of a scalar', () => {
    const grad = inputError(() => derive({
      dim: 2, pde: { fields: { u: 'vector' }, equations: { momentum: { flux: 'grad(grad(u))' } } }, exact: { u: ['x', 'y'] },
    }));
    expect(grad.message).toMatch(/^pde\.equations\.momentum\.flux: grad\(\) of a matrix \(the language stops at matrices\)/);
    const div = inputError(() => deriveScalar('grad(u)', 'div(u)'));
    expect(div.message).toMatch(/^pde\.equations\.balance\.rest: div\(\) of a scalar \(take grad\(\) first\)/);
  });

  it('a number of equations that does not match the unknowns', () => {
    const pde = stokes({ nu: 1 });
    const momentumOnly: PdeDeclaration = { ...pde, equations: { momentum: pde.equations.momentum } };
    const err = inputError(() => derive({ dim: 2, pde: momentumOnly, exact: { u: ['y', 'x'], p: 'x' } }));
    expect(err.message).toMatch(/^pde\.equations: 2 scalar equation\(s\) \(momentum: a vector\) for 3 unknown component\(s\) \(u: vector, p: scalar\); each unknown component needs one equation/);
    // A vector field with a vector flux and no rest reads as a scalar equation, and no field is scalar.
    const scalarForVector = inputError(() => derive({
      dim: 2, pde: { fields: { u: 'vector' }, equations: { momentum: { flux: 'grad(div(u))' } } }, exact: { u: ['x*y', 'y'] },
    }));
    expect(scalarForVector.message).toMatch(/^pde\.equations\.momentum\.flux: the flux is a vector, which makes a scalar equation, but no field is scalar \(u: vector\)/);
  });

  it('exact for an undeclared field, a missing exact field, a vector field given one formula', () => {
    const pde = stokes({ nu: 1 });
    const extra = inputError(() => derive({ dim: 2, pde, exact: { u: ['y', 'x'], p: 'x', T: 'x*y' } }));
    expect(extra.message).toMatch(/^exact\.T: 'T' is not a declared field; the fields are u, p/);
    const missing = inputError(() => derive({ dim: 2, pde, exact: { u: ['y', 'x'] } }));
    expect(missing.message).toMatch(/^exact\.p: missing; give the exact scalar field p as a formula/);
    const missingVector = inputError(() => derive({ dim: 3, pde, exact: { p: 'x' } }));
    expect(missingVector.message).toMatch(/^exact\.u: missing; give the exact vector field u as 3 formulas/);
    const one = inputError(() => derive({ dim: 2, pde, exact: { u: 'x*y', p: 'x' } }));
    expect(one.message).toMatch(/^exact\.u: the field is a vector; expected 2 formula strings \(one per component\), got "x\*y"/);
    const short = inputError(() => derive({ dim: 3, pde, exact: { u: ['x', 'y'], p: 'x' } }));
    expect(short.message).toMatch(/^exact\.u: the field is a vector; expected 3 formula strings/);
    const list = inputError(() => derive({ dim: 2, pde, exact: { u: ['y', 'x'], p: ['x', 'y'] } }));
    expect(list.message).toMatch(/^exact\.p: the field is scalar; expected one formula string/);
    // Paths given by the caller are used.
    const renamed = inputError(() => derive({ dim: 2, pde, exact: { u: ['y', 'x'] }, paths: { exact: 'studies.glaze.exact', pde: 'studies.glaze.pde' } }));
    expect(renamed.message).toMatch(/^studies\.glaze\.exact\.p: missing/);
  });

  it('a reserved name (x, t, I) as a field is refused with the list of reserved names', () => {
    for (const name of ['x', 't', 'I']) {
      const err = inputError(() => derive({
        dim: 2, pde: { fields: { [name]: 'scalar' }, equations: { balance: { flux: `grad(${name})` } } }, exact: { [name]: 'x*y' },
      }));
      expect(err.message).toMatch(new RegExp(`^pde\\.fields\\.${name}: '${name}' cannot name a field, coefficient or equation; use letters, digits and _ \\(starting with a letter\\), not one of x, y, z, t, pi, e, I, nx, ny, nz`));
    }
    // A coefficient too.
    const coef = inputError(() => derive({ dim: 2, pde: { fields: { u: 'scalar' }, coefficients: { e: 2 }, equations: { balance: { flux: 'grad(u)' } } }, exact: { u: 'x' } }));
    expect(coef.message).toMatch(/^pde\.coefficients\.e: 'e' cannot name/);
  });

  // Each equation pairs with a field of its own shape: by default the first unpaired one in declaration order, so
  // Stokes with its equations listed { mass, momentum } still pairs mass with p and momentum with u.
  it('pairs equations with fields of their own shape, whatever the order of the equations', () => {
    const pde: PdeDeclaration = {
      fields: { u: 'vector', p: 'scalar' },
      coefficients: { nu: 1 },
      equations: { mass: { rest: 'div(u)' }, momentum: { flux: 'nu*grad(u) - p*I' } },
    };
    const d = derive({ dim: 2, pde, exact: { u: ['y', 'x'], p: 'x' } });
    expect(d.equations.map((e) => [e.name, e.field])).toEqual([['mass', 'p'], ['momentum', 'u']]);
    const wrong = inputError(() => derive({ dim: 2, pde: { ...pde, equations: { mass: { rest: 'div(u)', field: 'u' }, momentum: { flux: 'nu*grad(u) - p*I' } } }, exact: { u: ['y', 'x'], p: 'x' } }));
    expect(wrong.message).toMatch(/^pde\.equations\.mass\.field: 'u' is a vector field but the equation is a scalar/);
  });

  it('two equations paired with the same field are refused', () => {
    const pde: PdeDeclaration = {
      fields: { u: 'scalar', v: 'scalar' },
      equations: { a: { flux: 'grad(u)', field: 'u' }, b: { flux: 'grad(v)', field: 'u' } },
    };
    const err = inputError(() => derive({ dim: 2, pde, exact: { u: 'x', v: 'y' } }));
    expect(err.message).toMatch(/^pde\.equations\.b\.field: 'u' is already paired with equation 'a'/);
  });

  it('dt() in a steady derivation (time: false); t in a steady formula', () => {
    const err = inputError(() => deriveScalar('k*grad(u)', 'dt(u)', { time: false }));
    expect(err.message).toMatch(/^pde\.equations\.balance\.rest: the time derivative dt\(\) \(this study is steady\) in "dt\(u\)"; valid: .*variables x, y;/);
    expect(err.message).not.toMatch(/variables x, y, t/);
    const tInExact = inputError(() => derive({ dim: 2, pde: scalarPde('grad(u)'), exact: { u: 'x*t' }, time: false }));
    expect(tInExact.message).toMatch(/^exact\.u: the symbol "t" in "x\*t" is not allowed in 2D; valid: variables x, y;/);
  });
});
