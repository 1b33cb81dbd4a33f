import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolateVector, vectorLagrangeField } from '../../src/fem/field/vector-field.ts';
import { fieldErrors } from '../../src/norms/field-errors.ts';
import type { ExactField } from '../../src/norms/types.ts';

// A smooth vector field (not in any of the spaces): u = (sin(πx) eʸ, x² cos(πy)), Jacobian by hand.
const P = Math.PI;
const u: ExactField = {
  components: 2,
  value(x, y, _z, out) { out[0] = Math.sin(P * x) * Math.exp(y); out[1] = x * x * Math.cos(P * y); },
  grad(x, y, _z, out) {
    out[0] = P * Math.cos(P * x) * Math.exp(y); out[1] = Math.sin(P * x) * Math.exp(y);
    out[2] = 2 * x * Math.cos(P * y); out[3] = -P * x * x * Math.sin(P * y);
  },
};

describe('interpolation error of a smooth vector field', () => {
  // ‖u − I_h u‖_L2 = O(h^(k+1)) and |u − I_h u|_H1 = O(h^k) for P_k on shape-regular triangles, componentwise
  // (Brenner & Scott 2008, The Mathematical Theory of Finite Element Methods, Thm 4.4.20). Observed rate between the
  // two finest levels of a small ladder, within ±0.15.
  for (const [k, ns] of [[1, [8, 16, 32]], [2, [4, 8, 16]]] as const) {
    it(`P${k} triangles: L2 rate ${k + 1}, H1 seminorm rate ${k}`, () => {
      const errs = ns.map((n) => {
        const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' });
        const sp = lagrangeSpace(mesh, k);
        const [e] = fieldErrors([vectorLagrangeField(sp, 2, interpolateVector(sp, 2, u.value))], u);
        return e;
      });
      const a = errs[errs.length - 2], b = errs[errs.length - 1];
      expect(Math.log2(a.L2 / b.L2)).toBeGreaterThan(k + 1 - 0.15);
      expect(Math.log2(a.L2 / b.L2)).toBeLessThan(k + 1 + 0.15);
      expect(Math.log2(a.H1semi / b.H1semi)).toBeGreaterThan(k - 0.15);
      expect(Math.log2(a.H1semi / b.H1semi)).toBeLessThan(k + 0.15);
    });
  }
});
