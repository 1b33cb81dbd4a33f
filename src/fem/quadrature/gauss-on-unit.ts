import { gaussJacobi } from './gauss-jacobi.ts';
import { gaussLegendre } from './gauss-legendre.ts';

/** Gauss–Jacobi rule moved from [-1,1] to [0,1] for the weight (1-s)^alpha: with s = (1+t)/2,
 *  (1-t)^alpha dt = 2^(alpha+1) (1-s)^alpha ds, so weights are divided by 2^(alpha+1) (change of variables). */
export function gaussJacobiOnUnit(n: number, alpha: number): { points: Float64Array; weights: Float64Array } {
  const rule = alpha === 0 ? gaussLegendre(n) : gaussJacobi(n, alpha);
  const scale = 1 / Math.pow(2, alpha + 1);
  for (let i = 0; i < n; i++) {
    rule.points[i] = 0.5 * (1 + rule.points[i]!);
    rule.weights[i] = rule.weights[i]! * scale;
  }
  return rule;
}
