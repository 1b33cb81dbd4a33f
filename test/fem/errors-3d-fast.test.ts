import { describe, expect, it } from 'vitest';
import { boxMesh } from '../../src/mesh/box.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { cellJacobian } from '../../src/fem/geometry/jacobian.ts';
import { ruleFor } from '../../src/fem/quadrature/index.ts';
import { errorNormsOf, exactNorms, ERROR_RULE_EXTRA } from '../../src/norms/errors.ts';
import type { DiscreteField, ExactSolution } from '../../src/norms/types.ts';

const u = (x: number, y: number, z: number) => Math.sin(x + 2 * y) * Math.exp(z);
const exact: ExactSolution = {
  u,
  grad: (x, y, z, out) => { const e = Math.exp(z); out[0] = Math.cos(x + 2 * y) * e; out[1] = 2 * Math.cos(x + 2 * y) * e; out[2] = Math.sin(x + 2 * y) * e; },
};
const k = (x: number, y: number, z: number) => 1 + x * y * z;
const c = (x: number, _y: number, z: number) => 0.5 + x - z;

/** The general cell loop of errorNormsOf for affine cells (as it is for every cell kind but the unrolled 2D and 3D
 *  cases): squared L2, H1 seminorm and energy per field. */
function plainLoop(fields: DiscreteField[], mesh: Mesh, degree: number): { l2: number[]; h1: number[]; en: number[] } {
  const dim = mesh.dim, rule = ruleFor(mesh.cellKind, degree), nq = rule.nPoints, pts = rule.points;
  const vals = fields.map(() => new Float64Array(nq)), grads = fields.map(() => new Float64Array(nq * dim));
  const J = new Float64Array(9), invJ = new Float64Array(9), g = new Float64Array(3), x = new Float64Array(3);
  const l2 = fields.map(() => 0), h1 = fields.map(() => 0), en = fields.map(() => 0);
  for (let cell = 0; cell < mesh.nCells; cell++) {
    fields.forEach((f, i) => f.evaluate(cell, pts, nq, vals[i], grads[i]));
    const det = cellJacobian(mesh, cell, pts, 0, J, invJ);
    const v0 = mesh.cells[cell * mesh.verticesPerCell] * dim;
    for (let q = 0; q < nq; q++) {
      for (let d = 0; d < dim; d++) {
        let s = mesh.coords[v0 + d];
        for (let r = 0; r < dim; r++) s += J[d * dim + r] * pts[q * dim + r];
        x[d] = s;
      }
      const w = rule.weights[q] * Math.abs(det);
      exact.grad(x[0], x[1], x[2], g);
      const uq = exact.u(x[0], x[1], x[2]);
      const kq = k(x[0], x[1], x[2]), cq = c(x[0], x[1], x[2]);
      fields.forEach((_f, i) => {
        const e = uq - vals[i][q];
        let ge = 0;
        for (let d = 0; d < dim; d++) { const t = g[d] - grads[i][q * dim + d]; ge += t * t; }
        l2[i] += w * e * e; h1[i] += w * ge; en[i] += w * (kq * ge + cq * e * e);
      });
    }
  }
  return { l2, h1, en };
}

// The unrolled loop performs the general loop's operations in the same order, so the integrals must agree bit for
// bit (IEEE 754-2019 §10.4, reproducible operation sequences; common practice, no source).
describe('error integrals on tetrahedra: the unrolled loop gives the bits of the general loop', () => {
  const box = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 2], nx: 3, ny: 2, nz: 3, cells: 'tetrahedra' });
  for (const [name, mesh] of [['Kuhn box', box], ['perturbed box', perturbMesh(box, { fraction: 0.15, seed: 5 })]] as const) {
    for (const degree of [1, 2]) {
      it(`P${degree} on the ${name}, the discrete field and a second field together`, () => {
        const space = lagrangeSpace(mesh, degree);
        const ih = interpolate(space, u);
        const shifted = ih.map((v, i) => v + 1e-3 * Math.sin(i));
        const fields = [lagrangeField(space, shifted), lagrangeField(space, ih)];
        const rule = 2 * degree + ERROR_RULE_EXTRA;
        const got = errorNormsOf(fields, exact, { k, c });
        const one = errorNormsOf([fields[0]], exact, { k, c });
        const ref = plainLoop(fields, mesh, rule);
        const bits = fields.map((_f, i) => [
          Object.is(got[i].L2, Math.sqrt(ref.l2[i])), Object.is(got[i].H1semi, Math.sqrt(ref.h1[i])),
          Object.is(got[i].H1, Math.sqrt(ref.l2[i] + ref.h1[i])), Object.is(got[i].energy, Math.sqrt(Math.max(ref.en[i], 0))),
        ]);
        bits.push([Object.is(one[0].L2, got[0].L2), Object.is(one[0].energy, got[0].energy)]);
        expect(bits).toEqual([[true, true, true, true], [true, true, true, true], [true, true]]);
      });
    }
  }
});

describe('norms of a polynomial on tetrahedra with the degree-6 rule (exact integrals by hand)', () => {
  it('u = xyz on the unit cube: ||u||²_L2 = 1/27, |u|²_H1 = ∫ (yz)² + (xz)² + (xy)² = 1/3', () => {
    const mesh = perturbMesh(boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 3, ny: 3, nz: 3, cells: 'tetrahedra' }), { fraction: 0.1, seed: 3 });
    const poly: ExactSolution = { u: (x, y, z) => x * y * z, grad: (x, y, z, out) => { out[0] = y * z; out[1] = x * z; out[2] = x * y; } };
    // u² and |∇u|² have degree 6 and 4: the 24-point rule of degree 6 integrates both exactly on every cell.
    const n = exactNorms(mesh, poly, { degree: 6 });
    expect(Math.abs(n.L2 ** 2 - 1 / 27) * 27).toBeLessThan(1e-13);
    expect(Math.abs(n.H1semi ** 2 - 1 / 3) * 3).toBeLessThan(1e-13);
  });
});
