/** The multigrid V-cycle as a preconditioner: z = B r with B one V-cycle from a zero initial guess.
 *  Pre-smoothing by forward and post-smoothing by backward Gauss–Seidel (symmetric B for symmetric A), restriction
 *  R = Pᵀ, prolongation P, direct solve on the coarsest level (Vaněk, Mandel & Brezina 1996, §2).
 *  For symmetric A with one sweep the pre-smoother also yields the residual from the lower triangle alone, and on the
 *  finest level the post-smoother also yields A z, which CG uses instead of its own product (withProduct). */
import { spmv as spmvInto } from '../csr.ts';
import type { Preconditioner } from '../types.ts';
import {
  backwardSweep, backwardSweepWithProduct, forwardSweep, forwardSweepFromZero, forwardSweepFromZeroWithResidual,
  prolongAndAdd, residualInto, restrict,
} from './smoother.ts';
import type { AmgHierarchy } from './types.ts';

const XX: Record<string, number> = JSON.parse(process.env.AMG_X ?? '{}');
export function vCyclePreconditioner(h: AmgHierarchy): Preconditioner {
  const { levels, coarse, sweeps, symmetric } = h;
  const last = levels.length - 1;
  const fused = symmetric && sweeps === 1;

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

  const cycle = (l: number, b: Float64Array, x: Float64Array): void => {
    if (l === last) { solveCoarsest(b, x); return; }
    const L = levels[l];
    const C = levels[l + 1];
    const sw = l > 0 ? (XX.cs ?? sweeps) : sweeps;
    if (fused && sw === 1) forwardSweepFromZeroWithResidual(L.A, L.diagPos, L.invDiag, b, x, L.r);
    else {
      forwardSweepFromZero(L.A, L.diagPos, L.invDiag, b, x);
      for (let s = 1; s < sw; s++) forwardSweep(L.A, L.diagPos, L.invDiag, b, x);
      residualInto(L.A, b, x, L.r);
    }
    restrict(C.R!, L.r, C.b);
    cycle(l + 1, C.b, C.x);
    prolongAndAdd(C.P!, C.x, x);
    if (l > 0 && XX.w && l + 1 < last) {
      // second coarse visit (W-cycle): residual, restrict, correct
      residualInto(L.A, b, x, L.r);
      restrict(C.R!, L.r, C.b);
      C.x.fill(0);
      cycle(l + 1, C.b, C.x);
      prolongAndAdd(C.P!, C.x, x);
    }
    for (let s = 0; s < sw; s++) backwardSweep(L.A, L.diagPos, L.invDiag, b, x);
  };

  /** The finest level of cycle(), ending with the backward sweep that also forms A z. */
  const cycleWithProduct = (b: Float64Array, x: Float64Array, w: Float64Array): number => {
    const L = levels[0];
    if (last === 0) {
      solveCoarsest(b, x);
      spmvInto(L.A, x, w);
      let bx = 0;
      for (let i = 0; i < x.length; i++) bx += b[i] * x[i];
      return bx;
    }
    const C = levels[1];
    forwardSweepFromZeroWithResidual(L.A, L.diagPos, L.invDiag, b, x, L.r);
    restrict(C.R!, L.r, C.b);
    cycle(1, C.b, C.x);
    prolongAndAdd(C.P!, C.x, x);
    return backwardSweepWithProduct(L.A, L.diagPos, L.invDiag, b, x, w);
  };

  return {
    name: 'amg',
    apply(r: Float64Array, z: Float64Array): void { cycle(0, r, z); },
    ...(fused ? { withProduct: { matrix: h.operator, apply: cycleWithProduct } } : {}),
  };
}
