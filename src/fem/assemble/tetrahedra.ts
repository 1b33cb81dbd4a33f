import { reinitCell, type CellValues } from '../geometry/cellvalues.ts';
import { checkFinite } from './check-finite.ts';
import { scatterCell } from './general-cells.ts';
import type { CellLoop, CellLoopInput } from './cell-set.ts';

const vecB = new Float64Array(3);

/**
 * The cell loop of −∇·(k∇u) + b·∇u + c·u = f on a mesh of (affine) tetrahedra: the same arithmetic, operation for
 * operation, as the general loop of assembleSystem with reinitCell (src/fem/geometry/cellvalues.ts and jacobian.ts),
 * so the matrix and vector are the same bits (test/fem/assemble/tetrahedra-fast.test.ts), but
 * - the Jacobian, its inverse and determinant are computed once per cell (the general loop computes them again for
 *   every term's CellValues), inline, with the 3×3 loops unrolled;
 * - physical points are computed only for terms with a coefficient or source that needs them (the load's points
 *   are used as they are computed, not stored);
 * - the coefficient and source values are tested for finiteness inline (the message is built only on failure).
 * The scatter is the general loop's (a sorted walk along each CSR row was measured no faster than the binary
 * search: 6M tetrahedra, 1.8 s either way).
 * Triangles have their own such path (triangles.ts); the reference loop is general-cells.ts. Nothing is allocated
 * per cell or per point (common practice for hot loops on typed arrays; DEVELOPERS.md, Conventions). The cells and
 * rows of one call are a CellSet (cell-set.ts): all of them, or one part of a shared assembly (cell-parts.ts).
 */
export function tetrahedronCells(p: CellLoopInput): CellLoop {
  const { mesh, cellDofs, n, cvK, cvB, cvC, cvF, coef, A, b, reduced, dirichletValues } = p;
  const { coords, cells, verticesPerCell: vpc } = mesh;
  const kf = coef.k, bf = coef.b, cf = coef.c, ff = coef.f;
  const Ke = new Float64Array(n * n);
  const Fe = new Float64Array(n);
  const rows = new Int32Array(n), cols = new Int32Array(n);
  const J = new Float64Array(9), invJ = new Float64Array(9);

  return ({ c0, c1, owner, part, defer: d }) => {
  for (let c = c0; c < c1; c++) {
    Ke.fill(0); Fe.fill(0);
    // Jacobian J[d·3 + r] = x_{r+1,d} − x_{0,d} and its inverse, as cellJacobian and invert compute them.
    const base = c * vpc;
    const p0 = cells[base] * 3, p1 = cells[base + 1] * 3, p2 = cells[base + 2] * 3, p3 = cells[base + 3] * 3;
    const x0 = coords[p0], y0 = coords[p0 + 1], z0 = coords[p0 + 2];
    const ja = coords[p1] - x0, jb = coords[p2] - x0, jc = coords[p3] - x0;
    const jd = coords[p1 + 1] - y0, je = coords[p2 + 1] - y0, jf = coords[p3 + 1] - y0;
    const jg = coords[p1 + 2] - z0, jh = coords[p2 + 2] - z0, ji = coords[p3 + 2] - z0;
    const cA = je * ji - jf * jh, cB = -(jd * ji - jf * jg), cC = jd * jh - je * jg;
    const det = ja * cA + jb * cB + jc * cC;
    if (!(det > 0)) reinitCell(cvK, mesh, c); // throws, naming the cell
    J[0] = ja; J[1] = jb; J[2] = jc; J[3] = jd; J[4] = je; J[5] = jf; J[6] = jg; J[7] = jh; J[8] = ji;
    invJ[0] = cA / det; invJ[1] = -(jb * ji - jc * jh) / det; invJ[2] = (jb * jf - jc * je) / det;
    invJ[3] = cB / det; invJ[4] = (ja * ji - jc * jg) / det; invJ[5] = -(ja * jf - jc * jd) / det;
    invJ[6] = cC / det; invJ[7] = -(ja * jh - jb * jg) / det; invJ[8] = (ja * je - jb * jd) / det;

    {
      fill(cvK, det, x0, y0, z0, J, invJ, true, kf !== undefined);
      const { nq, grads, wdet, x } = cvK;
      for (let q = 0; q < nq; q++) {
        let w = wdet[q];
        if (kf) { const kq = kf(x[3 * q], x[3 * q + 1], x[3 * q + 2]); if (!Number.isFinite(kq)) checkFinite(kq, 'conductivity k', c, x, q); w *= kq; }
        const o = q * n * 3;
        for (let i = 0; i < n; i++) {
          const gi = o + i * 3;
          const a0 = grads[gi], a1 = grads[gi + 1], a2 = grads[gi + 2];
          for (let j = i; j < n; j++) {
            const gj = o + j * 3;
            let s = 0;
            s += a0 * grads[gj]; s += a1 * grads[gj + 1]; s += a2 * grads[gj + 2];
            Ke[i * n + j] += w * s;
          }
        }
      }
      for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) Ke[i * n + j] = Ke[j * n + i];
    }
    if (cvB && bf) {
      fill(cvB, det, x0, y0, z0, J, invJ, true, true);
      const { nq, grads, values, wdet, x } = cvB;
      for (let q = 0; q < nq; q++) {
        bf(x[3 * q], x[3 * q + 1], x[3 * q + 2], vecB);
        for (let d = 0; d < 3; d++) if (!Number.isFinite(vecB[d])) checkFinite(vecB[d], `convection b[${d}]`, c, x, q);
        const w = wdet[q];
        const o = q * n * 3;
        const b0 = vecB[0], b1 = vecB[1], b2 = vecB[2];
        for (let j = 0; j < n; j++) {
          let bg = 0;
          bg += b0 * grads[o + j * 3]; bg += b1 * grads[o + j * 3 + 1]; bg += b2 * grads[o + j * 3 + 2];
          bg *= w;
          for (let i = 0; i < n; i++) Ke[i * n + j] += values[q * n + i] * bg;
        }
      }
    }
    if (cvC && cf) {
      fill(cvC, det, x0, y0, z0, J, invJ, false, true);
      const { nq, values, wdet, x } = cvC;
      for (let q = 0; q < nq; q++) {
        const cq = cf(x[3 * q], x[3 * q + 1], x[3 * q + 2]);
        if (!Number.isFinite(cq)) checkFinite(cq, 'reaction c', c, x, q);
        const w = wdet[q] * cq;
        for (let i = 0; i < n; i++) {
          const wi = w * values[q * n + i];
          for (let j = 0; j < n; j++) Ke[i * n + j] += wi * values[q * n + j];
        }
      }
    }
    if (cvF && ff) {
      // The load: reinitCell's points and weights × det computed point by point in the same order, not stored (the
      // point is written out only to name it when f is not finite there).
      const { nq, values, x, rule } = cvF;
      const pts = rule.points, wts = rule.weights;
      for (let q = 0; q < nq; q++) {
        const s = pts[3 * q], t = pts[3 * q + 1], u = pts[3 * q + 2];
        let X = x0; X += ja * s; X += jb * t; X += jc * u;
        let Y = y0; Y += jd * s; Y += je * t; Y += jf * u;
        let Z = z0; Z += jg * s; Z += jh * t; Z += ji * u;
        const fq = ff(X, Y, Z);
        if (!Number.isFinite(fq)) { x[3 * q] = X; x[3 * q + 1] = Y; x[3 * q + 2] = Z; checkFinite(fq, 'source f', c, x, q); }
        const w = wts[q] * det * fq;
        const vo = q * n;
        for (let i = 0; i < n; i++) Fe[i] += w * values[vo + i];
      }
    }

    scatterCell(c, n, cellDofs, reduced, dirichletValues, Ke, Fe, rows, cols, A, b, owner, part, d);
  }
  };
}

