import { reinitCell } from '../geometry/cellvalues.ts';
import type { CellValues } from '../geometry/cellvalues.ts';
import { failAtPoint2D } from './check-finite.ts';
import type { CellLoop, CellLoopInput } from './cell-set.ts';

/**
 * The cell loop of −∇·(k∇u) = f on affine P1 triangles, the matrix's rows written whole (no owner): the arithmetic of
 * triangles.ts, operation for operation, so the same bits (test/fem/team/shared-cells.test.ts), with what is
 * constant on a P1 triangle taken out of the loops:
 * - the three basis gradients are constant on the cell: mapped once per cell (triangles.ts maps them again at every
 *   point of the stiffness rule, to the same values, since the element's tabulated gradients are the same there);
 * - the element matrix is six numbers in locals (no 3×3 array refilled per cell, no mirror copy);
 * - each of the cell's rows is scanned once for its three columns, in place of a binary search per entry (a row of
 *   a P1 triangulation holds about seven entries).
 * Measured on 2M triangles (1024² squares, constant k, the matrix alone, Intel Xeon VM, 2 cores, idle): 340–390 ms
 * in triangles.ts, 97–100 ms here; the same bits.
 * Convection or reaction terms, a pass without the matrix, and the cell team's parts (rows owned by another part are
 * deferred) take the general triangle loop, given as `general`.
 */
