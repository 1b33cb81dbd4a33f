import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { assembleSystem } from '../../../src/fem/assemble/system.ts';
import { singleField, mixedSpace, vectorSpace } from '../../../src/fem/space/space.ts';
import { assembleForm } from '../../../src/fem/form/assemble.ts';
import { viscousTerm } from '../../../src/fem/form/terms/viscous.ts';
import { massTerm } from '../../../src/fem/form/terms/mass.ts';
import { sourceTerm } from '../../../src/fem/form/terms/loads.ts';
import { elasticityTerm } from '../../../src/fem/form/terms/elasticity.ts';
import { pressureDivergenceTerms } from '../../../src/fem/form/terms/divergence.ts';
import { eliminate, fixBoundary, noConstraints } from '../../../src/fem/constraints/dirichlet.ts';
import { spmv, isSymmetric } from '../../../src/linalg/csr.ts';
import type { Csr } from '../../../src/linalg/types.ts';

const dense = (A: Csr): number[][] => {
  const D = Array.from({ length: A.nRows }, () => new Array<number>(A.nCols).fill(0));
  for (let r = 0; r < A.nRows; r++) for (let s = A.rowPtr[r]; s < A.rowPtr[r + 1]; s++) D[r][A.colIdx[s]] += A.values[s];
  return D;
};
const maxDiff = (a: number[][], b: number[][]) => Math.max(...a.map((row, i) => Math.max(...row.map((v, j) => Math.abs(v - b[i][j])))));
const constant = (v: number) => (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = v; };

describe('the generic term loop', () => {
  for (const [cells, k] of [['triangles', 1], ['triangles', 3], ['quadrilaterals', 2]] as const) {
    it(`assembles −Δu + u = f on ${cells} (degree ${k}) as the scalar assembly does, Dirichlet elimination after assembly`, () => {
      // Two independent routes to one matrix: the scalar operator's own loop with Dirichlet folded into the
      // scatter, and the generic term loop with elimination as its own step. Same quadrature degrees, so the
      // entries agree to round-off (common practice, no source).
      const mesh = rectangleMesh({ x: [0, 1], y: [0, 2], nx: 3, ny: 4, cells });
      const space = lagrangeSpace(mesh, k);
      const g = (x: number, y: number) => 1 + x * x + 0.5 * y;
      const f = (x: number, y: number) => Math.sin(x + y);
      const old = assembleSystem(space, { f, c: () => 1, hints: { f: null, c: 0 } }, { dirichlet: { tags: ['left', 'top'], value: g } }, { quadrature: { stiffness: 2 * k + 2, reaction: 2 * k + 2, load: 2 * k + 2 } });
      const ms = singleField('u', space);
      const { A, b } = assembleForm(ms, {
        matrix: [viscousTerm(0, 1, constant(1), 2 * k + 2), massTerm(0, 1, 2 * k + 2)],
        vector: [sourceTerm(0, 1, (x, y, _z, out) => { out[0] = f(x, y); }, 2 * k + 2)],
      });
      const cons = noConstraints(ms.nDofs);
      fixBoundary(ms, cons, 0, ['left', 'top'], (x, y, _z, out) => { out[0] = g(x, y); });
      const red = eliminate(A, b, cons);
      expect(red.A.nRows).toBe(old.A.nRows);
      expect(maxDiff(dense(red.A), dense(old.A))).toBeLessThan(1e-13);
      expect(Math.max(...Array.from(red.b, (v, i) => Math.abs(v - old.b[i])))).toBeLessThan(1e-13);
    });
  }

  it('gives a symmetric elasticity matrix whose kernel holds the rigid-body motions (exact facts)', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 3, ny: 3, cells: 'triangles', diagonal: 'alternating' });
    const space = singleField('u', lagrangeSpace(mesh, 2), 2);
    const { A } = assembleForm(space, { matrix: [elasticityTerm(0, constant(2.5), (x, _y, _z, out) => { out[0] = 1 + x; }, 4)], vector: [] });
    expect(isSymmetric(A, 1e-13)).toBe(true);
    const X = space.fields[0].space.scalar.dofCoords;
    const modes = [[1, 0], [0, 1], null].map((m) => {
      const v = new Float64Array(space.nDofs);
      for (let g = 0; g < v.length / 2; g++) {
        if (m) { v[2 * g] = m[0]; v[2 * g + 1] = m[1]; } else { v[2 * g] = -X[2 * g + 1]; v[2 * g + 1] = X[2 * g]; }
      }
      return v;
    });
    let worst = 0;
    for (const v of modes) { const y = new Float64Array(v.length); spmv(A, v, y); worst = Math.max(worst, ...Array.from(y, Math.abs)); }
    expect(worst).toBeLessThan(1e-12);
    // A stretch u = (x, 0) is not in the kernel.
    const s = new Float64Array(space.nDofs);
    for (let g = 0; g < s.length / 2; g++) s[2 * g] = X[2 * g];
    const y = new Float64Array(s.length); spmv(A, s, y);
    expect(Math.max(...Array.from(y, Math.abs))).toBeGreaterThan(0.1);
  });

  it('couples velocity and pressure symmetrically, and B·u is −∫ q ∇·u (exact for a linear velocity)', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 2, cells: 'triangles' });
    const space = mixedSpace([{ name: 'u', space: vectorSpace(lagrangeSpace(mesh, 2), 2) }, { name: 'p', space: vectorSpace(lagrangeSpace(mesh, 1), 1) }]);
    const { A } = assembleForm(space, { matrix: pressureDivergenceTerms(0, 1, 3), vector: [] });
    expect(isSymmetric(A, 1e-14)).toBe(true);
    // u = (2x, 3y): ∇·u = 5, so (B u)_i = −5 ∫ ψ_i and Σ_i (B u)_i = −5 |Ω| = −5 (the P1 basis sums to one).
    const X = space.fields[0].space.scalar.dofCoords;
    const u = new Float64Array(space.nDofs);
    for (let g = 0; g < X.length / 2; g++) { u[2 * g] = 2 * X[2 * g]; u[2 * g + 1] = 3 * X[2 * g + 1]; }
    const y = new Float64Array(space.nDofs); spmv(A, u, y);
    let sum = 0;
    for (let i = space.fields[1].offset; i < space.nDofs; i++) sum += y[i];
    expect(sum).toBeCloseTo(-5, 12);
  });
});
