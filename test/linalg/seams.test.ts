import { afterAll, describe, expect, it } from 'vitest';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import { vCyclePreconditioner } from '../../src/linalg/amg/vcycle.ts';
import {
  SEAM_MIN_INTERIOR, SEAM_MIN_ROWS, SEAM_PARTS, seamBackward, seamBackwardWithProduct, seamForwardFromZeroWithResidual, seamLayout,
  type PartRunner, type SeamLayout,
} from '../../src/linalg/amg/seams.ts';
import { backwardSweep, forwardSweepFromZero } from '../../src/linalg/amg/smoother.ts';
import { cg } from '../../src/linalg/cg.ts';
import { csrFromTriplets, diagonalPositions, spmv } from '../../src/linalg/csr.ts';
import type { Csr, PartTeam } from '../../src/linalg/types.ts';
import { cellTeam, setTeamThreads, setWorkersFirst, teamThreads } from '../../src/fem/team/team.ts';
import { lagrangeGridStiffness } from './helpers/lagrange-grid.ts';
import { randomVector } from './helpers/random-matrices.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

// Seam-ordered Gauss–Seidel (src/linalg/amg/seams.ts) is Gauss–Seidel for a permutation of the unknowns, the
// interiors of the parts first and the seams last (the domain-decomposition ordering of a parallel Gauss–Seidel:
// Saad 2003, Iterative Methods for Sparse Linear Systems, 2nd ed., §12.4, from memory). Checked here against that
// definition (the plain sweeps of smoother.ts on the permuted matrix), for its fused residual and product against
// b − A x and A x, and, since the interiors do not touch each other, for the same bits in any order of the parts and
// on the cell team's threads.

// 255² = 65,025 unknowns: above SEAM_MIN_ROWS, so the finest level is seam-ordered.
const grid = lagrangeGridStiffness('triangle', 1, 256);
const A = grid.A;
const n = A.nRows;
const { diagPos, invDiag } = (() => {
  const d = diagonalPositions(A);
  const inv = new Float64Array(n);
  for (let i = 0; i < n; i++) inv[i] = 1 / A.values[d[i]];
  return { diagPos: d, invDiag: inv };
})();
const layout = seamLayout(A)!;

const threadsBefore = teamThreads();
afterAll(() => { setWorkersFirst(false); setTeamThreads(threadsBefore); });

/** The permutation of the seam order: position → row. */
function seamOrder(L: SeamLayout): Int32Array {
  const order: number[] = [];
  for (let p = 0; p < L.interiors.length / 2; p++) for (let i = L.interiors[2 * p]; i < L.interiors[2 * p + 1]; i++) order.push(i);
  for (let s = 0; s < L.seams.length; s += 2) for (let i = L.seams[s]; i < L.seams[s + 1]; i++) order.push(i);
  return Int32Array.from(order);
}

/** Q A Qᵀ for the permutation order (row k of the result is row order[k] of A), with its diagonal data. */
function permuted(M: Csr, order: Int32Array): { A: Csr; diagPos: Int32Array; invDiag: Float64Array } {
  const pos = new Int32Array(order.length);
  order.forEach((row, k) => { pos[row] = k; });
  const r: number[] = [], c: number[] = [], v: number[] = [];
  for (let i = 0; i < M.nRows; i++) for (let k = M.rowPtr[i]; k < M.rowPtr[i + 1]; k++) { r.push(pos[i]); c.push(pos[M.colIdx[k]]); v.push(M.values[k]); }
  const P = csrFromTriplets(M.nRows, M.nCols, r, c, v);
  const d = diagonalPositions(P);
  return { A: P, diagPos: d, invDiag: Float64Array.from(d, (k) => 1 / P.values[k]) };
}

const maxDiff = (a: Float64Array, b: Float64Array): number => { let m = 0; for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] - b[i])); return m; };
const maxAbs = (a: Float64Array): number => a.reduce((m, v) => Math.max(m, Math.abs(v)), 0);