export function p1TriangleCells(p: CellLoopInput, general: CellLoop): CellLoop {
  const { mesh, cellDofs, cvK, cvF, coef, A, b, reduced, dirichletValues } = p;
  if (A === null || !p1Eligible(p)) return general;
  const { coords, cells, verticesPerCell: vpc } = mesh;
  const kf = coef.k, ff = coef.f;
  const rp = A.rowPtr, ci = A.colIdx, av = A.values;
  // The element's gradients on the reference cell (the same at every point of the rule: p1Eligible).
  const r00 = cvK.refGrads[0], r01 = cvK.refGrads[1], r10 = cvK.refGrads[2], r11 = cvK.refGrads[3];
  const r20 = cvK.refGrads[4], r21 = cvK.refGrads[5];
  const nqK = cvK.nq, ptsK = cvK.rule.points, wtsK = cvK.rule.weights;
  const load = cvF !== null && ff !== undefined ? cvF : null;
  const nqF = load ? load.nq : 0, ptsF = load ? load.rule.points : ptsK, wtsF = load ? load.rule.weights : wtsK;
  const valF = load ? load.values : ptsK;

  /** Adds a row's three entries (v === 0 and Dirichlet columns skipped, as scatterCell does) with one scan of it. */
  const addRow = (r: number, ca: number, va: number, cb: number, vb: number, cc: number, vc: number): void => {
    const wa = ca >= 0 && va !== 0, wb = cb >= 0 && vb !== 0, wc = cc >= 0 && vc !== 0;
    for (let k = rp[r], e = rp[r + 1]; k < e; k++) {
      const col = ci[k];
      if (col === ca) { if (wa) av[k] += va; } else if (col === cb) { if (wb) av[k] += vb; } else if (col === cc) { if (wc) av[k] += vc; }
    }
  };
  /** b's part of a row, in scatterCell's order: the load, then each Dirichlet column's value taken away. */
  const loadRow = (r: number, fe: number, ga: number, ra: number, va: number, gb: number, rb: number, vb: number,
    gc: number, rc: number, vc: number): void => {
    const bb = b!;
    bb[r] += fe;
    if (va !== 0 && ra < 0) bb[r] -= va * dirichletValues[ga];
    if (vb !== 0 && rb < 0) bb[r] -= vb * dirichletValues[gb];
    if (vc !== 0 && rc < 0) bb[r] -= vc * dirichletValues[gc];
  };

  return (set) => {
    if (set.owner !== null) { general(set); return; }
    for (let c = set.c0; c < set.c1; c++) {
      const base = c * vpc;
      const p0 = cells[base] * 2, p1 = cells[base + 1] * 2, p2 = cells[base + 2] * 2;
      const x0 = coords[p0], y0 = coords[p0 + 1];
      const j0 = coords[p1] - x0, j1 = coords[p2] - x0, j2 = coords[p1 + 1] - y0, j3 = coords[p2 + 1] - y0;
      const det = j0 * j3 - j1 * j2;
      if (!(det > 0)) reinitCell(cvK, mesh, c); // throws, naming the cell
      const i0 = j3 / det, i1 = -j1 / det, i2 = -j2 / det, i3 = j0 / det;
      // The physical gradients, as triangles.ts sums them.
      let a0 = 0; a0 += i0 * r00; a0 += i2 * r01;
      let a1 = 0; a1 += i1 * r00; a1 += i3 * r01;
      let b0 = 0; b0 += i0 * r10; b0 += i2 * r11;
      let b1 = 0; b1 += i1 * r10; b1 += i3 * r11;
      let c0 = 0; c0 += i0 * r20; c0 += i2 * r21;
      let c1 = 0; c1 += i1 * r20; c1 += i3 * r21;
      let s = 0; s += a0 * a0; s += a1 * a1; const saa = s;
      s = 0; s += a0 * b0; s += a1 * b1; const sab = s;
      s = 0; s += a0 * c0; s += a1 * c1; const sac = s;
      s = 0; s += b0 * b0; s += b1 * b1; const sbb = s;
      s = 0; s += b0 * c0; s += b1 * c1; const sbc = s;
      s = 0; s += c0 * c0; s += c1 * c1; const scc = s;
      let kaa = 0, kab = 0, kac = 0, kbb = 0, kbc = 0, kcc = 0;
      for (let q = 0; q < nqK; q++) {
        let w = wtsK[q] * det;
        if (kf) {
          const sq = ptsK[2 * q], tq = ptsK[2 * q + 1];
          let X = x0; X += j0 * sq; X += j1 * tq;
          let Y = y0; Y += j2 * sq; Y += j3 * tq;
          const kq = kf(X, Y, 0);
          if (!Number.isFinite(kq)) failAtPoint2D(kq, 'conductivity k', c, X, Y);
          w *= kq;
        }
        kaa += w * saa; kab += w * sab; kac += w * sac; kbb += w * sbb; kbc += w * sbc; kcc += w * scc;
      }
      let fa = 0, fb = 0, fc = 0;
      for (let q = 0; q < nqF; q++) {
        const sq = ptsF[2 * q], tq = ptsF[2 * q + 1];
        let X = x0; X += j0 * sq; X += j1 * tq;
        let Y = y0; Y += j2 * sq; Y += j3 * tq;
        const fq = ff!(X, Y, 0);
        if (!Number.isFinite(fq)) failAtPoint2D(fq, 'source f', c, X, Y);
        const w = wtsF[q] * det * fq;
        fa += w * valF[3 * q]; fb += w * valF[3 * q + 1]; fc += w * valF[3 * q + 2];
      }
      const ga = cellDofs[3 * c], gb = cellDofs[3 * c + 1], gc = cellDofs[3 * c + 2];
      const ra = reduced[ga], rb = reduced[gb], rc = reduced[gc];
      if (ra >= 0) {
        if (b !== null) loadRow(ra, fa, ga, ra, kaa, gb, rb, kab, gc, rc, kac);
        addRow(ra, ra, kaa, rb, kab, rc, kac);
      }
      if (rb >= 0) {
        if (b !== null) loadRow(rb, fb, ga, ra, kab, gb, rb, kbb, gc, rc, kbc);
        addRow(rb, ra, kab, rb, kbb, rc, kbc);
      }
      if (rc >= 0) {
        if (b !== null) loadRow(rc, fc, ga, ra, kac, gb, rb, kbc, gc, rc, kcc);
        addRow(rc, ra, kac, rb, kbc, rc, kcc);
      }
    }
  };
}

/** P1 on triangles with the stiffness (and load) terms only, the element's gradients the same at every point. */
function p1Eligible(p: CellLoopInput): boolean {
  const { mesh, cellDofs, n, cvK, cvB, cvC, coef } = p;
  if (mesh.cellKind !== 'triangle' || n !== 3 || mesh.verticesPerCell !== 3 || cellDofs !== mesh.cells) return false;
  if ((cvB && coef.b) || (cvC && coef.c)) return false;
  if (cvK.element.degree !== 1) return false;
  return sameAtEveryPoint(cvK) && (p.cvF === null || p.cvF.n === 3);
}

function sameAtEveryPoint(cv: CellValues): boolean {
  const g = cv.refGrads, per = cv.n * cv.dim;
  for (let q = 1; q < cv.nq; q++) for (let k = 0; k < per; k++) if (!Object.is(g[q * per + k], g[k])) return false;
  return true;
}
