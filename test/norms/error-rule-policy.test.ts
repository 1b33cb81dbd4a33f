import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { errorNormsOf, errorRuleDegree } from '../../src/norms/errors.ts';
import { manufacture } from '../../src/equation/index.ts';

// The accuracy policy of the error quadrature (src/norms/errors.ts, ERROR_RULE_EXTRA): a rule of degree 2k + 2 on
// simplices, whose own error must stay far below what moves a fitted order. Checked against a rule of much higher
// degree (2k + 14 on triangles, 2k + 8 on tetrahedra), whose error is smaller by many orders of magnitude on these
// meshes (the rules themselves are checked against exact integrals in test/fem/quadrature). The expected behaviour —
// relative error of ∫|e|² falling as h², of ∫|∇e|² as h⁴ — is the Taylor argument of numerical integration (Strang &
// Fix 1973, An Analysis of the Finite Element Method, §4.3; from memory), spelled out beside ERROR_RULE_EXTRA.
const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);
const rate = (e1: number, e2: number): number => Math.log2(e1 / e2);

/** The norms of I_h u and of a perturbed field (as a discrete solution differs from I_h u) on a ladder, with the
 *  default rule and a much higher one. */
function ladder(u: string, dim: 2 | 3, k: number, ns: number[], high: number) {
  const ms = manufacture({ dim, u });
  return ns.map((n) => {
    const mesh = dim === 2
      ? rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' })
      : boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: n, ny: n, nz: n, cells: 'tetrahedra' });
    const space = lagrangeSpace(mesh, k);
    const I = interpolate(space, ms.u);
    const fields = [lagrangeField(space, I), lagrangeField(space, I.map((v, i) => v + 0.3 * n ** -(k + 1) * Math.sin(7 * i)))];
    expect(errorRuleDegree(mesh.cellKind, k)).toBe(2 * k + 2);
    return { low: errorNormsOf(fields, ms), high: errorNormsOf(fields, ms, { degree: 2 * k + high }) };
  });
}

describe('the error quadrature of degree 2k + 2 against a much higher rule', () => {
  const cases: [string, 2 | 3, number, number[], number][] = [
    ['sin(pi*x) * sin(pi*y)', 2, 1, [4, 8, 16, 32], 14],
    ['sin(pi*x) * sin(pi*y)', 2, 2, [4, 8, 16], 14],
    ['sin(pi*x) * sin(pi*y)', 2, 3, [4, 8, 16], 14],
    ['exp(x) * cos(3*y)', 2, 1, [4, 8, 16, 32], 14],
    ['exp(x) * cos(3*y)', 2, 2, [4, 8, 16], 14],
    ['sin(pi*x) * cos(y) * exp(z)', 3, 1, [4, 8], 8],
    ['sin(pi*x) * cos(y) * exp(z)', 3, 2, [4, 8], 8],
  ];
  for (const [u, dim, k, ns, high] of cases) {
    it(`${dim}D P${k}, u = ${u}: norms within 1e-3 (L2) and 1e-5 (H1 seminorm), every pairwise order within 2e-3`, () => {
      const rows = ladder(u, dim, k, ns, high);
      let worstL2 = 0, worstH1 = 0, worstRate = 0;
      for (const { low, high: hi } of rows) {
        for (let f = 0; f < 2; f++) { worstL2 = Math.max(worstL2, rel(low[f].L2, hi[f].L2)); worstH1 = Math.max(worstH1, rel(low[f].H1semi, hi[f].H1semi)); }
      }
      for (let i = 0; i + 1 < rows.length; i++) {
        for (let f = 0; f < 2; f++) {
          for (const nm of ['L2', 'H1semi'] as const) {
            const d = Math.abs(rate(rows[i].low[f][nm], rows[i + 1].low[f][nm]) - rate(rows[i].high[f][nm], rows[i + 1].high[f][nm]));
            worstRate = Math.max(worstRate, d);
          }
        }
      }
      expect({ L2: worstL2 < 1e-3, H1semi: worstH1 < 1e-5, rate: worstRate < 2e-3 }).toEqual({ L2: true, H1semi: true, rate: true });
    });
  }

  it('the relative error of the L2 norm of I_h u falls as h² (P1 triangles: ratios about 4 per halving)', () => {
    const rows = ladder('sin(pi*x) * sin(pi*y)', 2, 1, [8, 16, 32], 14);
    const eps = rows.map(({ low, high }) => rel(low[0].L2, high[0].L2));
    const ratios = [eps[0] / eps[1], eps[1] / eps[2]];
    expect(ratios.every((r) => r > 3.5 && r < 4.5)).toBe(true);
  });
});