describe('seamLayout', () => {
  it('splits the rows into interiors that read only their own part, and seams, covering every row once', () => {
    expect(layout.interiors.length).toBe(2 * SEAM_PARTS);
    const seen = new Uint8Array(n);
    const bad: string[] = [];
    for (let p = 0; p < SEAM_PARTS; p++) {
      const s = Math.floor((p * n) / SEAM_PARTS), e = Math.floor(((p + 1) * n) / SEAM_PARTS);
      for (let i = layout.interiors[2 * p]; i < layout.interiors[2 * p + 1]; i++) {
        seen[i]++;
        for (let k = A.rowPtr[i]; k < A.rowPtr[i + 1]; k++) if (A.colIdx[k] < s || A.colIdx[k] >= e) bad.push(`row ${i} reads ${A.colIdx[k]} outside part ${p}`);
      }
    }
    for (let t = 0; t < layout.seams.length; t += 2) {
      if (t > 0) expect(layout.seams[t]).toBeGreaterThan(layout.seams[t - 1]);
      for (let i = layout.seams[t]; i < layout.seams[t + 1]; i++) seen[i]++;
    }
    expect(bad.slice(0, 3)).toEqual([]);
    expect(seen.every((c) => c === 1)).toBe(true);
    // A 255-wide band: each of the 7 cuts costs about two grid rows of seams, 7 × 2 × 255 of 65,025 rows.
    expect(layout.interiorRows / n).toBeGreaterThan(0.94);
    expect(layout.interiorRows / n).toBeGreaterThanOrEqual(SEAM_MIN_INTERIOR);
  });

  it('keeps the natural order for small matrices and for matrices whose couplings reach across the parts', () => {
    expect(seamLayout(lagrangeGridStiffness('triangle', 1, 64).A)).toBeNull(); // 3,969 rows < SEAM_MIN_ROWS
    expect(SEAM_MIN_ROWS).toBeGreaterThan(3969);
    // The same grid with its unknowns numbered at random: the couplings of every part reach into the others.
    const order = Int32Array.from({ length: n }, (_, k) => k);
    const rand = mulberry32(3);
    for (let k = n - 1; k > 0; k--) { const j = Math.floor(rand() * (k + 1)); [order[k], order[j]] = [order[j], order[k]]; }
    expect(seamLayout(permuted(A, order).A)).toBeNull();
  });
});

describe('seam-ordered sweeps', () => {
  const b = randomVector(n, 11);
  const order = seamOrder(layout);
  const Q = permuted(A, order);
  const bq = Float64Array.from(order, (row) => b[row]);

  it('are the forward and backward Gauss–Seidel sweeps of the permuted system (to round-off: the sums run in another order)', () => {
    const x = new Float64Array(n), r = new Float64Array(n);
    seamForwardFromZeroWithResidual(A, diagPos, invDiag, b, x, r, layout);
    const xq = new Float64Array(n);
    forwardSweepFromZero(Q.A, Q.diagPos, Q.invDiag, bq, xq);
    const xBack = Float64Array.from(order, (row) => x[row]);
    expect(maxDiff(xBack, xq) / maxAbs(xq)).toBeLessThan(1e-13);
    // then the backward sweep
    seamBackward(A, diagPos, invDiag, b, x, layout);
    backwardSweep(Q.A, Q.diagPos, Q.invDiag, bq, xq);
    expect(maxDiff(Float64Array.from(order, (row) => x[row]), xq) / maxAbs(xq)).toBeLessThan(1e-13);
  });

  it('leave r = b − A x after the forward sweep and w = A x, b·x after the backward one', () => {
    const x = new Float64Array(n), r = new Float64Array(n), w = new Float64Array(n);
    seamForwardFromZeroWithResidual(A, diagPos, invDiag, b, x, r, layout);
    const Ax = new Float64Array(n);
    spmv(A, x, Ax);
    const direct = Float64Array.from(b, (bi, i) => bi - Ax[i]);
    expect(maxDiff(r, direct) / maxAbs(b)).toBeLessThan(1e-12);
    const bx = seamBackwardWithProduct(A, diagPos, invDiag, b, x, w, layout, new Float64Array(SEAM_PARTS));
    spmv(A, x, Ax);
    expect(maxDiff(w, Ax) / maxAbs(Ax)).toBeLessThan(1e-12);
    let dot = 0;
    for (let i = 0; i < n; i++) dot += b[i] * x[i];
    expect(Math.abs(bx - dot) / Math.abs(dot)).toBeLessThan(1e-12);
  });

  it('give the same bits whatever order the parts are swept in', () => {
    const reverse: PartRunner = (parts, run) => { for (let p = parts - 1; p >= 0; p--) run(p); };
    const run = (parts?: PartRunner) => {
      const x = new Float64Array(n), r = new Float64Array(n), w = new Float64Array(n);
      seamForwardFromZeroWithResidual(A, diagPos, invDiag, b, x, r, layout, parts);
      seamBackward(A, diagPos, invDiag, b, x, layout, parts);
      const bx = seamBackwardWithProduct(A, diagPos, invDiag, b, x, w, layout, new Float64Array(SEAM_PARTS), parts);
      return { x, r, w, bx };
    };
    const inOrder = run(), reversed = run(reverse);
    expect(reversed.bx).toBe(inOrder.bx);
    for (const key of ['x', 'r', 'w'] as const) expect(Buffer.from(reversed[key].buffer).equals(Buffer.from(inOrder[key].buffer))).toBe(true);
  });
});

