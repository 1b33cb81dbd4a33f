/** The degree-1 subspace of a Lagrange space of higher degree as the multigrid's first coarse level (p-multigrid,
 *  Rønquist & Patera 1987, from memory). Checked against facts outside the code under test: a degree-1 function is
 *  a member of the finer space, so the prolongator must reproduce its nodal values exactly; the Galerkin operator
 *  PᵀAP of a form on a subspace is the form's matrix on that subspace (an identity of Galerkin projection), here
 *  rungs's own degree-1 assembly; the iteration counts of the multigrid stay flat under refinement. */
import { describe, expect, it } from 'vitest';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { boxMesh } from '../../src/mesh/box.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { singleField } from '../../src/fem/space/space.ts';
import { vertexSubspace } from '../../src/fem/space/vertex-subspace.ts';
import { assembleForm } from '../../src/fem/form/assemble.ts';
import { elasticityForm, solveElasticity } from '../../src/fem/discretizations/elasticity.ts';
import { spmv, transpose } from '../../src/linalg/csr.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { RungsInputError } from '../../src/errors.ts';
import type { Csr } from '../../src/linalg/types.ts';

type Field = (x: number, y: number, z: number) => number[];

/** max over kept fine unknowns of |(P c)_r − w(node)_comp|, c the values of w at the coarse unknowns. */
function interpolationDefect(mesh: Mesh, degree: number, w: Field, fixedWhere: (x: number, y: number, z: number) => boolean): { defect: number; rows: number; cols: number } {
  const dim = mesh.dim;
  const space = lagrangeSpace(mesh, degree);
  const point = (coords: Float64Array, g: number): [number, number, number] => [coords[g * dim], coords[g * dim + 1], dim === 3 ? coords[g * dim + 2] : 0];
  const kept: number[] = [];
  for (let g = 0; g < space.nDofs; g++) {
    const [x, y, z] = point(space.dofCoords, g);
    if (fixedWhere(x, y, z)) continue;
    for (let c = 0; c < dim; c++) kept.push(g * dim + c);
  }
  const { P, coarseKept } = vertexSubspace(space, dim, Int32Array.from(kept));
  const coarse = Float64Array.from(coarseKept, (u) => { const g = Math.floor(u / dim); return w(...point(mesh.coords, g))[u - g * dim]; });
  const fine = new Float64Array(P.nRows);
  spmv(P, coarse, fine);
  let defect = 0;
  kept.forEach((u, r) => { const g = Math.floor(u / dim); defect = Math.max(defect, Math.abs(fine[r] - w(...point(space.dofCoords, g))[u - g * dim])); });
  return { defect, rows: P.nRows, cols: P.nCols };
}

describe('the degree-1 subspace of a Lagrange space', () => {
  const square = (cells: 'triangles' | 'quadrilaterals') => rectangleMesh({ x: [0, 1], y: [0, 2], nx: 5, ny: 4, cells });
  const cube = () => boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 3, ny: 2, nz: 2, cells: 'tetrahedra' });
  const nowhere = () => false;
  const left = (x: number) => x === 0;
  it.each([
    ['P2 triangles', () => square('triangles'), 2],
    ['P3 triangles', () => square('triangles'), 3],
    ['Q2 quadrilaterals', () => square('quadrilaterals'), 2],
    ['P2 tetrahedra', cube, 2],
    ['P3 tetrahedra', cube, 3],
  ] as const)('%s: carries a degree-1 vector field exactly, with and without a held side', (_name, mesh, k) => {
    const m = mesh();
    // Affine on simplices; bilinear on quadrilaterals (Q1); both vanish on x = 0 for the reduced case.
    const full: Field = m.cellKind === 'quadrilateral' ? (x, y) => [1 + 2 * x - y + x * y, 3 * y + x] : (x, y, z) => [1 + 2 * x - y + z, 3 * y + x, 2 - z];
    const held: Field = m.cellKind === 'quadrilateral' ? (x, y) => [x * y, 3 * x] : (x) => [x, 2 * x, -x];
    const a = interpolationDefect(m, k, full, nowhere);
    const b = interpolationDefect(m, k, held, left);
    expect(a.defect).toBeLessThan(1e-13);
    expect(b.defect).toBeLessThan(1e-13);
    expect(a.cols).toBe(m.nVertices * m.dim);
    expect(b.cols).toBeLessThan(a.cols);
    expect(b.rows).toBeLessThan(a.rows);
  });

  it('PᵀAP of the P2 elasticity matrix is the P1 elasticity matrix on the same mesh (Galerkin identity)', () => {
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 4, ny: 3, cells: 'triangles' });
    const input = {
      lambda: (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 2; },
      mu: (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 0.7; },
      source: (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 0; out[1] = 0; },
      hints: { coefficients: 0, source: 0 },
    };
    const matrix = (k: number) => {
      const scalar = lagrangeSpace(mesh, k);
      return { scalar, A: assembleForm(singleField('u', scalar, 2), elasticityForm(singleField('u', scalar, 2), input, k)).A };
    };
    const p2 = matrix(2), p1 = matrix(1);
    const all = Int32Array.from({ length: p2.scalar.nDofs * 2 }, (_, i) => i);
    const { P } = vertexSubspace(p2.scalar, 2, all);
    // Compare PᵀAP v with A₁ v for every unit vector v (a dense comparison, the matrices being small).
    const n1 = P.nCols;
    const R = transpose(P);
    const v = new Float64Array(n1), Pv = new Float64Array(P.nRows), APv = new Float64Array(P.nRows), PtAPv = new Float64Array(n1), A1v = new Float64Array(n1);
    let worst = 0, scale = 0;
    for (let j = 0; j < n1; j++) {
      v.fill(0); v[j] = 1;
      spmv(P, v, Pv); spmv(p2.A, Pv, APv); spmv(R, APv, PtAPv); spmv(p1.A, v, A1v);
      for (let i = 0; i < n1; i++) { worst = Math.max(worst, Math.abs(PtAPv[i] - A1v[i])); scale = Math.max(scale, Math.abs(A1v[i])); }
    }
    expect(n1).toBe(p1.A.nRows);
    expect(worst / scale).toBeLessThan(1e-13);
  });
});

