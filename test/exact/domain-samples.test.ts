import { describe, expect, it } from 'vitest';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { lShapeMesh } from '../../src/mesh/lshape.ts';
import { assertFiniteOnDomain, domainSamples, findSingular } from '../../src/exact/domain-samples.ts';

describe('sampling a domain for singular formulas', () => {
  const rod = domainSamples([intervalMesh(0, 1, 16)]);

  it('finds a pole no float hits, 1/(x − 1/3), by following the sign change along an edge', () => {
    const bad = findSingular((x) => 1 / (x - 1 / 3), rod, 'interior');
    expect(bad).not.toBeNull();
    expect(bad!.x).toBeCloseTo(1 / 3, 12);
    expect(bad!.onBoundary).toBe(false);
  });

  it('does not take a root, a jump or a smooth function for a pole', () => {
    expect(findSingular((x) => Math.sin(40 * x), rod, 'closed')).toBeNull();
    expect(findSingular((x) => Math.sign(x - 0.3), rod, 'closed')).toBeNull();
    expect(findSingular((x) => 1 + x * x, rod, 'closed')).toBeNull();
  });

  it('refuses log(x) at the boundary point x = 0 only when the boundary counts', () => {
    expect(() => assertFiniteOnDomain(Math.log, 'exact', rod, 'closed', 'u is evaluated at boundary nodes'))
      .toThrow(/^exact is -Infinity at \(x=0\.00000\) on the boundary of the domain; it must be finite on the whole domain, boundary included/);
    // A source singular at a boundary point only (f of u = √x is x^(−3/2)/4) is integrated at interior points: allowed.
    expect(() => assertFiniteOnDomain((x) => x ** -1.5 / 4, 'source term f', rod, 'interior', 'quadrature')).not.toThrow();
  });

  it('samples the L-shape itself: the re-entrant corner is boundary, the missing quadrant is never sampled', () => {
    const s = domainSamples([lShapeMesh(8, 'right')]);
    // r^(-1/3) (the gradient's size for r^(2/3)) is infinite at the corner (0, 0) only.
    const gradSize = (x: number, y: number) => Math.cbrt(Math.hypot(x, y)) ** -1;
    expect(findSingular(gradSize, s, 'interior')).toBeNull();
    expect(findSingular(gradSize, s, 'closed')).toMatchObject({ x: 0, y: 0, onBoundary: true });
    // The removed quadrant is (0, 1] × [−1, 0) (src/mesh/lshape.ts): no sample lies strictly inside it.
    const all = [...s.interior, ...s.boundary];
    let inQuadrant = 0;
    for (let i = 0; i < all.length; i += 3) if (all[i]! > 1e-12 && all[i + 1]! < -1e-12) inQuadrant++;
    expect(inQuadrant).toBe(0);
  });

  it('hits x = 0.5 on a power-of-two mesh of the unit square and names the point', () => {
    const tile = domainSamples([rectangleMesh({ x: [0, 1], y: [0, 1], cells: 'triangles', nx: 8, ny: 8 })]);
    expect(() => assertFiniteOnDomain((x) => 1 / (x - 0.5), 'coefficients.k', tile, 'closed', 'bounded'))
      .toThrow(/coefficients\.k is [+-]Infinity at \(x=0\.500000, y=[0-9.]+\)/);
  });
});
