import { describe, expect, it } from 'vitest';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { perturbMesh } from '../../src/mesh/perturb.ts';
import type { Mesh } from '../../src/mesh/types.ts';
import { solveAndMeasure, rate } from './helpers.ts';

// Orders of accuracy of degree-k Lagrange elements on a smooth solution: |u − u_h|_H1 = O(h^k) and
// ||u − u_h||_L2 = O(h^(k+1)) (Brenner & Scott 2008, Thm 5.4.8 and §5.4 Aubin–Nitsche; Ciarlet 1978, Thm 3.2.2).
// Checked between the two finest of five levels, within 0.1.
const U1 = 'exp(x) * sin(2*x) + 1';
const U2 = 'sin(2*x + 0.5) * exp(y) + x*y';

type Maker = (n: number) => Mesh;
const cases: { name: string; k: number; mesh: Maker; ns: number[]; u: string; opts?: Parameters<typeof solveAndMeasure>[3] }[] = [
  { name: 'P1 interval', k: 1, mesh: (n) => intervalMesh(0, 1, n), ns: [8, 16, 32, 64, 128], u: U1 },
  { name: 'P2 interval', k: 2, mesh: (n) => intervalMesh(0, 1, n), ns: [4, 8, 16, 32, 64], u: U1 },
  { name: 'P3 interval', k: 3, mesh: (n) => intervalMesh(0, 1, n), ns: [2, 4, 8, 16, 32], u: U1 },
  { name: 'P1 triangles', k: 1, mesh: (n) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }), ns: [4, 8, 16, 32, 64], u: U2, opts: { k: '1 + x*y' } },
  { name: 'P2 triangles', k: 2, mesh: (n) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles', diagonal: 'crossed' }), ns: [2, 4, 8, 16, 32], u: U2, opts: { neumann: ['top'] } },
  { name: 'P3 triangles', k: 3, mesh: (n) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles', diagonal: 'alternating' }), ns: [2, 4, 8, 16, 24], u: U2 },
  { name: 'Q1 quadrilaterals', k: 1, mesh: (n) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'quadrilaterals' }), ns: [4, 8, 16, 32, 64], u: U2, opts: { c: '1' } },
  { name: 'Q2 quadrilaterals', k: 2, mesh: (n) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'quadrilaterals' }), ns: [2, 4, 8, 16, 32], u: U2 },
  { name: 'P2 perturbed triangles', k: 2, mesh: (n) => perturbMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }), { fraction: 0.25, seed: 3 }), ns: [4, 8, 16, 32, 48], u: U2 },
  { name: 'P1 perturbed triangles', k: 1, mesh: (n) => perturbMesh(rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }), { fraction: 0.25, seed: 5 }), ns: [4, 8, 16, 32, 64], u: U2 },
];

describe.each(cases)('$name', ({ k, mesh, ns, u, opts }) => {
  it(`gives L2 rate ${k + 1} and H1-seminorm rate ${k} between the two finest of five levels`, () => {
    const res = ns.map((n) => { const m = mesh(n); return { h: m.h, ...solveAndMeasure(m, k, u, opts) }; });
    const a = res[res.length - 2], b = res[res.length - 1];
    expect(Math.abs(rate(a.L2, b.L2, a.h, b.h) - (k + 1))).toBeLessThan(0.1);
    expect(Math.abs(rate(a.H1semi, b.H1semi, a.h, b.h) - k)).toBeLessThan(0.1);
  });
});
