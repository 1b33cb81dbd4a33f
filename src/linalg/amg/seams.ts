/**
 * Seam-ordered Gauss–Seidel: the sweeps of smoother.ts in an order that lets several threads sweep at once, with the
 * same bits on any number of threads.
 *
 * The rows of a level are cut into SEAM_PARTS contiguous parts (a number fixed here, never the number of threads).
 * The interior of a part is the longest run of its rows whose columns all lie inside the part; the other rows are
 * seams (near the cuts, for a matrix whose bandwidth is small against a part). The forward sweep goes through every
 * interior (part 0 first, each in increasing rows), then every seam row in increasing order; the backward sweep is
 * the exact reverse. No interior row reads or writes a row of another part, so the interiors can be swept by
 * different threads in any interleaving with the bits of this order; the seams, a few per cent of the rows, follow
 * on one thread. It is Gauss–Seidel for a permutation of the unknowns (the interiors, then the seams), so forward
 * before and backward after the coarse correction still make a symmetric cycle for symmetric A (smoother.ts), the
 * classical domain-decomposition ordering of a parallel Gauss–Seidel (Saad 2003, Iterative Methods for Sparse Linear
 * Systems, 2nd ed., §12.4, from memory).
 *
 * Only a symmetric level with one sweep is seam-ordered (the fused sweeps below are the only ones the cycle then
 * uses: forward from zero with the residual, backward, backward with A x), and only when it has SEAM_MIN_ROWS rows
 * or more and its interiors hold SEAM_MIN_INTERIOR of them; any other level keeps the natural order.
 *
 * The sweeps are smoother.ts's on ranges of rows, plus seamForwardWithResidual below: the reference of the *Rows
 * kernels of src/linalg/kernels/sparse.wat (the same operations in the same order).
 */
import type { Csr } from '../types.ts';
import { backwardSweep, backwardSweepWithProduct, forwardSweepFromZeroWithResidual } from './smoother.ts';

/** Parts per level: enough for 8 threads, few enough that the seams stay a few per cent of a large level's rows. */
export const SEAM_PARTS = 8;
/** Smallest level that is seam-ordered: below it a sweep takes well under a millisecond, less than handing parts to
 *  other threads costs. */
export const SEAM_MIN_ROWS = 50_000;
/** Share of the rows the interiors must hold, or the level keeps the natural order (the seams run on one thread). */
export const SEAM_MIN_INTERIOR = 0.85;

export interface SeamLayout {
  /** Per part p: its interior rows [interiors[2p], interiors[2p + 1]) (empty when equal). */
  interiors: Int32Array;
  /** The seams, increasing: rows [seams[2s], seams[2s + 1]) for each s. */
  seams: Int32Array;
  /** Rows in the interiors. */
  interiorRows: number;
}

/** The seam layout of A (square, columns sorted in each row), or null when A is too small or its interiors too thin. */
export function seamLayout(A: Csr, parts = SEAM_PARTS, minRows = SEAM_MIN_ROWS, minInterior = SEAM_MIN_INTERIOR): SeamLayout | null {
  const n = A.nRows;
  if (n < minRows || n < parts) return null;
  const { rowPtr, colIdx } = A;
  const interiors = new Int32Array(2 * parts);
  const seams: number[] = [];
  let interiorRows = 0;
  let seamStart = 0; // start of the seam run not yet closed
  for (let p = 0; p < parts; p++) {
    const s = Math.floor((p * n) / parts), e = Math.floor(((p + 1) * n) / parts);
    // lo: one past the last row of the part with a column before s; hi: the first row with a column at or after e.
    let lo = s, hi = e;
    for (let i = s; i < e; i++) {
      const first = colIdx[rowPtr[i]], last = colIdx[rowPtr[i + 1] - 1];
      if (rowPtr[i + 1] > rowPtr[i] && first < s) lo = i + 1;
      if (rowPtr[i + 1] > rowPtr[i] && last >= e && hi === e) hi = i;
    }
    if (hi < lo) hi = lo;
    // Rows between lo and hi may still reach outside the part if a later row reaches below s (lo moved past them)
    // or an earlier one beyond e: lo and hi bound every such row, so [lo, hi) is clean by construction.
    interiors[2 * p] = lo; interiors[2 * p + 1] = hi;
    if (lo > seamStart) seams.push(seamStart, lo);
    seamStart = hi;
    interiorRows += hi - lo;
  }
  if (n > seamStart) seams.push(seamStart, n);
  if (interiorRows < minInterior * n) return null;
  return { interiors, seams: Int32Array.from(seams), interiorRows };
}

