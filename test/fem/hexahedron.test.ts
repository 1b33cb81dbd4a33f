import { describe, expect, it } from 'vitest';
import { lagrangeElement } from '../../src/fem/element/index.ts';
import { facetRuleFor, hexahedronGaussRule, ruleFor } from '../../src/fem/quadrature/index.ts';
import { cellJacobian } from '../../src/fem/geometry/jacobian.ts';
import { mapReferencePoint } from '../../src/fem/geometry/map.ts';
import { makeCellValues, reinitCell } from '../../src/fem/geometry/cellvalues.ts';
import { makeFacetGeometry, reinitFacetGeometry } from '../../src/fem/geometry/facet-geometry.ts';
import { meshFromArrays } from '../../src/mesh/from-arrays.ts';
import { minJacobian, signedCellMeasure } from '../../src/mesh/measure.ts';
import { nodalDeviation, offFacetTrace, partitionDeviation, referencePoints, reproductionDeviation } from './element-3d-checks.ts';

/** All (a, b, c) with a, b, c ≤ k: the monomials spanning Q_k. */
function qk(k: number): number[][] {
  const out: number[][] = [];
  for (let c = 0; c <= k; c++) for (let b = 0; b <= k; b++) for (let a = 0; a <= k; a++) out.push([a, b, c]);
  return out;
}

const CUBE = [[0, 0, 0], [1, 0, 0], [1, 1, 0], [0, 1, 0], [0, 0, 1], [1, 0, 1], [1, 1, 1], [0, 1, 1]];

// Q_k on [0,1]^3 with equispaced nodes: dim Q_k = (k + 1)^3 (Ciarlet 1978, §2.2, the rectangular elements).
// Tolerances: round-off of a (k + 1)^3 Vandermonde inverse (common practice, no source).
describe.each([1, 2])('Q%i hexahedron', (k) => {
  const el = lagrangeElement('hexahedron', k);
  const points = referencePoints('hexahedron', 40, 3 + k);

  it('has (k + 1)^3 dofs: vertices, then k − 1 per edge, (k − 1)^2 per face, (k − 1)^3 inside', () => {
    expect([el.nDofs, el.perEdge, el.perFace, el.perInterior, el.family]).toEqual([(k + 1) ** 3, k - 1, (k - 1) ** 2, (k - 1) ** 3, 'Q']);
    expect([el.edges.length, el.faces.length]).toEqual([12, 6]);
    // Vertex dofs sit on the reference vertices in the documented order.
    expect(Array.from(el.nodes.subarray(0, 24))).toEqual(CUBE.flat());
  });

  it('is nodal: φ_i(x_j) = δ_ij (definition of a Lagrange element; Ciarlet 1978, §2.2)', () => {
    expect(nodalDeviation(el)).toBeLessThan(1e-12);
  });

  it('is a partition of unity: Σ φ_i = 1, Σ ∇φ_i = 0 (Ciarlet 1978, §2.2)', () => {
    const d = partitionDeviation(el, points);
    expect(Math.max(d.value, d.gradient / 10)).toBeLessThan(1e-12);
  });

  it('reproduces every monomial x^a y^b z^c with a, b, c ≤ k and its gradient (interpolation is exact on Q_k)', () => {
    const d = reproductionDeviation(el, qk(k), points);
    expect(Math.max(d.value, d.gradient / 10)).toBeLessThan(1e-12);
  });

  it('does not reproduce x^(k+1) (Q_k is all it spans; common practice, no source)', () => {
    expect(reproductionDeviation(el, [[k + 1, 0, 0]], points).value).toBeGreaterThan(1e-3);
  });

  it('lists on each face (k + 1)^2 dofs, those whose node is on the face, and only they are nonzero there', () => {
    // The trace of Q_k on a face of the cube is Q_k in two variables, fixed by its (k + 1)^2 nodes there
    // (Ciarlet 1978, §2.2), so continuity across faces rests on these dofs alone.
    const sides = [[0, 0], [0, 1], [1, 0], [1, 1], [2, 0], [2, 1]]; // face f: coordinate `axis` = `value`
    el.facetDofs.forEach((dofs, f) => {
      const [axis, value] = sides[f]!;
      const on = Array.from({ length: el.nDofs }, (_, i) => i).filter((i) => el.nodes[3 * i + axis!] === value);
      expect([...dofs].sort((a, b) => a - b)).toEqual(on);
      expect(dofs.length).toBe((k + 1) ** 2);
    });
    expect(offFacetTrace(el, 5)).toBeLessThan(1e-12);
  });
});

