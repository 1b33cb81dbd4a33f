import { reinitCell } from '../geometry/cellvalues.ts';
import { failAtPoint2D } from './check-finite.ts';
import { scatterCell } from './general-cells.ts';
import type { CellLoop, CellLoopInput } from './cell-set.ts';

const vecB = new Float64Array(3);

/**
 * The cell loop of −∇·(k∇u) + b·∇u + c·u = f on a mesh of (affine) triangles, any Lagrange degree: the same
 * arithmetic, operation for operation, as the reference loop (general-cells.ts, with reinitCell and cellJacobian),
 * so the matrix and vector are the same bits (test/fem/assemble/triangles-fast.test.ts), but
 * - the Jacobian, its inverse and determinant are computed once per cell, inline (the reference computes them again
 *   for every term's CellValues, through calls);
 * - the basis gradients at the rule's points are tabulated once per rule (CellValues.refGrads) and mapped per cell
 *   with the 2×2 inverse written out; physical points only for terms whose coefficient or source needs them (the
 *   load's are used as they are computed, not stored);
 * - coefficient and source values are tested for finiteness inline (the message is built only on failure).
 * Nothing is allocated per cell or per point (DEVELOPERS.md, Conventions).
 */
export function triangleCells(p: CellLoopInput): CellLoop {
  const { mesh, cellDofs, n, cvK, cvB, cvC, cvF, coef, A, b, reduced, dirichletValues } = p;
  const { coords, cells, verticesPerCell: vpc } = mesh;
  const kf = coef.k, bf = coef.b, cf = coef.c, ff = coef.f;
  const Ke = new Float64Array(n * n);
  const Fe = new Float64Array(n);
  const rows = new Int32Array(n), cols = new Int32Array(n);
  const G = new Float64Array(2 * n);
  return ({ c0, c1, owner, part, defer: d }) => {
    for (let c = c0; c < c1; c++) {
      // Without A (the load vector's own pass, system.ts) the matrix is needed only for Dirichlet columns.
      let needKe = A !== null;
      if (!needKe) for (let k = 0; k < n; k++) if (reduced[cellDofs[c * n + k]] < 0) needKe = true;
      if (needKe) Ke.fill(0);
      Fe.fill(0);
      // J[d·2 + r] = x_{r+1,d} − x_{0,d}, its determinant and inverse, as cellJacobian and invert compute them.
      const base = c * vpc;
      const p0 = cells[base] * 2, p1 = cells[base + 1] * 2, p2 = cells[base + 2] * 2;
      const x0 = coords[p0], y0 = coords[p0 + 1];
      const j0 = coords[p1] - x0, j1 = coords[p2] - x0, j2 = coords[p1 + 1] - y0, j3 = coords[p2 + 1] - y0;
      const det = j0 * j3 - j1 * j2;
      if (!(det > 0)) reinitCell(cvK, mesh, c); // throws, naming the cell
      const i0 = j3 / det, i1 = -j1 / det, i2 = -j2 / det, i3 = j0 / det;
      if (needKe) {
        const { nq, refGrads, rule } = cvK;
        const pts = rule.points, wts = rule.weights;
        for (let q = 0; q < nq; q++) {
          let w = wts[q] * det;
          if (kf) {
            const s = pts[2 * q], t = pts[2 * q + 1];
            let X = x0; X += j0 * s; X += j1 * t;
            let Y = y0; Y += j2 * s; Y += j3 * t;
            const kq = kf(X, Y, 0);
            if (!Number.isFinite(kq)) failAtPoint2D(kq, 'conductivity k', c, X, Y);
            w *= kq;
          }
          const o = q * n * 2;
          for (let i = 0; i < n; i++) {
            const r0 = refGrads[o + 2 * i], r1 = refGrads[o + 2 * i + 1];
            let g0 = 0; g0 += i0 * r0; g0 += i2 * r1;
            let g1 = 0; g1 += i1 * r0; g1 += i3 * r1;
            G[2 * i] = g0; G[2 * i + 1] = g1;
          }
          for (let i = 0; i < n; i++) {
            const a0 = G[2 * i], a1 = G[2 * i + 1];
            for (let j = i; j < n; j++) {
              let s = 0; s += a0 * G[2 * j]; s += a1 * G[2 * j + 1];
              Ke[i * n + j] += w * s;
            }
          }
        }
        for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) Ke[i * n + j] = Ke[j * n + i];
      }
      if (needKe && cvB && bf) {
        const { nq, refGrads, values, rule } = cvB;
        const pts = rule.points, wts = rule.weights;
        for (let q = 0; q < nq; q++) {
          const s = pts[2 * q], t = pts[2 * q + 1];
          let X = x0; X += j0 * s; X += j1 * t;
          let Y = y0; Y += j2 * s; Y += j3 * t;
          bf(X, Y, 0, vecB);
          for (let d = 0; d < 2; d++) if (!Number.isFinite(vecB[d])) failAtPoint2D(vecB[d], `convection b[${d}]`, c, X, Y);
          const w = wts[q] * det;
          const o = q * n * 2;
          const v0 = vecB[0], v1 = vecB[1];
          for (let j = 0; j < n; j++) {
            const r0 = refGrads[o + 2 * j], r1 = refGrads[o + 2 * j + 1];
            let g0 = 0; g0 += i0 * r0; g0 += i2 * r1;
            let g1 = 0; g1 += i1 * r0; g1 += i3 * r1;
            let bg = 0; bg += v0 * g0; bg += v1 * g1;
            bg *= w;
            for (let i = 0; i < n; i++) Ke[i * n + j] += values[q * n + i] * bg;
          }
        }
      }
      if (needKe && cvC && cf) {
        const { nq, values, rule } = cvC;
        const pts = rule.points, wts = rule.weights;
        for (let q = 0; q < nq; q++) {
          const s = pts[2 * q], t = pts[2 * q + 1];
          let X = x0; X += j0 * s; X += j1 * t;
          let Y = y0; Y += j2 * s; Y += j3 * t;
          const cq = cf(X, Y, 0);
          if (!Number.isFinite(cq)) failAtPoint2D(cq, 'reaction c', c, X, Y);
          const w = (wts[q] * det) * cq;
          for (let i = 0; i < n; i++) {
            const wi = w * values[q * n + i];
            for (let j = 0; j < n; j++) Ke[i * n + j] += wi * values[q * n + j];
          }
        }
      }
      if (cvF && ff) {
        const { nq, values, rule } = cvF;
        const pts = rule.points, wts = rule.weights;
        for (let q = 0; q < nq; q++) {
          const s = pts[2 * q], t = pts[2 * q + 1];
          let X = x0; X += j0 * s; X += j1 * t;
          let Y = y0; Y += j2 * s; Y += j3 * t;
          const fq = ff(X, Y, 0);
          if (!Number.isFinite(fq)) failAtPoint2D(fq, 'source f', c, X, Y);
          const w = (wts[q] * det) * fq;
          const vo = q * n;
          for (let i = 0; i < n; i++) Fe[i] += w * values[vo + i];
        }
      }
      scatterCell(c, n, cellDofs, reduced, dirichletValues, Ke, Fe, rows, cols, A, b, owner, part, d);
    }
  };
}

/** The reference loop's message for a value that is not finite at a point of a cell. */
