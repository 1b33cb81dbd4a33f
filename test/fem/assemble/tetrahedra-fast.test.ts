import { describe, expect, it } from 'vitest';
import { boxMesh } from '../../../src/mesh/box.ts';
import { rectangleMesh } from '../../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../../src/mesh/perturb.ts';
import type { Mesh } from '../../../src/mesh/types.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { facetClosureDofs } from '../../../src/fem/dofmap/dofmap.ts';
import type { FunctionSpace } from '../../../src/fem/dofmap/types.ts';
import { assembleSystem, type AssembledSystem } from '../../../src/fem/assemble/system.ts';
import { findEntry } from '../../../src/fem/assemble/sparsity.ts';
import type { FormCoefficients } from '../../../src/fem/assemble/types.ts';
import { makeCellValues, reinitCell } from '../../../src/fem/geometry/cellvalues.ts';
import { locateFacets } from '../../../src/fem/geometry/facets.ts';
import { facetsWithTags } from '../../../src/mesh/tags.ts';
import { ruleFor } from '../../../src/fem/quadrature/index.ts';
import { RungsInputError } from '../../../src/errors.ts';
import { bitDifferences } from '../team/helpers.ts';

/** The cell loop of assembleSystem as it is for every cell kind but tetrahedra (and was for tetrahedra too): every
 *  term's CellValues refilled by reinitCell, a binary search per entry, Dirichlet columns folded into b. Run on the
 *  pattern, Dirichlet data and quadrature degrees of an assembled system, into fresh values. */
function plainCellLoop(space: FunctionSpace, coef: FormCoefficients, sys: AssembledSystem): { values: Float64Array; b: Float64Array } {
  const { mesh, element: el, cellDofs } = space;
  const n = el.nDofs, dim = mesh.dim;
  const A = { ...sys.A, values: new Float64Array(sys.A.values.length) };
  const b = new Float64Array(sys.b.length);
  const { reduced, dirichletValues, degrees } = sys;
  const cv = (d: number) => makeCellValues(el, ruleFor(mesh.cellKind, Math.max(0, d)));
  const cvK = cv(degrees.stiffness), cvB = cv(degrees.convection), cvC = cv(degrees.reaction), cvF = cv(degrees.load);
  const Ke = new Float64Array(n * n), Fe = new Float64Array(n), vecB = new Float64Array(3);
  const rows = new Int32Array(n);
  for (let c = 0; c < mesh.nCells; c++) {
    Ke.fill(0); Fe.fill(0);
    reinitCell(cvK, mesh, c);
    for (let q = 0; q < cvK.nq; q++) {
      let w = cvK.wdet[q];
      if (coef.k) w *= coef.k(cvK.x[3 * q], cvK.x[3 * q + 1], cvK.x[3 * q + 2]);
      const o = q * n * dim;
      for (let i = 0; i < n; i++) {
        for (let j = i; j < n; j++) {
          let s = 0;
          for (let d = 0; d < dim; d++) s += cvK.grads[o + i * dim + d] * cvK.grads[o + j * dim + d];
          Ke[i * n + j] += w * s;
        }
      }
    }
    for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) Ke[i * n + j] = Ke[j * n + i];
    if (coef.b) {
      reinitCell(cvB, mesh, c);
      for (let q = 0; q < cvB.nq; q++) {
        coef.b(cvB.x[3 * q], cvB.x[3 * q + 1], cvB.x[3 * q + 2], vecB);
        const o = q * n * dim;
        for (let j = 0; j < n; j++) {
          let bg = 0;
          for (let d = 0; d < dim; d++) bg += vecB[d] * cvB.grads[o + j * dim + d];
          bg *= cvB.wdet[q];
          for (let i = 0; i < n; i++) Ke[i * n + j] += cvB.values[q * n + i] * bg;
        }
      }
    }
    if (coef.c) {
      reinitCell(cvC, mesh, c, false);
      for (let q = 0; q < cvC.nq; q++) {
        const w = cvC.wdet[q] * coef.c(cvC.x[3 * q], cvC.x[3 * q + 1], cvC.x[3 * q + 2]);
        for (let i = 0; i < n; i++) {
          const wi = w * cvC.values[q * n + i];
          for (let j = 0; j < n; j++) Ke[i * n + j] += wi * cvC.values[q * n + j];
        }
      }
    }
    if (coef.f) {
      reinitCell(cvF, mesh, c, false);
      for (let q = 0; q < cvF.nq; q++) {
        const w = cvF.wdet[q] * coef.f(cvF.x[3 * q], cvF.x[3 * q + 1], cvF.x[3 * q + 2]);
        for (let i = 0; i < n; i++) Fe[i] += w * cvF.values[q * n + i];
      }
    }
    for (let i = 0; i < n; i++) rows[i] = reduced[cellDofs[c * n + i]];
    for (let i = 0; i < n; i++) {
      const r = rows[i];
      if (r < 0) continue;
      b[r] += Fe[i];
      for (let j = 0; j < n; j++) {
        const v = Ke[i * n + j];
        if (v === 0) continue;
        if (rows[j] >= 0) A.values[findEntry(A, r, rows[j])] += v;
        else b[r] -= v * dirichletValues[cellDofs[c * n + j]];
      }
    }
  }
  return { values: A.values, b };
}