/** reinitCell's arithmetic for an affine tetrahedron whose Jacobian J, inverse and determinant are given: weights ×
 *  det, physical points x = x0 + J ξ (when asked for) and physical gradients invJᵀ ∇ξφ, each sum in the same order. */
function fill(
  cv: CellValues, det: number, x0: number, y0: number, z0: number, J: Float64Array, invJ: Float64Array,
  withGrads: boolean, withX: boolean,
): void {
  const { nq, n, rule, refGrads, grads, x, wdet } = cv;
  const pts = rule.points, wts = rule.weights;
  const j0 = J[0], j1 = J[1], j2 = J[2], j3 = J[3], j4 = J[4], j5 = J[5], j6 = J[6], j7 = J[7], j8 = J[8];
  const i0 = invJ[0], i1 = invJ[1], i2 = invJ[2], i3 = invJ[3], i4 = invJ[4], i5 = invJ[5], i6 = invJ[6], i7 = invJ[7], i8 = invJ[8];
  for (let q = 0; q < nq; q++) {
    wdet[q] = wts[q] * det;
    if (withX) {
      const s = pts[3 * q], t = pts[3 * q + 1], u = pts[3 * q + 2];
      let X = x0; X += j0 * s; X += j1 * t; X += j2 * u;
      let Y = y0; Y += j3 * s; Y += j4 * t; Y += j5 * u;
      let Z = z0; Z += j6 * s; Z += j7 * t; Z += j8 * u;
      x[3 * q] = X; x[3 * q + 1] = Y; x[3 * q + 2] = Z;
    }
    if (!withGrads) continue;
    const o = q * n * 3;
    for (let i = 0; i < n; i++) {
      const gi = o + i * 3;
      const r0 = refGrads[gi], r1 = refGrads[gi + 1], r2 = refGrads[gi + 2];
      let g0 = 0; g0 += i0 * r0; g0 += i3 * r1; g0 += i6 * r2;
      let g1 = 0; g1 += i1 * r0; g1 += i4 * r1; g1 += i7 * r2;
      let g2 = 0; g2 += i2 * r0; g2 += i5 * r1; g2 += i8 * r2;
      grads[gi] = g0; grads[gi + 1] = g1; grads[gi + 2] = g2;
    }
  }
}