/** Seam rows [first, last) of the forward sweep with residual: each row solved from all of x (upper part with the
 *  diagonal from the row's end down, then the lower part), x_i += δ, r_i = 0, then −a_ij δ into r_j for every j ≠ i.
 *  Rows swept before it (every interior, the earlier seams) get their share of r; rows swept after it reset theirs. */
export function seamForwardWithResidual(
  A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array, r: Float64Array, first: number, last: number,
): void {
  const { rowPtr, colIdx, values } = A;
  for (let i = first; i < last; i++) {
    const lo = rowPtr[i], d = diagPos[i], end = rowPtr[i + 1];
    let s = b[i];
    for (let k = end - 1; k >= d; k--) s -= values[k] * x[colIdx[k]];
    for (let k = lo; k < d; k++) s -= values[k] * x[colIdx[k]];
    const delta = s * invDiag[i];
    x[i] += delta;
    r[i] = 0;
    for (let k = lo; k < end; k++) if (k !== d) r[colIdx[k]] -= values[k] * delta;
  }
}

/** Runs part p of a phase: the hook a caller with threads replaces (each part touches only its own rows). */
export type PartRunner = (parts: number, run: (p: number) => void) => void;
const inOrder: PartRunner = (parts, run) => { for (let p = 0; p < parts; p++) run(p); };

/** The forward sweep from x = 0 in seam order, leaving r = b − A x (symmetric A): forwardSweepFromZeroWithResidual
 *  for the permuted order. The seams' x is zeroed first (the interiors read it as the zero it is in that order). */
export function seamForwardFromZeroWithResidual(
  A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array, r: Float64Array, layout: SeamLayout,
  parts: PartRunner = inOrder,
): void {
  const { interiors, seams } = layout;
  for (let s = 0; s < seams.length; s += 2) x.fill(0, seams[s], seams[s + 1]);
  parts(interiors.length / 2, (p) => forwardSweepFromZeroWithResidual(A, diagPos, invDiag, b, x, r, interiors[2 * p], interiors[2 * p + 1]));
  for (let s = 0; s < seams.length; s += 2) seamForwardWithResidual(A, diagPos, invDiag, b, x, r, seams[s], seams[s + 1]);
}

/** The backward sweep in seam order: the seams from the last row down, then every interior. */
export function seamBackward(
  A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array, layout: SeamLayout,
  parts: PartRunner = inOrder,
): void {
  const { interiors, seams } = layout;
  for (let s = seams.length - 2; s >= 0; s -= 2) backwardSweep(A, diagPos, invDiag, b, x, seams[s], seams[s + 1]);
  parts(interiors.length / 2, (p) => backwardSweep(A, diagPos, invDiag, b, x, interiors[2 * p], interiors[2 * p + 1]));
}

/** The backward sweep in seam order that also leaves w = A x and returns b·x (symmetric A): the seams' share summed
 *  first, then each part's in decreasing part order, each part's from 0 (so the sum is the same whichever thread
 *  swept which part). `sums` holds each part's share (its length: the number of parts). */
export function seamBackwardWithProduct(
  A: Csr, diagPos: Int32Array, invDiag: Float64Array, b: Float64Array, x: Float64Array, w: Float64Array, layout: SeamLayout,
  sums: Float64Array, parts: PartRunner = inOrder,
): number {
  const { interiors, seams } = layout;
  let bx = 0;
  for (let s = seams.length - 2; s >= 0; s -= 2) bx += backwardSweepWithProduct(A, diagPos, invDiag, b, x, w, seams[s], seams[s + 1]);
  parts(interiors.length / 2, (p) => {
    sums[p] = backwardSweepWithProduct(A, diagPos, invDiag, b, x, w, interiors[2 * p], interiors[2 * p + 1], interiors[2 * p]);
  });
  for (let p = interiors.length / 2 - 1; p >= 0; p--) bx += sums[p];
  return bx;
}
