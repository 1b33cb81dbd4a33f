import type { QuadratureRule } from './types.ts';
import type { SymmetricTriangleTable } from './triangle-symmetric-tables.ts';

/** Expands a symmetric triangle table into a rule on the reference triangle (0,0),(1,0),(0,1):
 *  the point of barycentric coordinates (l0, l1, l2) is (x, y) = (l1, l2); weights scaled by the area 1/2. */
export function expandTriangleTable(table: SymmetricTriangleTable): QuadratureRule {
  const bary: number[] = [];
  const w: number[] = [];
  if (table.centroid !== undefined) {
    bary.push(1 / 3, 1 / 3);
    w.push(table.centroid);
  }
  for (const [a, weight] of table.s21) {
    const c = 1 - 2 * a;
    bary.push(a, a, a, c, c, a);
    w.push(weight, weight, weight);
  }
  for (const [a, b, weight] of table.s111) {
    const c = 1 - a - b;
    bary.push(a, b, b, a, a, c, c, a, b, c, c, b);
    for (let k = 0; k < 6; k++) w.push(weight);
  }
  const weights = new Float64Array(w.length);
  for (let i = 0; i < w.length; i++) weights[i] = 0.5 * w[i]!;
  return {
    cell: 'triangle',
    degree: table.degree,
    nPoints: w.length,
    points: Float64Array.from(bary),
    weights,
    source: table.source,
  };
}