describe('Q2 hexahedron node layout', () => {
  const el = lagrangeElement('hexahedron', 2);
  it('puts 12 edge midpoints, then the 6 face centres in face order, then the body centre', () => {
    const node = (i: number) => Array.from(el.nodes.subarray(3 * i, 3 * i + 3));
    el.edges.forEach(([a, b], e) => expect(node(8 + e)).toEqual(CUBE[a!]!.map((x, d) => (x + CUBE[b!]![d]!) / 2)));
    el.faces.forEach((face, f) => expect(node(20 + f)).toEqual([0, 1, 2].map((d) => face.reduce((s, v) => s + CUBE[v]![d]!, 0) / 4)));
    expect(node(26)).toEqual([0.5, 0.5, 0.5]);
  });
});

describe('quadrature on the hexahedron', () => {
  // ∫_[0,1]^3 x^a y^b z^c = 1/((a+1)(b+1)(c+1)) (exact integral); an n-point Gauss–Legendre rule is exact to degree
  // 2n − 1 in one variable and not to 2n (Abramowitz & Stegun 1964, 25.4.29), so the tensor rule is exact for Q_(2n−1).
  it('tensor Gauss rules with n = 1..6 points per direction integrate every x^a y^b z^c, a, b, c ≤ 2n − 1, exactly', () => {
    let worst = 0;
    for (let n = 1; n <= 6; n++) {
      const rule = hexahedronGaussRule(n);
      expect([rule.nPoints, rule.degree, rule.cell]).toEqual([n ** 3, 2 * n - 1, 'hexahedron']);
      for (let a = 0; a <= 2 * n - 1; a++) for (let b = 0; b <= 2 * n - 1; b++) for (let c = 0; c <= 2 * n - 1; c++) {
        let s = 0;
        for (let q = 0; q < rule.nPoints; q++) s += rule.weights[q]! * rule.points[3 * q]! ** a * rule.points[3 * q + 1]! ** b * rule.points[3 * q + 2]! ** c;
        worst = Math.max(worst, Math.abs(s * (a + 1) * (b + 1) * (c + 1) - 1));
      }
    }
    expect(worst).toBeLessThan(1e-13);
  });

  it('is not exact for z^(2n) (the degree is tight; Abramowitz & Stegun 1964, 25.4.29)', () => {
    for (let n = 1; n <= 4; n++) {
      const rule = hexahedronGaussRule(n);
      let s = 0;
      for (let q = 0; q < rule.nPoints; q++) s += rule.weights[q]! * rule.points[3 * q + 2]! ** (2 * n);
      expect(Math.abs(s * (2 * n + 1) - 1)).toBeGreaterThan(1e-6);
    }
  });

  it('ruleFor(hexahedron, d) takes ceil((d + 1)/2) Gauss points per direction (common practice, no source)', () => {
    for (let d = 0; d <= 12; d++) {
      const rule = ruleFor('hexahedron', d);
      expect(rule.nPoints).toBe(Math.max(1, Math.ceil((d + 1) / 2)) ** 3);
      expect(rule.degree).toBeGreaterThanOrEqual(d);
    }
  });

  it('the facet rule of a hexahedron is the tensor rule on the unit square, weights summing to its area 1', () => {
    for (const d of [0, 3, 6]) {
      const rule = facetRuleFor('hexahedron', d)!;
      expect(rule).toBe(ruleFor('quadrilateral', d));
      expect(Math.abs(rule.weights.reduce((s, w) => s + w, 0) - 1)).toBeLessThan(1e-15);
    }
  });
});

