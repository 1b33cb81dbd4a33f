import { RungsNumericalError } from '../../errors.ts';
import { householderLeastSquares } from './least-squares.ts';
import { expandTriangleTable } from './symmetric-orbits.ts';
import type { SymmetricTriangleTable } from './triangle-symmetric-tables.ts';

/**
 * Refines a tabulated symmetric triangle rule to full double precision by Gauss–Newton on its moment
 * equations sum_q w_q x_q^a y_q^b = a! b! / (a+b+2)! for a+b <= degree (exact Dirichlet integrals,
 * e.g. Stroud 1971). Published tables print 15 decimals, which leaves high-degree moments
 * about 1e-14 off; the tabulated values are the starting point and the refined rule is the same rule.
 * Returns the refined table and the largest change of any parameter (a check that the table was right).
 */
export function polishTriangleTable(table: SymmetricTriangleTable): { table: SymmetricTriangleTable; maxShift: number } {
  const start = toParams(table);
  const p = Float64Array.from(start);
  const np = p.length;
  const monomials: Array<[number, number]> = [];
  for (let d = 0; d <= table.degree; d++) for (let a = 0; a <= d; a++) monomials.push([a, d - a]);
  const m = monomials.length;
  const exact = monomials.map(([a, b]) => dirichletTriangle(a, b));
  // The powers x_q^a and y_q^b of every point, computed once per residual (with the same ** as in the sum they feed,
  // so the same bits) instead of once per monomial: the residual is evaluated 2·(parameters) + 1 times per step.
  const stride = table.degree + 1;
  let xPow = new Float64Array(0), yPow = new Float64Array(0);
  const residual = (params: Float64Array, out: Float64Array): void => {
    const rule = expandTriangleTable(fromParams(table, params));
    const nq = rule.nPoints;
    if (xPow.length !== nq * stride) { xPow = new Float64Array(nq * stride); yPow = new Float64Array(nq * stride); }
    for (let q = 0; q < nq; q++) {
      const x = rule.points[2 * q]!, y = rule.points[2 * q + 1]!;
      for (let a = 0; a < stride; a++) { xPow[q * stride + a] = x ** a; yPow[q * stride + a] = y ** a; }
    }
    for (let k = 0; k < m; k++) {
      const [a, b] = monomials[k]!;
      let s = 0;
      for (let q = 0; q < nq; q++) s += rule.weights[q]! * xPow[q * stride + a]! * yPow[q * stride + b]!;
      out[k] = (s - exact[k]!) / exact[k]!;
    }
  };
  const r = new Float64Array(m);
  const rPlus = new Float64Array(m);
  const rMinus = new Float64Array(m);
  const J = new Float64Array(m * np);
  const worstOf = (res: Float64Array): number => {
    let worst = 0;
    for (let k = 0; k < m; k++) worst = Math.max(worst, Math.abs(res[k]!));
    return worst;
  };
  residual(p, r);
  let best = Float64Array.from(p);
  let bestWorst = worstOf(r);
  // quadratic-ish convergence from 15 correct digits: a few steps reach round-off; keep the best iterate
  for (let iter = 0; iter < 4; iter++) {
    for (let c = 0; c < np; c++) {
      // central differences: the Jacobian only steers the correction, its O(1e-9) error just slows convergence
      const h = 1e-6 * Math.max(Math.abs(p[c]!), 1e-3);
      const keep = p[c]!;
      p[c] = keep + h;
      residual(p, rPlus);
      p[c] = keep - h;
      residual(p, rMinus);
      p[c] = keep;
      for (let k = 0; k < m; k++) J[k * np + c] = (rPlus[k]! - rMinus[k]!) / (2 * h);
    }
    for (let k = 0; k < m; k++) r[k] = -r[k]!;
    const step = householderLeastSquares(J, r, m, np);
    if (step === null) {
      throw new RungsNumericalError(`${table.source}: moment equations are rank deficient`, 'polishTriangleTable');
    }
    let stepSize = 0;
    for (let c = 0; c < np; c++) {
      p[c] = p[c]! + step[c]!;
      stepSize = Math.max(stepSize, Math.abs(step[c]!));
    }
    residual(p, r);
    const worst = worstOf(r);
    if (worst < bestWorst) {
      best = Float64Array.from(p);
      bestWorst = worst;
    }
    if (stepSize < 1e-17) break;
  }
  p.set(best);
  let maxShift = 0;
  for (let c = 0; c < np; c++) maxShift = Math.max(maxShift, Math.abs(p[c]! - start[c]!));
  return { table: fromParams(table, p), maxShift };
}

/** ∫_T x^a y^b over the reference triangle = a! b! / (a+b+2)! (Dirichlet's formula; Stroud 1971). */
function dirichletTriangle(a: number, b: number): number {
  // product form avoids overflowing factorials: a! b! / (a+b+2)! = 1 / ((a+b+2)(a+b+1) C(a+b, a))
  let binom = 1;
  for (let i = 1; i <= a; i++) binom = (binom * (b + i)) / i;
  return 1 / ((a + b + 2) * (a + b + 1) * binom);
}

function toParams(t: SymmetricTriangleTable): number[] {
  const p: number[] = [];
  if (t.centroid !== undefined) p.push(t.centroid);
  for (const [a, w] of t.s21) p.push(a, w);
  for (const [a, b, w] of t.s111) p.push(a, b, w);
  return p;
}

function fromParams(t: SymmetricTriangleTable, p: Float64Array): SymmetricTriangleTable {
  let i = 0;
  const centroid = t.centroid !== undefined ? p[i++]! : undefined;
  const s21 = t.s21.map(() => [p[i++]!, p[i++]!] as const);
  const s111 = t.s111.map(() => [p[i++]!, p[i++]!, p[i++]!] as const);
  return { ...t, ...(centroid !== undefined ? { centroid } : {}), s21, s111 };
}
