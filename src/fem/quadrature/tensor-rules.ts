import { gaussJacobiOnUnit } from './gauss-on-unit.ts';
import type { QuadratureRule } from './types.ts';

/** n-point Gauss–Legendre rule on [0,1], exact to degree 2n - 1 (Abramowitz & Stegun 1964, 25.4.29). */
export function intervalGaussRule(n: number): QuadratureRule {
  const { points, weights } = gaussJacobiOnUnit(n, 0);
  return {
    cell: 'interval',
    degree: 2 * n - 1,
    nPoints: n,
    points,
    weights,
    source: `Gauss–Legendre, ${n} point${n === 1 ? '' : 's'} (Abramowitz & Stegun 1964, 25.4.29)`,
  };
}

/** n x n tensor Gauss–Legendre rule on [0,1]^2, exact for Q_(2n-1): degree <= 2n - 1 in each variable
 *  separately (Stroud 1971, product rules). Points x-fastest. */
export function quadrilateralGaussRule(n: number): QuadratureRule {
  const line = gaussJacobiOnUnit(n, 0);
  const points = new Float64Array(2 * n * n);
  const weights = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const q = j * n + i;
      points[2 * q] = line.points[i]!;
      points[2 * q + 1] = line.points[j]!;
      weights[q] = line.weights[i]! * line.weights[j]!;
    }
  }
  return {
    cell: 'quadrilateral',
    degree: 2 * n - 1,
    nPoints: n * n,
    points,
    weights,
    source: `tensor Gauss–Legendre ${n}x${n} (Stroud 1971, product rules)`,
  };
}

/** n x n x n tensor Gauss–Legendre rule on [0,1]^3, exact for Q_(2n-1): degree <= 2n - 1 in each variable
 *  separately (Stroud 1971, product rules). Points x-fastest, then y, then z. */
export function hexahedronGaussRule(n: number): QuadratureRule {
  const line = gaussJacobiOnUnit(n, 0);
  const points = new Float64Array(3 * n * n * n);
  const weights = new Float64Array(n * n * n);
  let q = 0;
  for (let k = 0; k < n; k++) {
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        points[3 * q] = line.points[i]!;
        points[3 * q + 1] = line.points[j]!;
        points[3 * q + 2] = line.points[k]!;
        weights[q] = line.weights[i]! * line.weights[j]! * line.weights[k]!;
        q++;
      }
    }
  }
  return {
    cell: 'hexahedron',
    degree: 2 * n - 1,
    nPoints: n * n * n,
    points,
    weights,
    source: `tensor Gauss–Legendre ${n}x${n}x${n} (Stroud 1971, product rules)`,
  };
}
