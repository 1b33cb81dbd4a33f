import type { QuadratureRule } from './types.ts';

/** Centroid rule on the reference tetrahedron, exact for linear functions (Keast 1986, rule 1). */
export function tetrahedronCentroidRule(): QuadratureRule {
  return {
    cell: 'tetrahedron',
    degree: 1,
    nPoints: 1,
    points: Float64Array.of(0.25, 0.25, 0.25),
    weights: Float64Array.of(1 / 6),
    source: 'centroid rule (Keast 1986)',
  };
}

/** 4-point rule exact to degree 2: barycentric orbit (a, a, a, 1-3a) with a = (5 - √5)/20, equal weights
 *  (Hammer, Marlowe & Stroud 1956; Keast 1986). Point (x, y, z) = (l1, l2, l3) of barycentrics (l0..l3). */
export function tetrahedronFourPointRule(): QuadratureRule {
  const a = (5 - Math.sqrt(5)) / 20;
  const b = 1 - 3 * a;
  return {
    cell: 'tetrahedron',
    degree: 2,
    nPoints: 4,
    points: Float64Array.of(a, a, a, b, a, a, a, b, a, a, a, b),
    weights: Float64Array.of(1 / 24, 1 / 24, 1 / 24, 1 / 24),
    source: 'Hammer, Marlowe & Stroud 1956 / Keast 1986, degree 2, 4 points',
  };
}

/**
 * 14-point rule exact to degree 5 with positive weights and interior points: two orbits (a, a, a, 1-3a)
 * and one orbit (a, a, 1/2-a, 1/2-a). Values (16 digits, weights summing to 1/6) from memory as tabulated
 * by Walkington (2000, "Quadrature on simplices of arbitrary dimension"); the monomial test confirms them.
 */
export function tetrahedronFourteenPointRule(): QuadratureRule {
  const points: number[] = [];
  const weights: number[] = [];
  const s31 = (a: number, w: number): void => {
    const b = 1 - 3 * a;
    points.push(a, a, a, b, a, a, a, b, a, a, a, b);
    weights.push(w, w, w, w);
  };
  const s22 = (a: number, w: number): void => {
    const b = 0.5 - a;
    points.push(a, a, b, a, b, a, b, a, a, b, b, a, b, a, b, a, b, b);
    weights.push(w, w, w, w, w, w);
  };
  s31(0.0927352503108912, 0.01224884051939366);
  s31(0.3108859192633006, 0.01878132095300264);
  s22(0.4544962958743503, 0.007091003462846911);
  return {
    cell: 'tetrahedron',
    degree: 5,
    nPoints: 14,
    points: Float64Array.from(points),
    weights: Float64Array.from(weights),
    source: 'Walkington 2000, degree 5, 14 points',
  };
}

/**
 * 24-point rule exact to degree 6 with positive weights and interior points: three orbits (a, a, a, 1-3a) and one
 * orbit (a, a, b, 1-2a-b) of 12 points; Keast 1986 ("Moderate-degree tetrahedral quadrature formulas", Comput.
 * Methods Appl. Mech. Engrg. 55), its 24-point rule of degree 6, weights for the reference volume 1/6. Values
 * (16 digits) from memory; the monomial test confirms them (test/fem/quadrature/tetrahedron-degree6.test.ts).
 * Replaces the 64-point collapsed rule at degree 6 (the error integrals of P1 on tetrahedra use degree 2k + 4 = 6,
 * the load of P2 with a non-polynomial source k + k + 2 = 6).
 */
export function tetrahedronTwentyFourPointRule(): QuadratureRule {
  const points: number[] = [];
  const weights: number[] = [];
  const s31 = (a: number, w: number): void => {
    const b = 1 - 3 * a;
    points.push(a, a, a, b, a, a, a, b, a, a, a, b);
    weights.push(w, w, w, w);
  };
  // The 12 arrangements of barycentrics (a, a, b, c), c = 1 - 2a - b; a point is (l1, l2, l3).
  const s211 = (a: number, b: number, w: number): void => {
    const c = 1 - 2 * a - b;
    const bary = [
      [a, a, b, c], [a, a, c, b], [a, b, a, c], [a, c, a, b], [a, b, c, a], [a, c, b, a],
      [b, a, a, c], [c, a, a, b], [b, a, c, a], [c, a, b, a], [b, c, a, a], [c, b, a, a],
    ];
    for (const l of bary) { points.push(l[1], l[2], l[3]); weights.push(w); }
  };
  s31(0.2146028712591517, 0.006653791709694649);
  s31(0.04067395853461135, 0.001679535175886773);
  s31(0.3223378901422757, 0.009226196923942399);
  s211(0.0636610018750175, 0.2696723314583159, 0.008035714285714285);
  return {
    cell: 'tetrahedron',
    degree: 6,
    nPoints: 24,
    points: Float64Array.from(points),
    weights: Float64Array.from(weights),
    source: 'Keast 1986, degree 6, 24 points',
  };
}