describe('p-multigrid for elasticity', () => {
  it('P2 iterations stay flat from 2k to 33k unknowns, below those of aggregating the P2 matrix, and the solution is the same', () => {
    const input = (m: number) => ({
      mesh: rectangleMesh({ x: [0, 1], y: [0, 1], nx: m, ny: m, cells: 'triangles' as const }), degree: 2,
      lambda: (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 2; },
      mu: (x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 1 + 0.5 * x; },
      source: (_x: number, y: number, _z: number, out: Float64Array) => { out[0] = 1; out[1] = -1 + y; },
      dirichlet: { tags: ['left', 'bottom'], value: (_x: number, _y: number, _z: number, out: Float64Array) => { out[0] = 0; out[1] = 0; } },
      hints: { coefficients: 1, source: 1 },
      solver: { preconditioner: 'amg' as const, relTol: 1e-10 },
    });
    const withP: number[] = [];
    let without = 0, shift = 0;
    for (const m of [16, 32, 64]) {
      const a = solveElasticity(input(m));
      withP.push(a.solver.converged ? a.solver.iterations : Infinity);
      if (m === 64) {
        const b = solveElasticity({ ...input(m), pMultigrid: false });
        without = b.solver.converged ? b.solver.iterations : Infinity;
        let top = 0;
        for (let i = 0; i < a.coefficients.length; i++) { shift = Math.max(shift, Math.abs(a.coefficients[i] - b.coefficients[i])); top = Math.max(top, Math.abs(b.coefficients[i])); }
        shift /= top;
      }
    }
    // Seen when this test was written: 21, 22, 23 with the degree-1 level; 41 aggregating P2 directly; solutions
    // 1.3e-13 apart.
    const report = `p-multigrid ${withP.join(', ')}; aggregation of P2 ${without}; solutions differ by ${shift.toExponential(2)}`;
    expect(withP.every(Number.isFinite), report).toBe(true);
    expect(Math.max(...withP) - Math.min(...withP), report).toBeLessThanOrEqual(3);
    expect(withP[2], report).toBeLessThan(without);
    expect(shift, report).toBeLessThan(1e-8);
  });

  it('a first coarse space that does not fit the matrix is refused naming the field', () => {
    const A: Csr = { nRows: 4, nCols: 4, rowPtr: Int32Array.from([0, 1, 2, 3, 4]), colIdx: Int32Array.from([0, 1, 2, 3]), values: Float64Array.from([1, 1, 1, 1]) };
    const P = (rows: number, col: number): Csr => ({ nRows: rows, nCols: 2, rowPtr: Int32Array.from({ length: rows + 1 }, (_, i) => i), colIdx: new Int32Array(rows).fill(col), values: new Float64Array(rows).fill(1) });
    expect(() => amgSetup(A, { symmetric: true, firstCoarseSpace: { P: P(3, 0) } })).toThrow(RungsInputError);
    expect(() => amgSetup(A, { symmetric: true, firstCoarseSpace: { P: P(3, 0) } })).toThrow(/firstCoarseSpace.P has 3 rows; it must have one per unknown of the matrix \(4\)/);
    expect(() => amgSetup(A, { symmetric: true, firstCoarseSpace: { P: P(4, 5) } })).toThrow(/column in \[0, 2\)/);
  });
});
