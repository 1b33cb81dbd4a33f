import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { boxMesh } from '../../../src/mesh/box.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { mixedSpace, singleField, vectorSpace } from '../../../src/fem/space/space.ts';
import { assembleForm } from '../../../src/fem/form/assemble.ts';
import { elasticityTerm } from '../../../src/fem/form/terms/elasticity.ts';
import { viscousTerm } from '../../../src/fem/form/terms/viscous.ts';
import { pressureDivergenceTerms } from '../../../src/fem/form/terms/divergence.ts';
import { sourceTerm } from '../../../src/fem/form/terms/loads.ts';
import { eliminate, fixBoundary, noConstraints } from '../../../src/fem/constraints/dirichlet.ts';
import type { MixedSpace } from '../../../src/fem/space/types.ts';
import type { Form } from '../../../src/fem/form/types.ts';

const constant = (v: number) => (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = v; };
const source = (_x: number, y: number, z: number, out: Float64Array) => { out[0] = Math.sin(y); out[1] = 1 + z; out[2] = -y; };
const wall = (x: number, y: number, z: number, out: Float64Array) => { out[0] = x * y; out[1] = Math.cos(x); out[2] = z; };

function sameBits(a: ArrayLike<number>, b: ArrayLike<number>): boolean {
  if (a.length !== b.length) return false;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return false;
  return true;
}

// In place, the same subtractions and copies happen in the same order as into fresh arrays, so the reduced systems
// must agree bit for bit (IEEE 754-2019 §10.4, reproducible operation sequences; common practice, no source).
describe('Dirichlet elimination in place gives the bits of elimination into a new matrix', () => {
  const cases: { name: string; space: MixedSpace; form: Form; tags: string[] }[] = [];
  {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 5, ny: 4, cells: 'triangles', diagonal: 'alternating' });
    const space = singleField('u', lagrangeSpace(mesh, 2), 2);
    cases.push({ name: 'vector P2 elasticity, held on two sides', space, tags: ['left', 'bottom'], form: {
      matrix: [elasticityTerm(0, constant(2), (x, _y, _z, out) => { out[0] = 1 + 0.5 * x; }, 3)], vector: [sourceTerm(0, 2, source, 3)] } });
  }
  {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 4, ny: 4, cells: 'triangles' });
    const space = mixedSpace([{ name: 'u', space: vectorSpace(lagrangeSpace(mesh, 2), 2) }, { name: 'p', space: vectorSpace(lagrangeSpace(mesh, 1), 1) }]);
    cases.push({ name: 'Taylor–Hood Stokes, walls all round', space, tags: mesh.tagNames, form: {
      matrix: [viscousTerm(0, 2, constant(1), 2), ...pressureDivergenceTerms(0, 1, 3)], vector: [sourceTerm(0, 2, source, 3)] } });
  }
  {
    const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 2, ny: 3, nz: 2, cells: 'tetrahedra' });
    const space = singleField('u', lagrangeSpace(mesh, 1), 3);
    cases.push({ name: 'vector P1 elasticity on tetrahedra, held on one face', space, tags: ['front'], form: {
      matrix: [elasticityTerm(0, constant(1.5), constant(1), 0)], vector: [sourceTerm(0, 3, source, 2)] } });
  }
  for (const { name, space, form, tags } of cases) {
    it(name, () => {
      const first = assembleForm(space, form);
      const second = assembleForm(space, form);
      const cons = noConstraints(space.nDofs);
      fixBoundary(space, cons, 0, tags, wall);
      const copy = eliminate(first.A, first.b, cons);
      const inPlace = eliminate(second.A, second.b, cons, { inPlace: true });
      expect(copy.A.nRows).toBeLessThan(space.nDofs);
      expect(copy.A.nRows).toBeGreaterThan(0);
      expect([
        sameBits(copy.A.rowPtr, inPlace.A.rowPtr), sameBits(copy.A.colIdx, inPlace.A.colIdx),
        sameBits(copy.A.values, inPlace.A.values), sameBits(copy.b, inPlace.b),
        sameBits(copy.free, inPlace.free), sameBits(copy.reduced, inPlace.reduced),
      ]).toEqual([true, true, true, true, true, true]);
      // The copy leaves the full matrix as it was (it is reused by Newton's iterations).
      expect(sameBits(first.A.values, assembleForm(space, form).A.values)).toBe(true);
    });
  }
});