/** One hexahedral cell from eight vertices (reference order), its boundary found by meshFromArrays. */
function oneHex(vertices: number[][]) {
  return meshFromArrays({ cellKind: 'hexahedron', coords: vertices.flat(), cells: [0, 1, 2, 3, 4, 5, 6, 7] }, 'hex');
}

// The unit cube with the vertex (1,1,1) lifted to (1,1,2): the trilinear map is x = s, y = t, z = u (1 + s t), so
// J = [[1,0,0],[0,1,0],[u t, u s, 1 + s t]], det J = 1 + s t and the volume is ∫∫ (1 + x y) dx dy = 5/4 (by hand).
const LIFTED = CUBE.map((v, i) => (i === 6 ? [1, 1, 2] : v));

describe('trilinear geometry of hexahedra', () => {
  it('maps reference vertices to the cell vertices and the Jacobian of a box is diag(its sides) (by hand)', () => {
    const box = oneHex(CUBE.map(([x, y, z]) => [1 + 2 * x!, -1 + 3 * y!, 0.5 + 5 * z!]));
    const J = new Float64Array(9), invJ = new Float64Array(9), x = new Float64Array(3);
    const pts = referencePoints('hexahedron', 10, 1);
    let worst = 0;
    for (let p = 0; p < 10; p++) {
      const det = cellJacobian(box, 0, pts, 3 * p, J, invJ);
      worst = Math.max(worst, Math.abs(det - 30), ...Array.from(J).map((v, i) => Math.abs(v - [2, 0, 0, 0, 3, 0, 0, 0, 5][i]!)));
      worst = Math.max(worst, ...Array.from(invJ).map((v, i) => Math.abs(v - [1 / 2, 0, 0, 0, 1 / 3, 0, 0, 0, 1 / 5][i]!)));
    }
    for (let v = 0; v < 8; v++) {
      mapReferencePoint(box, 0, CUBE[v]!, 0, x);
      worst = Math.max(worst, ...[0, 1, 2].map((d) => Math.abs(x[d]! - box.coords[3 * v + d]!)));
    }
    expect(worst).toBeLessThan(1e-14);
  });

  it('has det J = 1 + s t on the lifted cube, volume 5/4 and smallest corner Jacobian 1 (by hand)', () => {
    const mesh = oneHex(LIFTED);
    const J = new Float64Array(9), invJ = new Float64Array(9);
    const pts = referencePoints('hexahedron', 20, 2);
    let worst = 0;
    for (let p = 0; p < 20; p++) {
      const [s, t, u] = [pts[3 * p]!, pts[3 * p + 1]!, pts[3 * p + 2]!];
      const det = cellJacobian(mesh, 0, pts, 3 * p, J, invJ);
      worst = Math.max(worst, Math.abs(det - (1 + s * t)), Math.abs(J[6]! - u * t), Math.abs(J[7]! - u * s), Math.abs(J[8]! - (1 + s * t)));
    }
    expect(worst).toBeLessThan(1e-14);
    expect(signedCellMeasure(mesh, 0)).toBeCloseTo(5 / 4, 14);
    expect(minJacobian(mesh, 0)).toBe(1);
  });

  it.each([1, 2])('cell values with Q%i: Σ w|det J| = 5/4 and physical gradients of a linear function exact', (k) => {
    // x, y, z are in the span of the isoparametric Q1 (and so Q2) functions on any trilinear cell, so the interpolant
    // of L = 1 + 2x − y + 3z is L itself and its gradient is (2, −1, 3) everywhere (Ciarlet 1978, §4.3).
    const mesh = oneHex(LIFTED);
    const el = lagrangeElement('hexahedron', k);
    const cv = makeCellValues(el, ruleFor('hexahedron', 4));
    reinitCell(cv, mesh, 0);
    const x = new Float64Array(3);
    const L = (p: ArrayLike<number>) => 1 + 2 * p[0]! - p[1]! + 3 * p[2]!;
    const coef = Array.from({ length: el.nDofs }, (_, i) => { mapReferencePoint(mesh, 0, el.nodes, 3 * i, x); return L(x); });
    let volume = 0, worst = 0;
    for (let q = 0; q < cv.nq; q++) {
      volume += cv.wdet[q]!;
      let value = 0;
      const g = [0, 0, 0];
      for (let i = 0; i < el.nDofs; i++) {
        value += coef[i]! * cv.values[q * el.nDofs + i]!;
        for (let d = 0; d < 3; d++) g[d] += coef[i]! * cv.grads[(q * el.nDofs + i) * 3 + d]!;
      }
      worst = Math.max(worst, Math.abs(value - L(cv.x.subarray(3 * q, 3 * q + 3))), Math.abs(g[0]! - 2), Math.abs(g[1]! + 1), Math.abs(g[2]! - 3));
    }
    expect(Math.abs(volume - 5 / 4)).toBeLessThan(1e-14);
    expect(worst).toBeLessThan(1e-12);
  });

  it('facet values on the lifted cube: ∮ n dS = 0, ∮ x·n dS = 3|K| = 15/4, ∮ z n_z dS = |K| (divergence theorem)', () => {
    // On each face (x·n) dS is a polynomial of degree ≤ 2 per face variable (the lifted top face z = 1 + xy has
    // n dS = (−y, −x, 1) dx dy), which a 2 × 2 Gauss rule integrates exactly (Abramowitz & Stegun 1964, 25.4.29).
    const mesh = oneHex(LIFTED);
    const fg = makeFacetGeometry(lagrangeElement('hexahedron', 1), 3);
    const closed = [0, 0, 0];
    let flux = 0, fluxZ = 0, unit = 0;
    for (let lf = 0; lf < 6; lf++) {
      reinitFacetGeometry(fg, mesh, 0, lf);
      for (let q = 0; q < fg.nq; q++) {
        const w = fg.wds[q]!;
        for (let d = 0; d < 3; d++) {
          closed[d] += w * fg.normals[3 * q + d]!;
          flux += w * fg.x[3 * q + d]! * fg.normals[3 * q + d]!;
        }
        fluxZ += w * fg.x[3 * q + 2]! * fg.normals[3 * q + 2]!;
        unit = Math.max(unit, Math.abs(Math.hypot(fg.normals[3 * q]!, fg.normals[3 * q + 1]!, fg.normals[3 * q + 2]!) - 1));
      }
    }
    expect(unit).toBeLessThan(1e-14);
    expect(Math.max(...closed.map(Math.abs))).toBeLessThan(1e-14);
    expect(Math.abs(flux - 15 / 4)).toBeLessThan(1e-14);
    expect(Math.abs(fluxZ - 5 / 4)).toBeLessThan(1e-14);
  });

  it('facet values on a box: each face has the outward axis normal and its area (by hand)', () => {
    const mesh = oneHex(CUBE.map(([x, y, z]) => [2 * x!, 3 * y!, 5 * z!]));
    const fg = makeFacetGeometry(lagrangeElement('hexahedron', 2), 2);
    // Local faces: x = 0, x = 1, y = 0, y = 1, z = 0, z = 1 (reference), areas 15, 15, 10, 10, 6, 6.
    const normals = [[-1, 0, 0], [1, 0, 0], [0, -1, 0], [0, 1, 0], [0, 0, -1], [0, 0, 1]];
    const areas = [15, 15, 10, 10, 6, 6];
    let worst = 0;
    for (let lf = 0; lf < 6; lf++) {
      reinitFacetGeometry(fg, mesh, 0, lf);
      let area = 0;
      for (let q = 0; q < fg.nq; q++) {
        area += fg.wds[q]!;
        for (let d = 0; d < 3; d++) worst = Math.max(worst, Math.abs(fg.normals[3 * q + d]! - normals[lf]![d]!));
      }
      worst = Math.max(worst, Math.abs(area - areas[lf]!));
    }
    expect(worst).toBeLessThan(1e-13);
  });
});
