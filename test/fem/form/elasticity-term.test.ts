import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../../src/mesh/perturb.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { singleField } from '../../../src/fem/space/space.ts';
import { assembleForm } from '../../../src/fem/form/assemble.ts';
import { addElasticity, elasticityTerm } from '../../../src/fem/form/terms/elasticity.ts';
import { findEntry } from '../../../src/fem/assemble/sparsity.ts';
import { sparsityOfCells } from '../../../src/fem/form/sparsity.ts';
import { makeCellValues, reinitCell } from '../../../src/fem/geometry/cellvalues.ts';
import { ruleFor } from '../../../src/fem/quadrature/index.ts';

// The 2D elasticity loop and the scatter's shortcut for consecutive columns are rewrites of readable loops, required
// to give the same bits (the fast/reference split of DEVELOPERS.md; common practice, no source).
const lambda = (x: number, y: number, _z: number, out: Float64Array) => { out[0] = 2 + Math.sin(3 * x + y); };
const mu = (x: number, y: number, _z: number, out: Float64Array) => { out[0] = 1 + 0.5 * x * y - 0.25 * y; };

describe('2D elasticity cell matrix', () => {
  for (const k of [1, 2, 3]) {
    it(`written out for dim 2 gives the general loop's bits (P${k}, perturbed triangles, varying λ and μ)`, () => {
      const mesh = perturbMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 4, ny: 3, cells: 'triangles' }), { fraction: 0.3, seed: 7 });
      const scalar = lagrangeSpace(mesh, k);
      const cv = makeCellValues(scalar.element, ruleFor(mesh.cellKind, 2 * k));
      const L = 2 * scalar.element.nDofs;
      const term = elasticityTerm(0, lambda, mu, 2 * k);
      const fast = new Float64Array(L * L), ref = new Float64Array(L * L);
      const lm = new Float64Array(1), mm = new Float64Array(1);
      let differing = 0, nonzero = 0;
      for (let c = 0; c < mesh.nCells; c++) {
        reinitCell(cv, mesh, c);
        // Non-zero starting values, as when other terms were added before.
        for (let e = 0; e < L * L; e++) fast[e] = ref[e] = ((e * 7919) % 13) / 13 - 0.5;
        term.add(c, cv, cv, fast, L, 0, 0);
        addElasticity(cv, lambda, mu, lm, mm, ref, L, 0, 0);
        for (let e = 0; e < L * L; e++) {
          if (!Object.is(fast[e], ref[e])) differing++;
          if (ref[e] !== 0) nonzero++;
        }
      }
      expect(nonzero).toBeGreaterThan(0);
      expect(differing).toBe(0);
    });
  }
});

describe('generic assembly scatter', () => {
  it('adds every cell entry where a binary search of the row puts it, in cell order (vector P2)', () => {
    const mesh = perturbMesh(rectangleMesh({ x: [0, 2], y: [0, 1], nx: 5, ny: 4, cells: 'triangles', diagonal: 'alternating' }), { fraction: 0.2, seed: 3 });
    const space = singleField('u', lagrangeSpace(mesh, 2), 2);
    const degree = 4;
    const { A } = assembleForm(space, { matrix: [elasticityTerm(0, lambda, mu, degree)], vector: [] });
    // Reference: the same cell matrices added entry by entry through findEntry alone.
    const ref = sparsityOfCells(space.nDofs, mesh.nCells, space.nLocal, space.cellDofs);
    const cv = makeCellValues(space.fields[0].space.scalar.element, ruleFor(mesh.cellKind, degree));
    const L = space.nLocal, Ke = new Float64Array(L * L);
    const term = elasticityTerm(0, lambda, mu, degree);
    for (let c = 0; c < mesh.nCells; c++) {
      reinitCell(cv, mesh, c);
      Ke.fill(0);
      term.add(c, cv, cv, Ke, L, 0, 0);
      for (let i = 0; i < L; i++) {
        for (let j = 0; j < L; j++) {
          const v = Ke[i * L + j];
          if (v !== 0) ref.values[findEntry(ref, space.cellDofs[c * L + i], space.cellDofs[c * L + j])] += v;
        }
      }
    }
    let differing = 0;
    for (let s = 0; s < ref.values.length; s++) if (!Object.is(A.values[s], ref.values[s])) differing++;
    expect(A.values.length).toBe(ref.values.length);
    expect(differing).toBe(0);
  });
});
