import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { interpolate, lagrangeField } from '../../src/fem/field/lagrange-field.ts';
import { errorNormsOf } from '../../src/norms/errors.ts';
import { p1Fields } from '../../src/norms/error-cells.ts';
import { ruleFor } from '../../src/fem/quadrature/index.ts';
import type { DiscreteField, ExactSolution, NormValues, PerCellErrors } from '../../src/norms/types.ts';

const u = (x: number, y: number) => Math.sin(x + 2 * y) * Math.exp(0.5 * x);
const exact: ExactSolution = {
  u,
  grad: (x, y, _z, out) => {
    const e = Math.exp(0.5 * x);
    out[0] = Math.cos(x + 2 * y) * e + 0.5 * Math.sin(x + 2 * y) * e; out[1] = 2 * Math.cos(x + 2 * y) * e; out[2] = 0;
  },
};
const k = (x: number, y: number) => 1 + x * y;
const c = (x: number) => 0.5 + x;

/** The same field seen only through its evaluate: not a field lagrangeField made, so the error loop calls it. */
const opaque = (f: DiscreteField): DiscreteField => ({ mesh: f.mesh, nDofs: f.nDofs, degree: f.degree, evaluate: f.evaluate, nodes: f.nodes });

const perCellFor = (mesh: Mesh): PerCellErrors => ({ L2: new Float64Array(mesh.nCells).fill(NaN), H1semi: new Float64Array(mesh.nCells).fill(NaN) });

/** Entries whose bits differ (Object.is tells 0 from −0). */
function bitDifferences(a: Float64Array, b: Float64Array): number {
  let bad = 0;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) bad++;
  return bad;
}
const sameNorms = (a: NormValues, b: NormValues): boolean =>
  Object.is(a.L2, b.L2) && Object.is(a.H1semi, b.H1semi) && Object.is(a.H1, b.H1) && Object.is(a.energy, b.energy);

// The P1 loop computes the fields' values and gradients with their evaluate's operations in the same order, so the
// integrals must agree bit for bit with the loop that calls evaluate (IEEE 754-2019 §10.4, reproducible operation
// sequences; common practice, no source).
describe('error integrals of P1 fields on triangles: the loop for P1 gives the bits of the loop through evaluate', () => {
  const square = rectangleMesh({ x: [0, 1], y: [0, 2], nx: 9, ny: 7, cells: 'triangles' });
  const meshes: [string, Mesh][] = [['square', square], ['perturbed', perturbMesh(square, { fraction: 0.2, seed: 7 })]];
  for (const [name, mesh] of meshes) {
    it(`${name} mesh: u_h and I_h u together, with k and c, and each cell's share`, () => {
      const space = lagrangeSpace(mesh, 1);
      const ih = interpolate(space, u);
      const uh = ih.map((v, i) => v + 1e-3 * Math.sin(i));
      const fields = [lagrangeField(space, uh), lagrangeField(space, ih)];
      // The loop for P1 is the one these fields take (and not the hidden ones): else the comparison below is void.
      const rule = ruleFor('triangle', 4);
      expect([p1Fields(mesh, fields, rule.points, rule.nPoints) !== null, p1Fields(mesh, fields.map(opaque), rule.points, rule.nPoints)]).toEqual([true, null]);
      const pcFused = perCellFor(mesh), pcPlain = perCellFor(mesh);
      const fused = errorNormsOf(fields, exact, { k, c, perCell: pcFused });
      const plain = errorNormsOf(fields.map(opaque), exact, { k, c, perCell: pcPlain });
      expect(fused[0].L2).toBeGreaterThan(0);
      expect([sameNorms(fused[0], plain[0]), sameNorms(fused[1], plain[1])]).toEqual([true, true]);
      expect([bitDifferences(pcFused.L2, pcPlain.L2), bitDifferences(pcFused.H1semi, pcPlain.H1semi), Number.isNaN(pcFused.L2[0])]).toEqual([0, 0, false]);
    });
    it(`${name} mesh: one field, every third cell sampled`, () => {
      const space = lagrangeSpace(mesh, 1);
      const uh = interpolate(space, (x, y) => u(x, y) + 0.01 * x * y);
      const fused = errorNormsOf([lagrangeField(space, uh)], exact, { cellStride: 3 });
      const plain = errorNormsOf([opaque(lagrangeField(space, uh))], exact, { cellStride: 3 });
      expect(fused[0].H1semi).toBeGreaterThan(0);
      expect(sameNorms(fused[0], plain[0])).toBe(true);
    });
  }
  it('a P1 field and a P2 field together take the loop through evaluate (both give the same norms either way)', () => {
    const p1 = lagrangeSpace(square, 1), p2 = lagrangeSpace(square, 2);
    const fields = [lagrangeField(p1, interpolate(p1, u)), lagrangeField(p2, interpolate(p2, u))];
    const rule = ruleFor('triangle', 6);
    expect(p1Fields(square, fields, rule.points, rule.nPoints)).toBeNull();
    const got = errorNormsOf(fields, exact);
    const plain = errorNormsOf(fields.map(opaque), exact);
    expect([sameNorms(got[0], plain[0]), sameNorms(got[1], plain[1])]).toEqual([true, true]);
  });
});