/** Indices where two arrays differ in their bits (Object.is also tells 0 from −0), or a length mismatch. */
const coef: FormCoefficients = {
  k: (x, y, z) => 1 + x * y + 0.5 * Math.sin(z + y),
  b: (x, y, z, out) => { out[0] = 1 + y; out[1] = -0.5 * z; out[2] = Math.cos(x); },
  c: (x, y, z) => 2 + x * z,
  f: (x, y, z) => Math.exp(x) * Math.sin(y + 2 * z),
  hints: { k: null, b: null, c: 2, f: null },
};
const g = (x: number, y: number, z: number) => Math.cos(x + 2 * y) + z;

// Both loops do the same IEEE 754 operations in the same order, so equal bits are required, not closeness
// (IEEE 754-2019 §10.4: a given sequence of operations is reproducible; common practice, no source).
describe('the tetrahedron cell loop of assembleSystem gives the bits of the general loop', () => {
  const box = boxMesh({ x: [0, 1], y: [0, 2], z: [-1, 0], nx: 3, ny: 2, nz: 3, cells: 'tetrahedra' });
  const meshes: [string, Mesh][] = [['Kuhn box', box], ['perturbed box', perturbMesh(box, { fraction: 0.15, seed: 11 })]];
  for (const [name, mesh] of meshes) {
    for (const k of [1, 2, 3]) {
      it(`P${k} on the ${name}: k, b, c, f and Dirichlet data on three sides`, () => {
        const space = lagrangeSpace(mesh, k);
        const sys = assembleSystem(space, coef, { dirichlet: { tags: ['left', 'top', 'back'], value: g } });
        const ref = plainCellLoop(space, coef, sys);
        expect(sys.A.nRows).toBeGreaterThan(0);
        expect([bitDifferences(sys.A.values, ref.values), bitDifferences(sys.b, ref.b)]).toEqual([0, 0]);
      });
    }
  }
  it('P1 with the source only (no point buffer for the stiffness) and no Dirichlet data', () => {
    const space = lagrangeSpace(meshes[1][1], 1);
    const only = { f: coef.f, hints: { f: null } };
    const sys = assembleSystem(space, only, {});
    const ref = plainCellLoop(space, only, sys);
    expect([bitDifferences(sys.A.values, ref.values), bitDifferences(sys.b, ref.b)]).toEqual([0, 0]);
  });
});

