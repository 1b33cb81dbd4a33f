import { describe, expect, it } from 'vitest';
import { lagrangeElement } from '../../src/fem/element/index.ts';
import type { CellKind } from '../../src/mesh/types.ts';
import { monomialExponents } from '../../src/fem/element/monomials.ts';

const CASES: [CellKind, number][] = [
  ['interval', 1], ['interval', 2], ['interval', 3],
  ['triangle', 1], ['triangle', 2], ['triangle', 3],
  ['quadrilateral', 1], ['quadrilateral', 2],
  ['tetrahedron', 1], ['tetrahedron', 2],
];

/** Seeded points inside the reference cell. */
function samplePoints(cell: CellKind, n: number): Float64Array {
  let s = 12345;
  const rnd = () => ((s = (s * 1103515245 + 12345) % 2147483648) / 2147483648);
  const dim = cell === 'interval' ? 1 : cell === 'tetrahedron' ? 3 : 2;
  const out = new Float64Array(n * dim);
  for (let p = 0; p < n; p++) {
    for (;;) {
      const x = [rnd(), rnd(), rnd()].slice(0, dim);
      const simplex = cell === 'triangle' || cell === 'tetrahedron';
      if (!simplex || x.reduce((a, b) => a + b, 0) < 1) { out.set(x, p * dim); break; }
    }
  }
  return out;
}

describe.each(CASES)('Lagrange %s degree %i', (cell, k) => {
  const el = lagrangeElement(cell, k);
  const dim = el.dim;
  const n = el.nDofs;
  const nPts = 20;
  const pts = samplePoints(cell, nPts);
  const vals = new Float64Array(nPts * n);
  const grads = new Float64Array(nPts * n * dim);
  el.tabulate(pts, nPts, vals, grads);

  it('has the dimension of P_k / Q_k (common practice, no source)', () => {
    const expected = { interval: k + 1, triangle: ((k + 1) * (k + 2)) / 2, quadrilateral: (k + 1) ** 2, tetrahedron: ((k + 1) * (k + 2) * (k + 3)) / 6, hexahedron: (k + 1) ** 3 }[cell];
    expect(n).toBe(expected);
  });

  it('is a partition of unity: Σ φ_i = 1, Σ ∇φ_i = 0 (Ciarlet 1978, §2.2)', () => {
    for (let p = 0; p < nPts; p++) {
      let s = 0;
      const g = new Array(dim).fill(0);
      for (let i = 0; i < n; i++) {
        s += vals[p * n + i];
        for (let d = 0; d < dim; d++) g[d] += grads[(p * n + i) * dim + d];
      }
      expect(Math.abs(s - 1)).toBeLessThan(1e-13);
      for (const gd of g) expect(Math.abs(gd)).toBeLessThan(1e-11);
    }
  });

  it('has the nodal (Kronecker) property φ_i(x_j) = δ_ij (definition of a Lagrange element)', () => {
    const v = new Float64Array(n * n);
    const g = new Float64Array(n * n * dim);
    el.tabulate(el.nodes, n, v, g);
    for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) {
      expect(Math.abs(v[j * n + i] - (i === j ? 1 : 0))).toBeLessThan(1e-12);
    }
  });

  it('has gradients that match central differences (common practice, no source)', () => {
    const step = 1e-6;
    const vp = new Float64Array(n);
    const vm = new Float64Array(n);
    const gs = new Float64Array(n * dim);
    for (let p = 0; p < nPts; p++) {
      for (let d = 0; d < dim; d++) {
        const xp = pts.slice(p * dim, p * dim + dim);
        const xm = xp.slice();
        xp[d] += step; xm[d] -= step;
        el.tabulate(xp, 1, vp, gs);
        el.tabulate(xm, 1, vm, gs);
        for (let i = 0; i < n; i++) {
          const fd = (vp[i] - vm[i]) / (2 * step);
          expect(Math.abs(fd - grads[(p * n + i) * dim + d])).toBeLessThan(1e-7);
        }
      }
    }
  });

  it('reproduces every polynomial of its space to round-off (interpolation is exact on V_h)', () => {
    for (const e of monomialExponents(cell, k)) {
      const f = (x: ArrayLike<number>, off: number) => e.reduce((acc, ed, d) => acc * x[off + d] ** ed, 1);
      for (let p = 0; p < nPts; p++) {
        let s = 0;
        for (let i = 0; i < n; i++) s += f(el.nodes, i * dim) * vals[p * n + i];
        expect(Math.abs(s - f(pts, p * dim))).toBeLessThan(1e-13);
      }
    }
  });

  it('lists facet dofs that are the only ones nonzero on that facet', () => {
    el.facetVertices.forEach((fv, f) => {
      // A point on the facet: centroid of its vertices.
      const verts = fv.map((v) => Array.from(el.nodes.slice(v * dim, v * dim + dim)));
      const c = new Float64Array(dim);
      for (const v of verts) for (let d = 0; d < dim; d++) c[d] += v[d] / verts.length;
      const v1 = new Float64Array(n);
      el.tabulate(c, 1, v1, new Float64Array(n * dim));
      for (let i = 0; i < n; i++) if (!el.facetDofs[f].includes(i)) expect(Math.abs(v1[i])).toBeLessThan(1e-13);
    });
  });
});

describe('lagrangeElement input', () => {
  it('rejects an unsupported degree, naming the valid ones', () => {
    expect(() => lagrangeElement('quadrilateral', 3)).toThrow(/valid degrees: 1, 2/);
  });
});
