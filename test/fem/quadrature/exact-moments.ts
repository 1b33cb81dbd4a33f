// Exact monomial integrals over the reference cells, in exact integer arithmetic (BigInt) and rounded once.
import type { QuadratureRule } from '../../../src/fem/quadrature/types.ts';

function factorial(k: number): bigint {
  let r = 1n;
  for (let i = 2n; i <= BigInt(k); i++) r *= i;
  return r;
}

/** ∫_0^1 x^a dx = 1/(a+1). */
export function intervalMoment(a: number): number {
  return 1 / (a + 1);
}

/** ∫_[0,1]^2 x^a y^b = 1/((a+1)(b+1)). */
export function squareMoment(a: number, b: number): number {
  return 1 / ((a + 1) * (b + 1));
}

/** ∫_T x^a y^b over the triangle (0,0),(1,0),(0,1) = a! b! / (a+b+2)!: Dirichlet's integral formula
 *  (Dirichlet 1839; Stroud 1971). */
export function triangleMoment(a: number, b: number): number {
  return Number(factorial(a) * factorial(b)) / Number(factorial(a + b + 2));
}

/** ∫_K x^a y^b z^c over the unit tetrahedron = a! b! c! / (a+b+c+3)! (Dirichlet 1839; Stroud 1971). */
export function tetrahedronMoment(a: number, b: number, c: number): number {
  return Number(factorial(a) * factorial(b) * factorial(c)) / Number(factorial(a + b + c + 3));
}

/** sum_q w_q prod_k x_{q,k}^{e_k} for exponents e (one per coordinate). */
export function ruleMoment(rule: QuadratureRule, exponents: readonly number[]): number {
  const dim = exponents.length;
  let s = 0;
  for (let q = 0; q < rule.nPoints; q++) {
    let f = rule.weights[q]!;
    for (let k = 0; k < dim; k++) f *= rule.points[q * dim + k]! ** exponents[k]!;
    s += f;
  }
  return s;
}

/** Exponent tuples of total degree exactly d in dim variables. */
export function exponentsOfDegree(d: number, dim: 1 | 2 | 3): number[][] {
  const out: number[][] = [];
  if (dim === 1) out.push([d]);
  else if (dim === 2) for (let a = 0; a <= d; a++) out.push([a, d - a]);
  else for (let a = 0; a <= d; a++) for (let b = 0; a + b <= d; b++) out.push([a, b, d - a - b]);
  return out;
}

/** Largest relative error of the rule over all monomials of total degree <= d on a simplex or interval. */
export function worstSimplexError(rule: QuadratureRule, d: number): number {
  const dim = rule.cell === 'interval' ? 1 : rule.cell === 'tetrahedron' ? 3 : 2;
  let worst = 0;
  for (let k = 0; k <= d; k++) worst = Math.max(worst, worstErrorOfDegree(rule, k, dim));
  return worst;
}

/** Largest relative error over the monomials of total degree exactly d. */
export function worstErrorOfDegree(rule: QuadratureRule, d: number, dim: 1 | 2 | 3): number {
  let worst = 0;
  for (const e of exponentsOfDegree(d, dim)) {
    const exact =
      dim === 1 ? intervalMoment(e[0]!) : dim === 2 ? triangleMoment(e[0]!, e[1]!) : tetrahedronMoment(e[0]!, e[1]!, e[2]!);
    worst = Math.max(worst, Math.abs(ruleMoment(rule, e) - exact) / exact);
  }
  return worst;
}
