// Route 2 of docs/verify-your-discretization.md: a discretization of your own in TypeScript. Heat along a kiln rod,
// −(k u′)′ = f on [0, 1] with both ends held at the exact temperature, solved by hand-written linear elements: the
// tridiagonal system assembled on typed arrays and solved by the Thomas algorithm, the solution handed back to rungs
// as a DiscreteField it can evaluate anywhere in a cell. Invented data.
import { defineStudy, interval, custom, type DiscreteField, type LevelContext } from 'rungs';

/** Gauss–Legendre, 2 points on [0, 1] (exact for cubics; Abramowitz & Stegun 1964, 25.4.29, mapped to [0, 1]). */
const GAUSS_X = [0.5 - 0.5 / Math.sqrt(3), 0.5 + 0.5 / Math.sqrt(3)];
const GAUSS_W = [0.5, 0.5];

function solveRod(level: LevelContext): { field: DiscreteField } {
  const { mesh, coefficients, boundary } = level;
  const k = coefficients.k ?? (() => 1);
  const f = coefficients.f ?? (() => 0);
  const nv = mesh.nVertices;
  // Tridiagonal matrix: lower[i], diag[i], upper[i] of row i; right-hand side rhs.
  const lower = new Float64Array(nv), diag = new Float64Array(nv), upper = new Float64Array(nv), rhs = new Float64Array(nv);
  for (let c = 0; c < mesh.nCells; c++) {
    const a = mesh.cells[2 * c]!, b = mesh.cells[2 * c + 1]!;
    const xa = mesh.coords[a]!, xb = mesh.coords[b]!, len = xb - xa;
    for (let q = 0; q < 2; q++) {
      const x = xa + GAUSS_X[q]! * len, w = GAUSS_W[q]! * len;
      const kq = k(x, 0, 0) * w / (len * len), fq = f(x, 0, 0) * w;
      diag[a] += kq; diag[b] += kq; upper[a] -= kq; lower[b] -= kq;
      rhs[a] += fq * (1 - GAUSS_X[q]!); rhs[b] += fq * GAUSS_X[q]!;
    }
  }
  // Both ends are Dirichlet ('left' and 'right' are the interval's tags): replace their rows by u = g.
  const g = boundary.dirichlet!.value;
  for (const v of [0, nv - 1]) { lower[v] = 0; upper[v] = 0; diag[v] = 1; rhs[v] = g(mesh.coords[v]!, 0, 0); }
  // Thomas algorithm (forward elimination, back substitution), in place.
  for (let i = 1; i < nv; i++) {
    const m = lower[i]! / diag[i - 1]!;
    diag[i] -= m * upper[i - 1]!;
    rhs[i] -= m * rhs[i - 1]!;
  }
  const u = new Float64Array(nv);
  u[nv - 1] = rhs[nv - 1]! / diag[nv - 1]!;
  for (let i = nv - 2; i >= 0; i--) u[i] = (rhs[i]! - upper[i]! * u[i + 1]!) / diag[i]!;

  const field: DiscreteField = {
    mesh, nDofs: nv, degree: 1,
    // Reference cell [0, 1]: u = u_a (1 − ξ) + u_b ξ, u′ = (u_b − u_a) / length.
    evaluate(c, refPoints, nPoints, values, grads) {
      const a = mesh.cells[2 * c]!, b = mesh.cells[2 * c + 1]!;
      const slope = (u[b]! - u[a]!) / (mesh.coords[b]! - mesh.coords[a]!);
      for (let p = 0; p < nPoints; p++) {
        const xi = refPoints[p]!; // one coordinate per point in 1D
        values[p] = u[a]! * (1 - xi) + u[b]! * xi;
        grads[p] = slope;
      }
    },
    nodes: { coords: mesh.coords, values: u },
  };
  return { field };
}

export default defineStudy({
  name: 'guide-kiln-rod-own-p1',
  description: 'Hand-written linear elements along a kiln rod with a conductivity that rises with temperature zone.',
  domain: interval(0, 1),
  exact: 'exp(-x) * sin(3*x) + x',
  coefficients: { k: '1 + x/2' },
  discretization: custom({ label: 'hand-written P1, Thomas algorithm', degree: 1, solve: solveRod }),
  ladder: { n: [8, 16, 32, 64, 128] },
  norms: ['L2', 'H1semi'],
});
