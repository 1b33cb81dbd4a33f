// Exact properties of a 3D Lagrange element, checked at seeded random points of its reference cell, shared by the
// tests of P3 tetrahedra and Q1/Q2 hexahedra. Each returns the largest deviation found, so a test asserts once.
import type { LagrangeElement } from '../../src/fem/element/types.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

/** `count` seeded points inside the reference tetrahedron (x, y, z ≥ 0, x + y + z ≤ 1) or the unit cube. */
export function referencePoints(cell: 'tetrahedron' | 'hexahedron', count: number, seed: number): Float64Array {
  const random = mulberry32(seed);
  const out = new Float64Array(3 * count);
  for (let p = 0; p < count;) {
    const x = random(), y = random(), z = random();
    if (cell === 'tetrahedron' && x + y + z > 1) continue;
    out[3 * p] = x; out[3 * p + 1] = y; out[3 * p + 2] = z;
    p++;
  }
  return out;
}

/** max |φ_i(x_j) − δ_ij| over the element's own nodes. */
export function nodalDeviation(el: LagrangeElement): number {
  const n = el.nDofs;
  const v = new Float64Array(n * n);
  el.tabulate(el.nodes, n, v, new Float64Array(n * n * 3));
  let worst = 0;
  for (let j = 0; j < n; j++) for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(v[j * n + i]! - (i === j ? 1 : 0)));
  return worst;
}

/** max |Σ_i p(x_i) φ_i(ξ) − p(ξ)| and max |Σ_i p(x_i) ∇φ_i(ξ) − ∇p(ξ)| over the monomials p = x^a y^b z^c given and
 *  the points given. */
export function reproductionDeviation(el: LagrangeElement, exponents: number[][], points: Float64Array): { value: number; gradient: number } {
  const n = el.nDofs, np = points.length / 3;
  const vals = new Float64Array(np * n), grads = new Float64Array(np * n * 3);
  el.tabulate(points, np, vals, grads);
  const mono = (e: number[], x: ArrayLike<number>, o: number) => x[o]! ** e[0]! * x[o + 1]! ** e[1]! * x[o + 2]! ** e[2]!;
  // ∂/∂x_d of x^a y^b z^c, written out by hand.
  const dmono = (e: number[], x: ArrayLike<number>, o: number, d: number) => {
    if (e[d] === 0) return 0;
    let r = e[d]! * x[o + d]! ** (e[d]! - 1);
    for (let q = 0; q < 3; q++) if (q !== d) r *= x[o + q]! ** e[q]!;
    return r;
  };
  let value = 0, gradient = 0;
  for (const e of exponents) {
    for (let p = 0; p < np; p++) {
      let s = 0;
      const g = [0, 0, 0];
      for (let i = 0; i < n; i++) {
        const c = mono(e, el.nodes, 3 * i);
        s += c * vals[p * n + i]!;
        for (let d = 0; d < 3; d++) g[d] += c * grads[(p * n + i) * 3 + d]!;
      }
      value = Math.max(value, Math.abs(s - mono(e, points, 3 * p)));
      for (let d = 0; d < 3; d++) gradient = Math.max(gradient, Math.abs(g[d]! - dmono(e, points, 3 * p, d)));
    }
  }
  return { value, gradient };
}

/** max |Σ φ_i − 1| and max |Σ ∇φ_i| at the points. */
export function partitionDeviation(el: LagrangeElement, points: Float64Array): { value: number; gradient: number } {
  const n = el.nDofs, np = points.length / 3;
  const vals = new Float64Array(np * n), grads = new Float64Array(np * n * 3);
  el.tabulate(points, np, vals, grads);
  let value = 0, gradient = 0;
  for (let p = 0; p < np; p++) {
    let s = 0;
    const g = [0, 0, 0];
    for (let i = 0; i < n; i++) {
      s += vals[p * n + i]!;
      for (let d = 0; d < 3; d++) g[d] += grads[(p * n + i) * 3 + d]!;
    }
    value = Math.max(value, Math.abs(s - 1));
    gradient = Math.max(gradient, ...g.map(Math.abs));
  }
  return { value, gradient };
}

/** Largest |φ_i| at seeded points of facet f over the dofs i not listed in facetDofs[f]: zero when the facet's dofs
 *  alone determine the trace (what continuity across faces rests on). Points: random convex combinations of the
 *  facet's vertices (those of a quadrilateral face as a bilinear patch, which is the flat face itself). */
export function offFacetTrace(el: LagrangeElement, seed: number): number {
  const random = mulberry32(seed);
  const n = el.nDofs;
  const v = new Float64Array(n), g = new Float64Array(3 * n), x = new Float64Array(3);
  let worst = 0;
  el.facetVertices.forEach((fv, f) => {
    const corner = (k: number, d: number) => el.nodes[3 * fv[k]! + d]!;
    for (let s = 0; s < 20; s++) {
      const a = random(), b = random();
      for (let d = 0; d < 3; d++) {
        x[d] = fv.length === 3
          ? (a + b <= 1 ? corner(0, d) + a * (corner(1, d) - corner(0, d)) + b * (corner(2, d) - corner(0, d)) : corner(0, d) + (1 - a) * (corner(1, d) - corner(0, d)) + (1 - b) * (corner(2, d) - corner(0, d)))
          : (1 - a) * (1 - b) * corner(0, d) + a * (1 - b) * corner(1, d) + a * b * corner(2, d) + (1 - a) * b * corner(3, d);
      }
      el.tabulate(x, 1, v, g);
      for (let i = 0; i < n; i++) if (!el.facetDofs[f]!.includes(i)) worst = Math.max(worst, Math.abs(v[i]!));
    }
  });
  return worst;
}
