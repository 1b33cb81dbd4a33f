import { describe, expect, it } from 'vitest';
import { lagrangeElement } from '../../src/fem/element/index.ts';
import { nodalDeviation, offFacetTrace, partitionDeviation, referencePoints, reproductionDeviation } from './element-3d-checks.ts';

// P3 on the reference tetrahedron (0,0,0), (1,0,0), (0,1,0), (0,0,1): 4 vertices, two nodes on each of the 6 edges
// (at 1/3 and 2/3), one at each face centroid, none inside: dim P3(R^3) = C(6, 3) = 20 (Ciarlet 1978, §2.2, the
// cubic tetrahedron; common practice). Tolerances are round-off of a 20 × 20 Vandermonde inverse (common practice,
// no source).
const el = lagrangeElement('tetrahedron', 3);
const points = referencePoints('tetrahedron', 40, 7);

/** All (a, b, c) with a + b + c ≤ 3: the monomials spanning P3. */
const P3: number[][] = [];
for (let c = 0; c <= 3; c++) for (let b = 0; b + c <= 3; b++) for (let a = 0; a + b + c <= 3; a++) P3.push([a, b, c]);

describe('P3 tetrahedron: layout', () => {
  it('has 20 dofs: 4 vertices, 2 per edge, 1 per face, none inside (Ciarlet 1978, §2.2)', () => {
    expect(P3.length).toBe(20);
    expect([el.nDofs, el.perEdge, el.perFace, el.perInterior, el.faces.length, el.family]).toEqual([20, 2, 1, 0, 4, 'P']);
  });

  it('puts face dof 16 + f at the centroid of face f, face f being the one opposite vertex f', () => {
    // Centroid of a triangle = mean of its vertices (common practice, no source).
    const V = [[0, 0, 0], [1, 0, 0], [0, 1, 0], [0, 0, 1]];
    let worst = 0;
    el.faces.forEach((face, f) => {
      expect(face.includes(f)).toBe(false);
      for (let d = 0; d < 3; d++) {
        const centroid = face.reduce((s, v) => s + V[v]![d]!, 0) / 3;
        worst = Math.max(worst, Math.abs(el.nodes[3 * (16 + f) + d]! - centroid));
      }
    });
    expect(worst).toBeLessThan(1e-15);
  });

  it('lists on each facet its 3 vertices, its 3 edges\' 6 dofs and its face dof: the 10 nodes of P3 on a triangle', () => {
    // A node lies on face f (opposite vertex f) when its barycentric coordinate λ_f is 0: λ_0 = 1 − x − y − z,
    // λ_1 = x, λ_2 = y, λ_3 = z (common practice, no source).
    const lambda = (i: number, f: number) => {
      const [x, y, z] = [el.nodes[3 * i]!, el.nodes[3 * i + 1]!, el.nodes[3 * i + 2]!];
      return [1 - x - y - z, x, y, z][f]!;
    };
    el.facetDofs.forEach((dofs, f) => {
      expect(dofs.length).toBe(10);
      expect(dofs).toContain(16 + f);
      const onFacet = Array.from({ length: 20 }, (_, i) => i).filter((i) => Math.abs(lambda(i, f)) < 1e-15);
      expect([...dofs].sort((a, b) => a - b)).toEqual(onFacet);
    });
  });
});

describe('P3 tetrahedron: exact properties of a nodal basis of P3', () => {
  it('is nodal: φ_i(x_j) = δ_ij (definition of a Lagrange element; Ciarlet 1978, §2.2)', () => {
    expect(nodalDeviation(el)).toBeLessThan(1e-12);
  });

  it('is a partition of unity, Σ φ_i = 1 and Σ ∇φ_i = 0, since P3 holds the constants (Ciarlet 1978, §2.2)', () => {
    const d = partitionDeviation(el, points);
    expect(Math.max(d.value, d.gradient / 10)).toBeLessThan(1e-12);
  });

  it('reproduces every monomial of P3 and its gradient: the interpolant is exact on P3 (Ciarlet 1978, Thm 2.2.1)', () => {
    const d = reproductionDeviation(el, P3, points);
    expect(Math.max(d.value, d.gradient / 10)).toBeLessThan(1e-12);
  });

  it('does not reproduce x^4 (P3 is all it spans; common practice, no source)', () => {
    expect(reproductionDeviation(el, [[4, 0, 0]], points).value).toBeGreaterThan(1e-3);
  });

  it('has on each face a trace set by that face\'s 10 dofs alone (the others vanish there), as continuity needs', () => {
    // A P3 function restricted to a face is a P3 polynomial on the triangle, fixed by its 10 nodes there
    // (Ciarlet 1978, §2.2 unisolvence), so a basis function of a node off the face is zero on it.
    expect(offFacetTrace(el, 11)).toBeLessThan(1e-12);
  });
});

describe('P1 and P2 tetrahedra name their faces but carry no face dofs', () => {
  it.each([1, 2])('P%i: four faces, perFace 0, facet dofs are vertices and edge dofs only', (k) => {
    const e = lagrangeElement('tetrahedron', k);
    expect([e.faces.length, e.perFace]).toEqual([4, 0]);
    // P_k on a triangle has (k + 1)(k + 2)/2 nodes (common practice, no source).
    for (const dofs of e.facetDofs) expect(dofs.length).toBe(((k + 1) * (k + 2)) / 2);
  });
});
