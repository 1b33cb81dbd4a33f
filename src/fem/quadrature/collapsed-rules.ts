import { gaussJacobiOnUnit } from './gauss-on-unit.ts';
import type { QuadratureRule } from './types.ts';

/**
 * Collapsed (Duffy) product rule on the reference triangle, n points per direction, exact to total degree
 * 2n - 1 (Stroud 1971, conical product rules; Karniadakis & Sherwin 2005, ch. 4 and Appendix B).
 * The square (s, t) in [0,1]^2 maps to x = s (1 - t), y = t with Jacobian (1 - t); a polynomial of total
 * degree d in (x, y) becomes degree <= d in s and in t, so Gauss–Legendre in s and Gauss–Jacobi for the
 * weight (1 - t)^1 in t, each with n points, integrate it exactly when d <= 2n - 1.
 */
export function collapsedTriangleRule(n: number): QuadratureRule {
  const ls = gaussJacobiOnUnit(n, 0);
  const lt = gaussJacobiOnUnit(n, 1);
  const points = new Float64Array(2 * n * n);
  const weights = new Float64Array(n * n);
  let q = 0;
  for (let j = 0; j < n; j++) {
    const t = lt.points[j]!;
    for (let i = 0; i < n; i++) {
      points[2 * q] = ls.points[i]! * (1 - t);
      points[2 * q + 1] = t;
      weights[q] = ls.weights[i]! * lt.weights[j]!;
      q++;
    }
  }
  return {
    cell: 'triangle',
    degree: 2 * n - 1,
    nPoints: n * n,
    points,
    weights,
    source: `collapsed Gauss–Jacobi product ${n}x${n} (Stroud 1971; Karniadakis & Sherwin 2005)`,
  };
}

/**
 * Collapsed (Duffy) product rule on the reference tetrahedron, n points per direction, exact to total
 * degree 2n - 1 (Stroud 1971, conical product rules; Karniadakis & Sherwin 2005, ch. 4 and Appendix B).
 * The cube (r, s, t) in [0,1]^3 maps to x = r (1 - s)(1 - t), y = s (1 - t), z = t with Jacobian
 * (1 - s)(1 - t)^2: Gauss–Legendre in r, Gauss–Jacobi for (1 - s)^1 in s and for (1 - t)^2 in t.
 */
export function collapsedTetrahedronRule(n: number): QuadratureRule {
  const lr = gaussJacobiOnUnit(n, 0);
  const ls = gaussJacobiOnUnit(n, 1);
  const lt = gaussJacobiOnUnit(n, 2);
  const points = new Float64Array(3 * n * n * n);
  const weights = new Float64Array(n * n * n);
  let q = 0;
  for (let k = 0; k < n; k++) {
    const t = lt.points[k]!;
    for (let j = 0; j < n; j++) {
      const s = ls.points[j]!;
      const wjk = ls.weights[j]! * lt.weights[k]!;
      for (let i = 0; i < n; i++) {
        points[3 * q] = lr.points[i]! * (1 - s) * (1 - t);
        points[3 * q + 1] = s * (1 - t);
        points[3 * q + 2] = t;
        weights[q] = lr.weights[i]! * wjk;
        q++;
      }
    }
  }
  return {
    cell: 'tetrahedron',
    degree: 2 * n - 1,
    nPoints: n * n * n,
    points,
    weights,
    source: `collapsed Gauss–Jacobi product ${n}x${n}x${n} (Stroud 1971; Karniadakis & Sherwin 2005)`,
  };
}