describe('the general loop itself is unchanged on 1D and 2D cells (same bits as the plain loop)', () => {
  const g2 = (x: number, y: number) => 1 + x * x - y;
  const coef2: FormCoefficients = {
    k: (x, y) => 1 + x * y, b: (x, y, _z, out) => { out[0] = 1 + y; out[1] = -x; }, c: () => 1, f: (x, y) => Math.sin(x + y),
    hints: { k: 2, b: 1, c: 0, f: null },
  };
  for (const cells of ['triangles', 'quadrilaterals'] as const) {
    for (const k of [1, 2]) {
      it(`${cells}, degree ${k}`, () => {
        const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 4, ny: 3, cells });
        const space = lagrangeSpace(mesh, k);
        const sys = assembleSystem(space, coef2, { dirichlet: { tags: ['left', 'bottom'], value: g2 } });
        const ref = plainCellLoop(space, coef2, sys);
        expect([bitDifferences(sys.A.values, ref.values), bitDifferences(sys.b, ref.b)]).toEqual([0, 0]);
      });
    }
  }
});

describe('Dirichlet dofs of P1 on tetrahedra from the facet list', () => {
  it('are exactly the closure dofs found through each facet\'s cell (both are the facets\' vertices; common practice, no source)', () => {
    const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 3, ny: 4, nz: 2, cells: 'tetrahedra' });
    const space = lagrangeSpace(mesh, 1);
    const tags = ['left', 'front', 'top'];
    const sys = assembleSystem(space, { f: () => 1, hints: { f: 0 } }, { dirichlet: { tags, value: () => 0 } });
    const fc = locateFacets(mesh);
    const expected = facetClosureDofs(space, fc.cell, fc.local, facetsWithTags(mesh, tags));
    expect(Array.from(sys.dirichletDofs)).toEqual(Array.from(expected));
    // By hand (inclusion–exclusion): left (x = 0) has 5 × 3 vertices, front (z = 0) 4 × 5, top (y = 1) 4 × 3; left
    // and front share 5, left and top 3, front and top 4, all three 1: 15 + 20 + 12 − 5 − 3 − 4 + 1 = 36.
    expect(sys.dirichletDofs.length).toBe(36);
  });
});

describe('Dirichlet dofs of P1 and Q1 in 2D from the facet list', () => {
  for (const cells of ['triangles', 'quadrilaterals'] as const) {
    it(`${cells}: exactly the closure dofs found through each facet's cell (common practice, no source)`, () => {
      const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 5, ny: 3, cells });
      const space = lagrangeSpace(mesh, 1);
      expect(space.cellDofs).toBe(mesh.cells); // the shortcut's condition: the dofs are the vertices, numbered alike
      const tags = ['left', 'bottom'];
      const sys = assembleSystem(space, { f: () => 1, hints: { f: 0 } }, { dirichlet: { tags, value: () => 0 } });
      const fc = locateFacets(mesh);
      const expected = facetClosureDofs(space, fc.cell, fc.local, facetsWithTags(mesh, tags));
      expect(Array.from(sys.dirichletDofs)).toEqual(Array.from(expected));
      // By hand: the left side has 4 vertices, the bottom 6, sharing the corner: 4 + 6 − 1 = 9.
      expect(sys.dirichletDofs.length).toBe(9);
    });
  }
});

describe('the tetrahedron loop keeps the general loop\'s errors', () => {
  it('an inverted tetrahedron is refused naming the cell', () => {
    const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 1, ny: 1, nz: 1, cells: 'tetrahedra' });
    const cells = mesh.cells.slice();
    [cells[4 * 2 + 1], cells[4 * 2 + 2]] = [cells[4 * 2 + 2], cells[4 * 2 + 1]];
    const bad = { ...mesh, cells };
    expect(() => assembleSystem(lagrangeSpace(bad, 1), { f: () => 1, hints: { f: 0 } }, {})).toThrow(/mesh cell 2 .*inverted/);
  });
  it('a source that is not finite is refused naming the point and the cell', () => {
    const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 1, ny: 1, nz: 1, cells: 'tetrahedra' });
    const f = (x: number) => (x > 0.5 ? NaN : 1);
    expect(() => assembleSystem(lagrangeSpace(mesh, 1), { f, hints: { f: null } }, {})).toThrow(RungsInputError);
    expect(() => assembleSystem(lagrangeSpace(mesh, 1), { f, hints: { f: null } }, {})).toThrow(/source f is NaN at quadrature point \(0\.\d+, [\d.]+, [\d.]+\) of cell \d/);
  });
});
