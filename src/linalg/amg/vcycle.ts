/** The multigrid cycle as a preconditioner: z = B r with B one cycle from a zero initial guess.
 *  Pre-smoothing by forward and post-smoothing by backward Gauss–Seidel (symmetric B for symmetric A), restriction
 *  Pᵀ (from the rows of P: no transpose is kept), prolongation P, direct solve on the coarsest level (Vaněk, Mandel & Brezina 1996, §2). A level with
 *  coarseVisits = 2 cycles its coarser level twice (the W-cycle, γ = 2 in Hackbusch 1985, Multi-Grid Methods and
 *  Applications, §2.4, from memory); the setup does that below the first coarse level only, where it is cheap.
 *  For symmetric A the last pre-smoothing sweep also yields the residual from one pass over the matrix, and on the
 *  finest level the last post-smoothing sweep also yields A z, which CG uses instead of its own product
 *  (withProduct) when that product is exactly the caller's (see FinestOperator.exactProducts). Nothing is
 *  allocated per cycle. */
import { spmv as spmvInto } from '../csr.ts';
import type { Preconditioner } from '../types.ts';
import {
  backwardSweep, backwardSweepWithProduct, forwardSweep, forwardSweepFromZero, forwardSweepFromZeroWithResidual,
  forwardSweepWithResidual, prolongAndAdd, residualInto, restrictByTranspose,
} from './smoother.ts';
import type { AmgHierarchy, AmgLevel } from './types.ts';
import { seamBackward, seamBackwardWithProduct, seamForwardFromZeroWithResidual } from './seams.ts';

export function vCyclePreconditioner(h: AmgHierarchy): Preconditioner {
  const { levels, coarse, symmetric } = h;
  const last = levels.length - 1;
  const visits = levels.map((L) => L.coarseVisits);

  const solveCoarsest = (b: Float64Array, x: Float64Array): void => {
    const L = levels[last];
    if (coarse.kind === 'gauss-seidel') {
      forwardSweepFromZero(L.A, L.diagPos, L.invDiag, b, x);
      backwardSweep(L.A, L.diagPos, L.invDiag, b, x);
      for (let s = 1; s < coarse.sweeps; s++) {
        forwardSweep(L.A, L.diagPos, L.invDiag, b, x);
        backwardSweep(L.A, L.diagPos, L.invDiag, b, x);
      }
    } else coarse.factor.solve(b, x);
  };

  /** x = S b from x = 0 with S the forward sweeps of level L, and L.r = b − A x. */
  const preSmooth = (L: AmgLevel, b: Float64Array, x: Float64Array): void => {
    const { A, diagPos, invDiag, sweeps } = L;
    if (symmetric && sweeps === 1) {
      if (L.seams) seamForwardFromZeroWithResidual(A, diagPos, invDiag, b, x, L.r, L.seams);
      else forwardSweepFromZeroWithResidual(A, diagPos, invDiag, b, x, L.r);
      return;
    }
    forwardSweepFromZero(A, diagPos, invDiag, b, x);
    if (symmetric) {
      for (let s = 2; s < sweeps; s++) forwardSweep(A, diagPos, invDiag, b, x);
      forwardSweepWithResidual(A, diagPos, invDiag, b, x, L.r);
    } else {
      for (let s = 1; s < sweeps; s++) forwardSweep(A, diagPos, invDiag, b, x);
      residualInto(A, b, x, L.r);
    }
  };

  /** Restriction of L.r, the cycle below (twice on the cheap levels: a W-cycle there), and the correction added
   *  to x. The second visit iterates on the coarse residual, x_c += B_c (b_c − A_c x_c); two steps of a symmetric
   *  iteration are again a symmetric operator, so B stays a valid CG preconditioner. */
  const coarseCorrection = (l: number, x: Float64Array): void => {
    const C = levels[l + 1];
    restrictByTranspose(C.P!, levels[l].r, C.b);
    cycle(l + 1, C.b, C.x);
    if (visits[l] > 1) {
      residualInto(C.A, C.b, C.x, C.rc);
      cycle(l + 1, C.rc, C.dx);
      const cx = C.x, dx = C.dx;
      for (let i = 0; i < cx.length; i++) cx[i] += dx[i];
    }
    prolongAndAdd(C.P!, C.x, x);
  };

  const cycle = (l: number, b: Float64Array, x: Float64Array): void => {
    if (l === last) { solveCoarsest(b, x); return; }
    const L = levels[l];
    preSmooth(L, b, x);
    coarseCorrection(l, x);
    if (L.seams) seamBackward(L.A, L.diagPos, L.invDiag, b, x, L.seams); // seam order only with one sweep
    else for (let s = 0; s < L.sweeps; s++) backwardSweep(L.A, L.diagPos, L.invDiag, b, x);
  };
  const sums = new Float64Array(levels[0].seams ? levels[0].seams.interiors.length / 2 : 0);

  /** cycle(0, …) ending with the backward sweep that also forms A z (symmetric A only). */
  const cycleWithProduct = (b: Float64Array, x: Float64Array, w: Float64Array): number => {
    const L = levels[0];
    if (last === 0) {
      solveCoarsest(b, x);
      spmvInto(L.A, x, w);
      let bx = 0;
      for (let i = 0; i < x.length; i++) bx += b[i] * x[i];
      return bx;
    }
    preSmooth(L, b, x);
    coarseCorrection(0, x);
    for (let s = 1; s < L.sweeps; s++) backwardSweep(L.A, L.diagPos, L.invDiag, b, x);
    return L.seams
      ? seamBackwardWithProduct(L.A, L.diagPos, L.invDiag, b, x, w, L.seams, sums)
      : backwardSweepWithProduct(L.A, L.diagPos, L.invDiag, b, x, w);
  };

  return {
    name: 'amg',
    apply(r: Float64Array, z: Float64Array): void { cycle(0, r, z); },
    ...(symmetric && h.exactProducts ? { withProduct: { matrix: h.operator, apply: cycleWithProduct } } : {}),
  };
}