describe('the multigrid cycle with seam-ordered levels', () => {
  const b = randomVector(n, 5);
  const same = (a: Float64Array, c: Float64Array): boolean => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(c.buffer, c.byteOffset, c.byteLength));

  it('WebAssembly cycle, TypeScript cycle and a team of threads (restricting by Pᵀ in parts) give the same bits; CG needs no more iterations than in the natural order', () => {
    const { hierarchy, preconditioner } = amgSetup(A, { symmetric: true });
    expect(hierarchy.levels[0].seams).not.toBeNull();
    const ts = vCyclePreconditioner(hierarchy);
    const zw = new Float64Array(n), zt = new Float64Array(n), ww = new Float64Array(n), wt = new Float64Array(n);
    const bw = preconditioner.withProduct!.apply(b, zw, ww), bt = ts.withProduct!.apply(b, zt, wt);
    expect(bw).toBe(bt);
    expect(same(zw, zt) && same(ww, wt)).toBe(true);
    preconditioner.apply(b, zw); ts.apply(b, zt);
    expect(same(zw, zt)).toBe(true);

    // The cell team: the workers take parts first (setWorkersFirst), so that they surely take some.
    setTeamThreads(2);
    cellTeam().warm();
    const team: PartTeam = cellTeam();
    setWorkersFirst(true);
    const elsewhere0 = cellTeam().partsElsewhere;
    const teamSetup = amgSetup(A, { symmetric: true, team });
    const withTeam = teamSetup.preconditioner;
    // With a team the restriction to level 1 runs in parts of Pᵀ's rows (AmgLevel.R), without one by P's scatter:
    // the bits compared below are those of the two ways.
    expect({ withTeam: teamSetup.hierarchy.levels[1].R?.nRows, without: hierarchy.levels[1].R ?? null }).toEqual({ withTeam: hierarchy.levels[1].A.nRows, without: null });
    const zp = new Float64Array(n), wp = new Float64Array(n);
    const bp = withTeam.withProduct!.apply(b, zp, wp);
    setWorkersFirst(false);
    expect(bp).toBe(bt);
    expect(same(zp, zt) && same(wp, wt)).toBe(true);
    expect(cellTeam().workers).toBe(1);
    expect(cellTeam().partsElsewhere).toBeGreaterThan(elsewhere0);

    // Iterations to 1e-10 against the natural order (the same sweeps, another permutation).
    const iterations = (seamOrder: boolean): number => {
      const x = new Float64Array(n);
      const s = cg(A, b, x, { relTol: 1e-10, preconditioner: amgSetup(A, { symmetric: true, seamOrder }).preconditioner });
      expect(s.converged).toBe(true);
      return s.iterations;
    };
    expect(iterations(true)).toBeLessThanOrEqual(iterations(false) + 1);
  });

  it('is a symmetric operator (a valid CG preconditioner): (B r, s) = (r, B s) to round-off', () => {
    const { preconditioner } = amgSetup(A, { symmetric: true });
    const r = randomVector(n, 21), s = randomVector(n, 22);
    const Br = new Float64Array(n), Bs = new Float64Array(n);
    preconditioner.apply(r, Br); preconditioner.apply(s, Bs);
    let a = 0, c = 0;
    for (let i = 0; i < n; i++) { a += Br[i] * s[i]; c += r[i] * Bs[i]; }
    expect(Math.abs(a - c) / Math.abs(a)).toBeLessThan(1e-10);
  });
});
